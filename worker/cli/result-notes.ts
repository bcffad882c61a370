import { describeAssumptions } from '../../shared/analysis/describe-assumptions.ts';
import type { ShotAnalysis } from '../../shared/analysis/types.ts';

/**
 * The lines the CLI's summary prints after the speed: the "check the time base" flag with its reasons, the
 * assumptions behind the result, and the warnings the importer stored with the file.
 */
export function resultNotes(a: ShotAnalysis, captureWarnings: string[]): { flagged: boolean; lines: string[] } {
  const lines: string[] = [];
  const flagged = a.timeBaseCheck?.flagged ?? false;
  if (flagged) {
    lines.push('CHECK THE TIME BASE: this result is not a measurement until the read is checked');
    for (const r of a.timeBaseCheck!.reasons) lines.push(`  - ${r.message}`);
  }
  if (a.assumptions) {
    lines.push('assumptions:');
    for (const l of describeAssumptions(a.assumptions)) lines.push(`  ${l.label.toLowerCase()}: ${l.text}`);
  }
  for (const w of captureWarnings) lines.push(`file warning: ${w}`);
  return { flagged, lines };
}
