import { describe, expect, it } from 'vitest';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { checkAgainstTruth } from './check-against-truth.ts';
import { readCapture, readManifest } from './fixture-manifest.ts';

// Every demo capture is checked against the values the fixture generator wrote into it (fixtures/captures/
// manifest.json), which come from the shot model, not from the importer.
const manifest = readManifest();

describe('parseScopeCsv on every fixture layout', () => {
  for (const [name, truth] of Object.entries(manifest)) {
    it(`When ${name} (${truth.layout}) is parsed, then its numbers match the generator's`, () => {
      const capture = parseScopeCsv(readCapture(name));
      checkAgainstTruth(capture, truth);
      if (truth.timeOrigin) expect({ how: capture.timeOrigin?.how, assumed: capture.timeOrigin?.assumed }).toEqual(truth.timeOrigin);
      expect(capture.valueKind).toBe(truth.valueKind ?? 'physical');
      for (const [key, value] of Object.entries(truth.expect)) {
        if (key === 'emptyColumn') expect(capture.warnings).toContain(`column ${value} is empty and was ignored`);
        else if (key === 'sideMetadata') expect((capture.layout.columns as string[]).slice(0, 2)).toEqual(['side-metadata', 'side-metadata']);
        else if (key === 'uniform') expect(capture.time.kind).toBe(value ? 'uniform' : 'explicit');
        else if (key === 'warning') expect(capture.warnings.some((w) => w.startsWith(value as string)), `a warning starting "${value}" in ${JSON.stringify(capture.warnings)}`).toBe(true);
        else expect(capture.layout[key]).toEqual(value);
      }
    });
  }
});
