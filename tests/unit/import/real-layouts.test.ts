import fc from 'fast-check';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { ImportError } from '../../../shared/import/import-error.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { readCaptureFile } from '../../../worker/import/read-capture-file.ts';

// What real lab exports do to a reader, beyond the fixture families: the refusals where a file does not determine
// its time base, and property tests that a known capture wrapped in random preamble noise reads with its known
// time base or is refused, never read with another one.

const bytes = (text: string) => new TextEncoder().encode(text);
const dir = mkdtempSync(join(tmpdir(), 'gatepost-layouts-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function refusal(text: string, options = {}): ImportError {
  try {
    parseScopeCsv(bytes(text), options);
  } catch (error) {
    expect(error).toBeInstanceOf(ImportError);
    return error as ImportError;
  }
  throw new Error('expected an ImportError');
}

const dtOf = (c: ImportedCapture) => (c.time.kind === 'uniform' ? c.time.dt : NaN);
const t0Of = (c: ImportedCapture) => (c.time.kind === 'uniform' ? c.time.t0 : c.time.t[0]);

/** n rows of "time,value" with time t0 + i·dt written by `print`. */
function body(n: number, t0: number, dt: number, print: (t: number) => string, sep = ','): string {
  let out = '';
  for (let i = 0; i < n; i++) out += `${print(t0 + i * dt)}${sep}${(Math.sin(i / 9) * 2).toFixed(4)}\n`;
  return out;
}

describe('files that do not determine their time base are refused, never read with an invented one', () => {
  it('When a header-less first column counts 0, 1, 2 … and no interval is given anywhere, then it is refused as sample numbers', () => {
    const e = refusal(`${body(20, 0, 1, (t) => String(t))}`);
    expect(e.message).toMatch(/^line 1: the first column counts samples \(0, 1, 2, …\) and the file gives no sample interval anywhere/);
    expect(e.message).toContain('Fix how it is read');
  });

  it('When an index column is named X and the file gives no interval, then it is refused, not read as 1 s a sample', () => {
    expect(refusal(`X,CH1\n${body(20, 0, 1, (t) => String(t))}`).reason).toMatch(/^the first column counts samples/);
  });

  it('When the same file gives the interval in an option, then the index becomes time', () => {
    const c = parseScopeCsv(bytes(`X,CH1\n${body(20, 0, 1, (t) => String(t))}`), { dt: 4e-9 });
    expect(dtOf(c)).toBe(4e-9);
    expect(c.timeOrigin).toMatchObject({ how: 'given', assumed: false });
  });

  it('When printed times repeat and no interval is stated, then the message says they are too coarse and how to give the interval', () => {
    const e = refusal(`TIME,CH1\n${body(50, 5e-4, 2e-7, (t) => t.toPrecision(3))}`);
    expect(e.reason).toMatch(/^the printed times are too coarse for the sample interval/);
    expect(e.reason).toContain('--dt');
  });

  it('When times repeat only far into the file, then both readers rebuild the grid from the stated interval', async () => {
    // Three significant digits are fine near zero and too coarse further out: the repeats start past the head.
    const dt = 1e-8;
    const text = `Sample interval,${dt}\nTime,CH1\n${body(3000, 0, dt, (t) => (t === 0 ? '0' : t.toPrecision(3)))}`;
    const c = parseScopeCsv(bytes(text));
    expect(c.timeOrigin?.how).toBe('rebuilt');
    expect(dtOf(c)).toBe(dt);
    expect(Math.abs(t0Of(c))).toBeLessThan(dt);
    const file = join(dir, 'late-repeats.csv');
    writeFileSync(file, text);
    const d = await readCaptureFile(file, { headBytes: 2048 });
    expect(d.timeOrigin?.how).toBe('rebuilt');
    expect(dtOf(d)).toBe(dt);
  });

  it('When the stated interval disagrees with the printed times, then the rebuild is refused', () => {
    const e = refusal(`Sample interval,4e-7\nTIME,CH1\n${body(400, 5e-4, 2e-7, (t) => t.toPrecision(3))}`);
    expect(e.reason).toMatch(/^the printed times of column 1 do not follow the stated sample interval 4e-7 s/);
  });

  it('When every time appears twice in a row (a min/max envelope), then it is refused naming the envelope', () => {
    let text = 'in s,C1 in V\n';
    for (let i = 0; i < 20; i++) text += `${(i * 1e-6).toExponential(3)},-0.1\n${(i * 1e-6).toExponential(3)},0.2\n`;
    expect(refusal(text).reason).toMatch(/^every time appears twice in a row .*min\/max envelope/);
  });

  it('When two channel blocks have different time columns, then the file is refused rather than put on one time base', () => {
    let text = '';
    for (let i = 0; i < 30; i++) text += `,,,${(i * 1e-6).toExponential(4)},0.1,,,,,${(i * 1e-6).toExponential(4)},0.2,\n`;
    expect(parseScopeCsv(bytes(text)).channels).toHaveLength(2);
    let shifted = '';
    for (let i = 0; i < 30; i++) shifted += `,,,${(i * 1e-6).toExponential(4)},0.1,,,,,${(i < 20 ? i : i + 5) * 1e-6},0.2,\n`;
    expect(refusal(shifted).reason).toMatch(/^column 10 is a second time column, but at sample 21/);
  });

  it('When the horizontal axis is frequency (a spectrum), then it is refused as not a time record', () => {
    let text = 'Frequency (Hz),Magnitude (dB)\n';
    for (let i = 1; i < 30; i++) text += `${i * 1000},${-20 - i}\n`;
    expect(refusal(text).reason).toBe("the time column's unit 'Hz' is not a unit of time; give timeUnit in the options");
  });

  it('When a time column has no unit and a 1 s step of whole numbers, then it is sample numbers, not seconds', () => {
    expect(refusal(`Time,CH1\n${body(20, 0, 1, (t) => String(t))}`).reason).toMatch(/^the first column counts samples/);
  });

  it('When a time column has no unit but the file states an interval its step matches in ns, then ns are used and said', () => {
    const c = parseScopeCsv(bytes(`Sample interval,2e-9\nTime,CH1\n${body(40, -100, 2, (t) => String(t))}`));
    expect(dtOf(c)).toBeCloseTo(2e-9, 20);
    expect(c.timeOrigin?.source).toContain('in ns (the unit in which its step matches the interval stated by `Sample interval` (line 1))');
    expect(c.timeOrigin?.assumed).toBe(false);
  });

  it('When the horizontal-units line disagrees with a time column that matches the stated interval, then the interval wins with a warning', () => {
    const c = parseScopeCsv(bytes(`Horizontal units,us\nSample interval,2e-6\nTime,CH1\n${body(40, -1e-4, 2e-6, (t) => t.toExponential(6))}`));
    expect(dtOf(c)).toBeCloseTo(2e-6, 18);
    expect(c.warnings.some((w) => w.startsWith('the horizontal unit `us`'))).toBe(true);
  });

  it('When a time column has no unit and nothing states one, then seconds are assumed and the capture says so', () => {
    const c = parseScopeCsv(bytes(`Time,CH1\n${body(40, -1e-4, 2e-7, (t) => t.toExponential(6))}`));
    expect(c.timeOrigin).toMatchObject({ how: 'time-column', assumed: true });
    expect(c.warnings).toContain('the time column gives no unit and the file states no sample interval to check it against; seconds assumed');
  });

  it('When cells are empty inside the data, then they are gaps counted in a warning on both readers', async () => {
    let text = 'Time (s),A (V),B (V)\n';
    for (let i = 0; i < 40; i++) text += `${(i * 1e-6).toExponential(3)},${i % 10 === 3 ? '' : '0.5'},${i === 7 ? '' : '0.25'}\n`;
    const c = parseScopeCsv(bytes(text));
    expect(c.channels.map((ch) => ch.invalidCount)).toEqual([4, 1]);
    expect(Number.isNaN(c.channels[0].values[3])).toBe(true);
    expect(c.warnings).toContain('4 invalid or empty samples (empty cells, NaN, overrange or clip marks, values at or beyond ±9.9e37) in A; kept as NaN gaps');
    const file = join(dir, 'gaps.csv');
    writeFileSync(file, text);
    const d = await readCaptureFile(file);
    expect(d.channels.map((ch) => ch.invalidCount)).toEqual([4, 1]);
  });
});

describe('property: a known capture in random preamble noise reads with its known time base or is refused', () => {
  const DT = 2e-7;
  const T0 = -4e-5;
  const N = 120;
  const noiseKey = fc.constantFrom('Model', 'Serial', 'Firmware', 'Operator', 'Vertical scale', 'Vertical offset', 'Probe', 'Coupling',
    'Horizontal scale', 'Time base', 'Trigger level', 'Bandwidth limit', 'Frequency', 'Period', 'Acquisition', 'Note');
  const noiseValue = fc.oneof(
    fc.constantFrom('?', 'DC', 'ON', 'OFF', '10X', '500mV/div', '1us/div', '50 ohm', 'CH1:0.5, CH2:0.5', 'Analog:1', 'F=1.00000kHz', 'T=1.000ms'),
    fc.double({ min: -1e3, max: 1e3, noNaN: true }).map(String),
  );
  const keyStyle = fc.constantFrom('plain', 'hash', 'padded', 'prefixed');
  const separator = fc.constantFrom(',', ';', '\t');
  const dtStyle = fc.constantFrom('Sample interval,%s', 'Sample Interval,CH1:%s', '#SampleInterval=%s(s)', 'Time interval\t\t:,%s', 'Increment,%s');
  const timeStyle = fc.constantFrom('column-s', 'column-unitless', 'column-us', 'samples');

  it('When random preamble lines, prefixes, padding and separators wrap a known capture, then the time base is the known one or the file is refused', () => {
    fc.assert(fc.property(
      fc.array(fc.tuple(noiseKey, noiseValue, keyStyle), { maxLength: 12 }), separator, dtStyle, timeStyle, fc.boolean(),
      (noise, sep, dtLine, style, statesInterval) => {
        const lines: string[] = [];
        for (const [k, v, ks] of noise) {
          if (ks === 'hash') lines.push(`#${k}=${v}`);
          else if (ks === 'padded') lines.push(`${k}\t\t:${sep}${v}`);
          else if (ks === 'prefixed') lines.push(`${k}${sep}CH1:${v}`);
          else lines.push(`${k}${sep}${v}`);
        }
        if (statesInterval) lines.push(dtLine.replace('%s', String(DT)).replace(',', sep));
        const decimal = sep === ';' ? (x: string) => x.replace('.', ',') : (x: string) => x;
        if (style !== 'samples') lines.push(style === 'column-s' ? `Time (s)${sep}CH1 (V)` : style === 'column-us' ? `Time (us)${sep}CH1 (V)` : `Time${sep}CH1`);
        for (let i = 0; i < N; i++) {
          const t = T0 + i * DT;
          const v = decimal((Math.sin(i / 7) * 3).toFixed(5));
          if (style === 'samples') lines.push(` ${v}${sep}`);
          else lines.push(`${decimal((style === 'column-us' ? t * 1e6 : t).toExponential(8))}${sep}${v}`);
        }
        let capture: ImportedCapture;
        try {
          capture = parseScopeCsv(bytes(`${lines.join('\n')}\n`));
        } catch (error) {
          expect(error).toBeInstanceOf(ImportError);
          return;
        }
        expect(capture.length).toBe(N);
        expect(Math.abs(dtOf(capture) - DT)).toBeLessThanOrEqual(1e-9 * DT);
        if (style !== 'samples') expect(Math.abs(t0Of(capture) - T0)).toBeLessThanOrEqual(1e-9 * DT);
        // A time base with no stated unit must be marked as assumed; one rebuilt or given says so.
        if (style === 'column-unitless' && !statesInterval) expect(capture.timeOrigin?.assumed).toBe(true);
      },
    ), { numRuns: 300 });
  });
});

describe('preamble keys as instruments write them', () => {
  it('When keys are run together in camel case (SampleRate, HResolution, HOffset, VUnit), then they are read', () => {
    let text = 'TraceName,Gate A\nBlockSize,50\nVUnit,mV\nSampleRate,5.0E+05\nHOffset,-4.0E-03\nHUnit,s\n\n';
    for (let i = 0; i < 50; i++) text += `${(i % 7) * 10}.5\n`;
    const c = parseScopeCsv(bytes(text));
    expect([dtOf(c), t0Of(c)]).toEqual([2e-6, -4e-3]);
    expect(c.channels[0]).toMatchObject({ name: 'Gate A', unit: 'V', sourceUnit: 'mV' });
  });

  it('When whole numbers follow a "Waveform Data" line and the file gives volts per division and a vertical unit, then they are codes, not volts', () => {
    let text = 'Memory Length,60,\nTrigger Address,20,\nSource,CH1,\nVertical Units,V,\nVertical Scale,1.000E+00,\nSampling Period,2.000E-06,\nWaveform Data,\n';
    for (let i = 0; i < 60; i++) text += `${i > 30 && i < 40 ? 2 : 124},\n`;
    const c = parseScopeCsv(bytes(text));
    expect(c.valueKind).toBe('codes');
    expect(c.channels[0]).toMatchObject({ unit: '', sourceUnit: '' });
    expect(dtOf(c)).toBe(2e-6);
    expect(t0Of(c)).toBeCloseTo(-20 * 2e-6, 18); // 20 samples before the trigger
  });
});
