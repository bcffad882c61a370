/**
 * Checks scope CSV files from the shell with the same importer the worker uses:
 *   npm run --silent import -- FILE... [--json] [--combine] [--dt SECONDS]
 * prints what was detected (layout, channels, units, samples, time base, warnings). A file that cannot be read
 * gives one line on stderr ("import: FILE: line 2,041: expected 3 numbers, found 'ERR'") and exit code 2.
 */
import { basename } from 'node:path';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { combineCaptures } from '../../shared/import/combine-captures.ts';
import { ImportError } from '../../shared/import/import-error.ts';
import { readCaptureFile } from '../import/read-capture-file.ts';

const USAGE = 'usage: npm run --silent import -- FILE... [--json] [--combine] [--dt SECONDS (the sample interval, for a file that states none)]';

/** 2e-7 → "200 ns": times as a person reads them off a scope. */
function formatSeconds(s: number): string {
  const a = Math.abs(s);
  if (a !== 0 && a < 1e-9) return `${s.toPrecision(3)} s`;
  const [scale, unit] = a === 0 ? [1, 's'] : a < 1e-6 ? [1e9, 'ns'] : a < 1e-3 ? [1e6, 'µs'] : a < 1 ? [1e3, 'ms'] : [1, 's'];
  return `${Number((s * scale).toPrecision(6))} ${unit}`;
}

function summary(path: string, c: ImportedCapture): string {
  const l = c.layout;
  const time = c.time.kind === 'uniform'
    ? `uniform: t0 = ${formatSeconds(c.time.t0)}, dt = ${formatSeconds(c.time.dt)}, jitter ${formatSeconds(c.time.jitter)}`
    : `explicit times (not evenly spaced), ${formatSeconds(c.time.t[0])} to ${formatSeconds(c.time.t[c.length - 1])}`;
  const columns = Array.isArray(l.columns) ? (l.columns as string[]).map((r, i) => `${i + 1}:${r}`).join(' ') : '';
  const lines = [
    path,
    `  layout     delimiter ${JSON.stringify(l.delimiter)}${l.decimalComma ? ', decimal comma' : ''}, ${l.headerRows} header row(s), data from line ${l.dataStartLine}, ${l.preambleLines} preamble line(s), ${l.footerLines} footer line(s)`,
    `  encoding   ${l.encoding}${l.bom ? ' with BOM' : ''}, ${l.lineEnding} line ends, read by ${l.reader}`,
    `  columns    ${columns}`,
    `  time       ${c.timeOrigin ? `${c.timeOrigin.how === 'rebuilt' ? 'REBUILT from the stated interval: ' : c.timeOrigin.how === 'given' ? 'interval given: ' : ''}${c.timeOrigin.source}${c.timeOrigin.assumed ? ' (ASSUMED: check it)' : ''}` : l.timeSource}`,
    ...(c.valueKind === 'codes' ? ['  values     raw converter codes, not volts'] : []),
    `  channels   ${c.channels.map((ch) => `${ch.name} [${ch.unit || 'no unit'}${ch.sourceUnit && ch.sourceUnit !== ch.unit ? ` from ${ch.sourceUnit}` : ''}]${ch.invalidCount ? ` ${ch.invalidCount} invalid` : ''}`).join(', ')}`,
    `  samples    ${c.length}`,
    `  time base  ${time}`,
    `  metadata   ${Object.keys(c.metadata).length === 0 ? 'none' : Object.entries(c.metadata).map(([k, v]) => `${k}=${v}`).join('; ')}`,
    `  warnings   ${c.warnings.length === 0 ? 'none' : c.warnings.join('\n             ')}`,
  ];
  return lines.join('\n');
}

function asJson(path: string, c: ImportedCapture): unknown {
  return {
    file: path,
    length: c.length,
    time: c.time.kind === 'uniform' ? c.time : { kind: 'explicit', first: c.time.t[0], last: c.time.t[c.length - 1] },
    channels: c.channels.map((ch) => {
      let min = Infinity;
      let max = -Infinity;
      for (let i = 0; i < ch.values.length; i++) {
        const v = ch.values[i];
        if (v < min) min = v;
        if (v > max) max = v;
      }
      return { name: ch.name, unit: ch.unit, sourceUnit: ch.sourceUnit, invalidCount: ch.invalidCount, min, max };
    }),
    timeOrigin: c.timeOrigin ?? null,
    valueKind: c.valueKind ?? 'physical',
    layout: c.layout,
    metadata: c.metadata,
    warnings: c.warnings,
  };
}

async function main(argv: string[]): Promise<number> {
  const json = argv.includes('--json');
  const combine = argv.includes('--combine');
  const dtAt = argv.indexOf('--dt');
  const dtText = dtAt >= 0 ? argv[dtAt + 1] : undefined;
  const rest = dtAt >= 0 ? argv.filter((_, i) => i !== dtAt && i !== dtAt + 1) : argv;
  const unknown = rest.filter((a) => a.startsWith('--') && a !== '--json' && a !== '--combine');
  const files = rest.filter((a) => !a.startsWith('--'));
  if (unknown.length > 0 || files.length === 0) {
    process.stderr.write(`import: ${unknown.length > 0 ? `unknown option ${unknown[0]}; ` : ''}${USAGE}\n`);
    return 2;
  }
  const dt = dtText === undefined ? undefined : Number(dtText);
  if (dtAt >= 0 && !(dt !== undefined && dt > 0 && Number.isFinite(dt))) {
    process.stderr.write(`import: --dt needs a positive number of seconds (e.g. --dt 2e-7), not ${JSON.stringify(dtText ?? '')}\n`);
    return 2;
  }
  let failed = false;
  const read: [string, ImportedCapture][] = [];
  for (const file of files) {
    try {
      read.push([file, await readCaptureFile(file, dt === undefined ? {} : { dt })]);
    } catch (error) {
      failed = true;
      const message = error instanceof ImportError ? error.message : `unexpected failure: ${(error as Error).message}`;
      process.stderr.write(`import: ${file}: ${message.replace(/\s*\n\s*/g, ' ')}\n`);
    }
  }
  let results = read;
  if (combine && !failed && read.length > 1) {
    try {
      results = [[files.join(' + '), combineCaptures(read.map(([, c]) => c), { labels: read.map(([f]) => basename(f)) })]];
    } catch (error) {
      process.stderr.write(`import: ${error instanceof ImportError ? error.message : (error as Error).message}\n`);
      return 2;
    }
  }
  if (json) process.stdout.write(`${JSON.stringify(results.length === 1 ? asJson(...results[0]) : results.map(([f, c]) => asJson(f, c)), null, 2)}\n`);
  else process.stdout.write(results.map(([f, c]) => summary(f, c)).join('\n\n') + (results.length > 0 ? '\n' : ''));
  return failed ? 2 : 0;
}

process.exitCode = await main(process.argv.slice(2));
