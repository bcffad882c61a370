import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { simulateShot, type SimulateShotOptions } from '../../../shared/simulate/simulate-shot.ts';
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
    expect(out.warnings.join('\n')).toMatch(/CH2: missed .*reached 3\d % of the step/);
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
    expect(stdout).toMatch(/^usage: analyze FILE \[--gate CHANNEL@POSITION_M\]\.\.\. \[--spacing M\] \[--diameter M\] \[--json\]/);
  });

  it('runs as `npm run --silent analyze` and exits 0 with JSON on stdout', async () => {
    const { path } = writeShot('npm.csv', { sampleInterval: 2e-7, length: 4000 });
    const { stdout } = await promisify(execFile)('npm', ['run', '--silent', 'analyze', '--', path, '--spacing', '0.1', '--json'], { cwd: process.cwd() });
    expect(JSON.parse(stdout).speed.method).toBe('flight');
  });
});
