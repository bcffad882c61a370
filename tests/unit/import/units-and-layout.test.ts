import { describe, expect, it } from 'vitest';
import { detectCapturePlan } from '../../../shared/import/detect-capture-plan.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { parseUnitLabel } from '../../../shared/import/parse-unit-label.ts';
import { TimeGridHull } from '../../../shared/import/time-grid-hull.ts';
import { unitToSi } from '../../../shared/import/unit-to-si.ts';

const bytes = (text: string) => new TextEncoder().encode(text);

describe('unitToSi and parseUnitLabel', () => {
  it('When a unit has an SI prefix, then the factor is the prefix from the SI brochure (BIPM 2019, Table 7)', () => {
    expect(unitToSi('ms')).toEqual({ si: 's', factor: 1e-3 });
    expect(unitToSi('us')).toEqual({ si: 's', factor: 1e-6 });
    expect(unitToSi('\u00b5s')).toEqual({ si: 's', factor: 1e-6 });
    expect(unitToSi('\u03bcs')).toEqual({ si: 's', factor: 1e-6 });
    expect(unitToSi('ns')).toEqual({ si: 's', factor: 1e-9 });
    expect(unitToSi('mV')).toEqual({ si: 'V', factor: 1e-3 });
    expect(unitToSi('kV')).toEqual({ si: 'V', factor: 1e3 });
    expect(unitToSi('MS/s')).toEqual({ si: 'Hz', factor: 1e6 });
    expect(unitToSi('counts')).toBeNull();
  });

  it('When a label carries its unit in parentheses, brackets or after a slash, then name and unit are split', () => {
    expect(parseUnitLabel('Time (ms)')).toEqual({ name: 'Time', sourceUnit: 'ms' });
    expect(parseUnitLabel('CH1 [mV]')).toEqual({ name: 'CH1', sourceUnit: 'mV' });
    expect(parseUnitLabel('t/us')).toEqual({ name: 't', sourceUnit: 'us' });
    expect(parseUnitLabel('Gate (north)')).toEqual({ name: 'Gate (north)', sourceUnit: '' });
    expect(parseUnitLabel('CH1/CH2')).toEqual({ name: 'CH1/CH2', sourceUnit: '' });
    expect(parseUnitLabel('Gate A')).toEqual({ name: 'Gate A', sourceUnit: '' });
  });
});

describe('detection and its overrides', () => {
  it('When a file is Latin-1 with µs, then the encoding is detected and times converted to seconds', () => {
    const text = 'Time (\u00b5s);Gate A (mV)\r\n0,0;1,5\r\n0,2;2,5\r\n0,4;3,5\r\n';
    const latin1 = Uint8Array.from(text, (c) => c.charCodeAt(0));
    const capture = parseScopeCsv(latin1);
    expect(capture.layout.encoding).toBe('latin1');
    expect(capture.layout.decimalComma).toBe(true);
    expect(capture.time).toMatchObject({ kind: 'uniform', t0: 0 });
    expect(capture.time.kind === 'uniform' && capture.time.dt).toBeCloseTo(2e-7, 20);
    expect(Array.from(capture.channels[0].values)).toEqual([1.5e-3, 2.5e-3, 3.5e-3]);
  });

  it('When a file is UTF-16 with a BOM, then it is decoded', () => {
    const text = '\ufeffTime (s),CH1 (V)\n0,1\n1,2\n2,3\n';
    const le = new Uint8Array(text.length * 2);
    for (let i = 0; i < text.length; i++) {
      le[2 * i] = text.charCodeAt(i) & 0xff;
      le[2 * i + 1] = text.charCodeAt(i) >> 8;
    }
    expect(parseScopeCsv(le).layout.encoding).toBe('utf-16le');
  });

  it('When options force the choices, then the file is read as told', () => {
    const text = 'junk header line\n1;2\n3;4\n5;6\n';
    const capture = parseScopeCsv(bytes(text), { delimiter: ';', timeColumn: null, dt: 1e-3, t0: -2e-3, channelNames: ['A', 'B'], channelUnits: ['mV', 'V'], precision: 'float32' });
    expect(capture.channels.map((c) => [c.name, c.unit, c.sourceUnit])).toEqual([['A', 'V', 'mV'], ['B', 'V', 'V']]);
    expect(capture.time).toEqual({ kind: 'uniform', t0: -2e-3, dt: 1e-3, jitter: 0 });
    expect(capture.channels[0].values).toBeInstanceOf(Float32Array);
    expect(Array.from(capture.channels[1].values)).toEqual([2, 4, 6]);
  });

  it('When the metadata gives a sample rate and a trigger position, then dt = 1/rate and t0 = −position·dt', () => {
    const capture = parseScopeCsv(bytes('Sample rate: 2.5 MS/s\nTrigger position: 100\nCH1\n1\n2\n3\n'));
    expect(capture.time).toMatchObject({ kind: 'uniform', dt: 1 / 2.5e6, jitter: 0 });
    expect(capture.time.kind === 'uniform' && Math.abs(capture.time.t0 - -4e-5)).toBeLessThan(1e-18);
  });

  it('When there is no header and the first column does not step by the sample interval, then every column is a channel', () => {
    const capture = parseScopeCsv(bytes('Sample interval,1e-6\nStart time,-2e-6\n0.1,0.2,0.3\n0.4,0.5,0.6\n0.7,0.8,0.9\n'));
    expect(capture.channels.map((c) => c.name)).toEqual(['CH1', 'CH2', 'CH3']);
    expect(capture.time).toEqual({ kind: 'uniform', t0: -2e-6, dt: 1e-6, jitter: 0 });
    const timed = parseScopeCsv(bytes('Sample interval,1e-6\n0,0.2\n1e-6,0.5\n2e-6,0.8\n'));
    expect(timed.layout.timeMode).toBe('column');
  });

  it('When the samples have no start time, then t0 = 0 is assumed and said', () => {
    const capture = parseScopeCsv(bytes('Sample interval,1e-6\n0.1\n0.2\n0.3\n'));
    expect(capture.time).toEqual({ kind: 'uniform', t0: 0, dt: 1e-6, jitter: 0 });
    expect(capture.warnings).toContain('the file gives no start time; the first sample is taken as t = 0');
  });

  it('When the record length in the metadata disagrees with the rows, then a warning says so', () => {
    const capture = parseScopeCsv(bytes('Record length,5\nSample interval,1e-6\n0.1\n0.2\n0.3\n'));
    expect(capture.warnings).toContain('the metadata gives a record length of 5, but the file holds 3 samples');
  });

  it('When a channel unit is not known, then values are kept as written and a warning says so', () => {
    const capture = parseScopeCsv(bytes('Sample interval,1e-6\nUnit,counts\n10\n20\n30\n'));
    expect(capture.channels[0]).toMatchObject({ unit: 'counts', sourceUnit: 'counts' });
    expect(Array.from(capture.channels[0].values)).toEqual([10, 20, 30]);
    expect(capture.warnings).toContain("the unit 'counts' of CH1 is not known; its values are kept as written");
  });

  it('When the plan is asked of a head only, then no end of data is claimed', () => {
    expect(detectCapturePlan(['t (s),a', '0,1', '1,2', '2,'], { partial: true }).dataEndLine).toBeNull();
  });
});

describe('TimeGridHull', () => {
  it('When times are pushed, then its jitter equals the largest deviation computed directly from every time', () => {
    // Direct reference: max |t_i − (t0 + i·dt)| over all samples, the definition in shared/contracts/capture.ts.
    let seed = 7;
    const random = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    const n = 5000;
    const t = Float64Array.from({ length: n }, (_, i) => -1e-4 + i * 2e-7 + (random() - 0.5) * 2e-9 + (i > 2500 ? 1e-12 * (i - 2500) : 0));
    const hull = new TimeGridHull(t[0], t[1] - t[0]);
    for (let i = 0; i < n; i++) hull.push(i, t[i]);
    const dt = (t[n - 1] - t[0]) / (n - 1);
    let direct = 0;
    for (let i = 0; i < n; i++) direct = Math.max(direct, Math.abs(t[i] - (t[0] + i * dt)));
    expect(hull.jitter(t[0], dt)).toBeCloseTo(direct, 20);
    expect(hull.size).toBeLessThan(200);
  });
});
