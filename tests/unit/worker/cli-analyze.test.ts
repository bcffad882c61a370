import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { simulateShot, type SimulateShotOptions } from '../../../shared/simulate/simulate-shot.ts';
import { simulatedShotToCapture } from '../../../shared/simulate/simulated-shot-to-capture.ts';
import { runAnalyze } from '../../../worker/cli/analyze.ts';

const dir = mkdtempSync(join(tmpdir(), 'gatepost-cli-analyze-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Writes a simulated shot as a plain "Time (s),CH1 (V),…" CSV and returns its path and truth. */
function writeShot(name: string, options: SimulateShotOptions) {
  const shot = simulateShot(options);
  const header = ['Time (s)', ...shot.channels.map((c) => `${c.name} (V)`)].join(',');
  const rows = [header];
  const n = shot.channels[0].values.length;
  for (let i = 0; i < n; i++) {
    rows.push([(shot.time.t0 + i * shot.time.dt).toExponential(9), ...shot.channels.map((c) => c.values[i].toFixed(6))].join(','));
  }
  const path = join(dir, name);
  writeFileSync(path, `${rows.join('\n')}\n`);
  return { path, shot };
}

async function run(args: string[]) {
  let stdout = '';
  let stderr = '';
  const code = await runAnalyze(args, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t) });
  return { code, stdout, stderr };
}

describe('analyze CLI', () => {
  it('--json prints gates, speed (value, expanded U, k = 2) and warnings for a two-gate shot', async () => {
    const { path, shot } = writeShot('two.csv', { noiseRms: 0.01, sampleInterval: 2e-7, length: 4000 });
    const { code, stdout, stderr } = await run([path, '--spacing', '0.1', '--diameter', '0.04', '--json']);
    expect(stderr).toBe('');
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.gates).toHaveLength(2);
    expect(out.gates[0]).toMatchObject({ channel: 'CH1', position: 0, status: 'ok' });
    expect(out.gates[1]).toMatchObject({ channel: 'CH2', position: 0.1, status: 'ok' });
    expect(Math.abs(out.gates[0].pulses[0].start - shot.truth.gates[0].entry)).toBeLessThan(2e-8);
    expect(Math.abs(out.gates[1].pulses[0].end - shot.truth.gates[1].exit)).toBeLessThan(2e-8);
    expect(out.speed).toMatchObject({ method: 'flight', coverage: 2 });
    // Truth: the simulator's 300 m/s; U is dominated by ±0.5 mm gate positions (≈ 2.5 m/s).
    expect(Math.abs(out.speed.value - 300)).toBeLessThan(out.speed.uncertainty);
    expect(out.speed.uncertainty).toBeGreaterThan(1);
    expect(out.speed.uncertainty).toBeLessThan(4);
    expect(out.warnings).toEqual([]);
  });

  it('maps two gates on one channel with --gate CH1@0 --gate CH1@0.3', async () => {
    const { path } = writeShot('shared.csv', { gatePositions: [0, 0.3], gateChannels: [0, 0], sampleInterval: 2e-7, length: 7000 });
    const { code, stdout } = await run([path, '--gate', 'CH1@0', '--gate', 'CH1@0.3', '--json']);
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.gates.map((g: { position: number; status: string }) => [g.position, g.status])).toEqual([
      [0, 'ok'],
      [0.3, 'ok'],
    ]);
    expect(Math.abs(out.speed.value / 300 - 1)).toBeLessThan(1e-3);
  });

  it('reports a missed gate and falls back to the occlusion speed of the one that fired', async () => {
    const { path } = writeShot('missed.csv', { dipDepth: [1, 0.3], noiseRms: 0.01, sampleInterval: 2e-7, length: 4000 });
    const { code, stdout } = await run([path, '--spacing', '0.1', '--diameter', '0.04', '--json']);
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.gates.map((g: { status: string }) => g.status)).toEqual(['ok', 'missed']);
    expect(out.gates[1].pulses).toEqual([]);
    expect(out.speed.method).toBe('occlusion');
    expect(Math.abs(out.speed.value / 300 - 1)).toBeLessThan(0.01);
    expect(out.warnings.join('\n')).toMatch(/CH2: missed .*dipped from \d\.\d{3} ms to \d\.\d{3} ms, [\d.]+ V deep \(3\d % of the step\)/);
  });

  it('prints a readable summary without --json', async () => {
    const { path } = writeShot('summary.csv', { sampleInterval: 2e-7, length: 4000 });
    const { code, stdout } = await run([path, '--spacing', '0.1']);
    expect(code).toBe(0);
    expect(stdout).toMatch(/gate CH1 @ 0 m: blocked/);
    expect(stdout).toMatch(/speed: 300\.0\d ± \d\.\d\d m\/s \(time of flight; U with k = 2\)/);
  });

  it('exits 2 with one line on stderr for unreadable input and bad arguments', async () => {
    const missing = await run([join(dir, 'nope.csv'), '--spacing', '0.1']);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/^analyze: (cannot read|cannot open) .*nope\.csv: no such file\n$/);
    const junk = join(dir, 'junk.csv');
    writeFileSync(junk, 'this is not,a scope file\nat all,really\n');
    const bad = await run([junk, '--spacing', '0.1']);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/^analyze: cannot read .*junk\.csv: \S/);
    const { path } = writeShot('args.csv', { sampleInterval: 2e-7, length: 4000 });
    expect((await run([path, '--gate', 'CH1'])).stderr).toMatch(/--gate needs CHANNEL@POSITION_M/);
    expect((await run([path, '--gate', 'CH7@0', '--gate', 'CH1@0.1'])).stderr).toMatch(/names channel "CH7", which the capture does not have/);
    expect((await run([path])).code).toBe(2);
    expect((await run([path, '--spacing', 'ten'])).stderr).toMatch(/--spacing needs a number of metres, got 'ten'/);
  });

  it('prints its usage with --help and exits 0', async () => {
    const { code, stdout } = await run(['--help']);
    expect(code).toBe(0);
    expect(stdout).toMatch(/^usage: analyze FILE \[--gate CHANNEL@POSITION_M\]\.\.\. \[--spacing M\] \[--diameter M\] \[--position-tolerance M\] \[--timebase-ppm N\] \[--dt S\] \[--json\]/);
    expect(stdout).toMatch(/--dt S +sample interval in seconds, for a file that does not state one/);
  });

  it('runs as `npm run --silent analyze` and exits 0 with JSON on stdout', async () => {
    const { path } = writeShot('npm.csv', { sampleInterval: 2e-7, length: 4000 });
    const { stdout } = await promisify(execFile)('npm', ['run', '--silent', 'analyze', '--', path, '--spacing', '0.1', '--json'], { cwd: process.cwd() });
    expect(JSON.parse(stdout).speed.method).toBe('flight');
  });
});

describe('analyze CLI: assumptions, the time-base flag and file warnings', () => {
  it('--json states the ±0.5 mm and 50 ppm behind the budget, and no flag for a plausible shot', async () => {
    const { path } = writeShot('assume.csv', { sampleInterval: 2e-7, length: 4000 });
    const out = JSON.parse((await run([path, '--spacing', '0.1', '--diameter', '0.04', '--json'])).stdout);
    expect(out.assumptions).toMatchObject({ positionTolerance: 0.0005, timebaseAccuracyPpm: 50, projectile: { length: 0.04, lengthTolerance: 0 }, threshold: { unit: 'percent', level: 50, hysteresis: 40 }, edges: 'both' });
    expect(out.assumptions.sampleInterval).toBeCloseTo(2e-7, 15);
    expect(out.timeBaseCheck).toEqual({ flagged: false, reasons: [] });
    expect(out.captureWarnings).toEqual([]);
  });

  it('--position-tolerance and --timebase-ppm set the tolerances, and the budget follows them', async () => {
    const { path } = writeShot('tolerances.csv', { sampleInterval: 2e-7, length: 4000 });
    const { code, stdout } = await run([path, '--spacing', '0.1', '--position-tolerance', '0.001', '--timebase-ppm', '20', '--json']);
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.assumptions).toMatchObject({ positionTolerance: 0.001, timebaseAccuracyPpm: 20 });
    const line = (group: string) => out.speed.budget.find((b: { group: string }) => b.group === group).contribution;
    // GUM eq. (10), by hand: two gates, each ±1 mm rectangular over 0.1 m at 300 m/s → 300·√2·(0.001/√3)/0.1 = 2.449 m/s;
    // a ±20 ppm rectangular scale error → 300·20e-6/√3 = 0.003464 m/s.
    expect(line('gate positions')).toBeCloseTo(2.449, 2);
    expect(line('time-base accuracy')).toBeCloseTo(0.003464, 5);
    const bad = await run([path, '--spacing', '0.1', '--timebase-ppm', '-5']);
    expect(bad).toMatchObject({ code: 2, stderr: expect.stringMatching(/^analyze: --timebase-ppm must be zero or more\n/) });
    expect((await run([path, '--spacing', '0.1', '--position-tolerance', 'half'])).stderr).toMatch(/--position-tolerance needs a number of metres, got 'half'/);
  });

  it("--dt reads a file that states no interval; without it the importer's refusal names --dt", async () => {
    const shot = simulateShot({ sampleInterval: 2e-7, length: 4000 });
    const lines = ['Sample,CH1 (V),CH2 (V)', ...Array.from(shot.channels[0].values, (v, i) => `${i},${v.toFixed(5)},${shot.channels[1].values[i].toFixed(5)}`)];
    const path = join(dir, 'no-interval.csv');
    writeFileSync(path, `${lines.join('\n')}\n`);
    const refused = await run([path, '--spacing', '0.1']);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/interval.*--dt/);
    const { code, stdout } = await run([path, '--spacing', '0.1', '--dt', '2e-7', '--json']);
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    // Truth: the simulator's 300 m/s over 0.1 m.
    expect(Math.abs(out.speed.value / 300 - 1)).toBeLessThan(1e-3);
    expect(out.assumptions.sampleInterval).toBeCloseTo(2e-7, 15);
    expect((await run([path, '--spacing', '0.1', '--dt', '0'])).stderr).toMatch(/--dt must be a positive number of seconds/);
  });

  it('a time base misread as 1 s per sample is printed as "not a measurement", with its reasons, assumptions and file warnings', async () => {
    const shot = simulateShot({ speed: 66.6, arrivalTime: 5e-4, sampleInterval: 1e-6, length: 4000 });
    const misread: ImportedCapture = {
      ...simulatedShotToCapture(shot),
      time: { kind: 'uniform', t0: 0, dt: 1, jitter: 0 },
      warnings: ['the time column has no unit; seconds assumed'],
      timeOrigin: { how: 'time-column', source: 'column 1 (no unit: seconds assumed)', assumed: true },
    };
    let stdout = '';
    const io = { stdout: (t: string) => (stdout += t), stderr: () => {}, readCapture: async () => misread };
    expect(await runAnalyze(['misread.csv', '--spacing', '0.1'], io)).toBe(0);
    expect(stdout).toMatch(/^speed \(not a measurement: check the time base\): 0\.0000666 ± [\d.e-]+ m\/s/m);
    expect(stdout).toMatch(/^CHECK THE TIME BASE: this result is not a measurement until the read is checked$/m);
    expect(stdout).toMatch(/^ {2}- the speed of 0\.0000666 m\/s .* is outside 0\.1–10\u00a0000 m\/s/m);
    expect(stdout).toMatch(/^ {2}- the sample interval is 1 s, above 1 ms/m);
    expect(stdout).toMatch(/^ {2}gate positions: ± 0\.5 mm each \(rectangular\)$/m);
    expect(stdout).toMatch(/^ {2}time-base accuracy: ± 50 ppm \(rectangular\)$/m);
    expect(stdout).toMatch(/^ {2}sample interval: 1 s, read from the time column \(column 1 \(no unit: seconds assumed\)\); partly assumed$/m);
    expect(stdout).toMatch(/^file warning: the time column has no unit; seconds assumed$/m);
    stdout = '';
    await runAnalyze(['misread.csv', '--spacing', '0.1', '--json'], io);
    const out = JSON.parse(stdout);
    expect(out.timeBaseCheck.flagged).toBe(true);
    expect(out.timeBaseCheck.reasons.map((r: { code: string }) => r.code)).toEqual(['speed-range', 'coarse-sampling', 'time-base-assumed']);
    expect(out.captureWarnings).toEqual(['the time column has no unit; seconds assumed']);
  });
});
