import { describe, expect, it } from 'vitest';
import { combineCaptures } from '../../../shared/import/combine-captures.ts';
import { ImportError } from '../../../shared/import/import-error.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { readCapture, readManifest } from './fixture-manifest.ts';

const manifest = readManifest();

describe('combineCaptures', () => {
  it('When one file per channel of one shot is combined, then both channels share the generator time base', () => {
    const a = parseScopeCsv(readCapture('per-channel-gate-a.csv'));
    const b = parseScopeCsv(readCapture('per-channel-gate-b.csv'));
    const both = combineCaptures([a, b], { labels: ['gate-a.csv', 'gate-b.csv'] });
    const truthB = manifest['per-channel-gate-b.csv'];
    expect(both.channels.map((c) => c.name)).toEqual(['Gate A', 'Gate B']);
    expect(both.length).toBe(truthB.length);
    expect(both.time.kind === 'uniform' && Math.abs(both.time.t0 - truthB.t0)).toBeLessThanOrEqual(truthB.timeTolerance);
    const s = truthB.samples[3];
    expect(Math.abs(both.channels[1].values[s.index] - (s.values[0] as number))).toBeLessThanOrEqual(truthB.valueTolerance);
  });

  it('When the files start at different times, then the error names the file and the offset in samples', () => {
    const a = parseScopeCsv(readCapture('per-channel-gate-a.csv'));
    const shifted = parseScopeCsv(readCapture('per-channel-gate-b-shifted.csv'));
    let error: unknown;
    try {
      combineCaptures([a, shifted], { labels: ['gate-a.csv', 'gate-b-shifted.csv'] });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ImportError);
    // The generator shifted that record by exactly 3 samples (fixtures/generate.ts).
    expect((error as Error).message).toMatch(/^gate-b-shifted\.csv starts at -0\.0000994\d* s but gate-a\.csv starts at -0\.0001 s \(3\.00 samples apart\); they cannot be put on one time base$/);
  });

  it('When the files differ in length, then it says how', () => {
    const a = parseScopeCsv(new TextEncoder().encode('t (s),CH1\n0,1\n1,2\n2,3\n'));
    const b = parseScopeCsv(new TextEncoder().encode('t (s),CH1\n0,1\n1,2\n'));
    expect(() => combineCaptures([a, b])).toThrow('capture 2 has 2 samples but capture 1 has 3; files of one shot must share the time base');
    const both = combineCaptures([a, parseScopeCsv(new TextEncoder().encode('t (s),CH1\n0,4\n1,5\n2,6\n'))]);
    expect(both.channels.map((c) => c.name)).toEqual(['CH1', 'CH1 (capture 2)']);
  });
});

describe('combineCaptures and the time origin', () => {
  it('When one of the files had its time base rebuilt, then the combined capture says rebuilt and names each file', () => {
    const enc = (t: string) => new TextEncoder().encode(t);
    let coarse = 'Sample interval,2e-7\nTIME,B\n';
    let fine = 'Time (s),A (V)\n';
    for (let i = 0; i < 60; i++) {
      coarse += `${(5e-4 + i * 2e-7).toPrecision(3)},0.1\n`;
      fine += `${(5e-4 + i * 2e-7).toExponential(8)},0.2\n`;
    }
    const both = combineCaptures([parseScopeCsv(enc(fine)), parseScopeCsv(enc(coarse))], { labels: ['a.csv', 'b.csv'] });
    expect(both.timeOrigin?.how).toBe('rebuilt');
    expect(both.timeOrigin?.source).toMatch(/^a\.csv: column 1 .*; b\.csv: every 200 ns/);
  });
});
