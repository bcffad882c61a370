/**
 * `npm run bench:analyze -- --vs-numpy`: the analyze CLI against a numpy script (bench/numpy/gate-speed.py, which does
 * less: one threshold per channel, no levels, pulses or uncertainty) on the 10-million-sample capture, each a process
 * of its own, wall time, alternating, median of 5 (of 3 until 3 December 2026: this VM's speed moves by ±15 % within
 * seconds, and the median of 3 numpy runs alone moved the ratio by ±0.03). The CLI three ways: as `npm run --silent
 * analyze` runs it (npm's own start-up, then scripts/cli.sh), as `sh scripts/cli.sh analyze` (the launcher without
 * npm: its freshness check, malloc's huge pages, no extra certificates, the compiled bundle) and as
 * `node dist/node/worker/cli/analyze.js` alone (dist/node built first when older than its sources). Target (issue
 * 13): CLI ≤ 0.2× numpy, the launcher's line. Needs Debian's python3-numpy (/usr/bin/python3); skipped with a note
 * otherwise.
 */
import { spawnSync } from 'node:child_process';
import { cpus, loadavg } from 'node:os';
import { buildNode, nodeBuildIsCurrent } from '../scripts/lib/build-node.ts';
import { BIG_CAPTURE_SHOT, ensureBigCapture } from './lib/big-capture.ts';
import { ROOT, timeCli, timeProcess } from './lib/time-process.ts';

const PYTHON = '/usr/bin/python3';
const ROUNDS = 5;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;

export async function runVsNumpy(): Promise<void> {
  const probe = spawnSync(PYTHON, ['-c', 'import numpy; print(numpy.__version__)'], { encoding: 'utf8' });
  if (probe.status !== 0) {
    console.log(`skipped: ${PYTHON} with numpy is not available (as root: apt-get install -y python3-numpy)`);
    return;
  }
  const file = await ensureBigCapture();
  if (!nodeBuildIsCurrent(ROOT)) await buildNode(ROOT);
  const spacing = String(BIG_CAPTURE_SHOT.gatePositions[1] - BIG_CAPTURE_SHOT.gatePositions[0]);
  const loadBefore = loadavg();
  const numpy: number[] = [];
  const viaNpm: number[] = [];
  const launcher: number[] = [];
  const compiled: number[] = [];
  let speeds = '';
  for (let round = 0; round < ROUNDS; round++) {
    const n = await timeProcess(PYTHON, ['bench/numpy/gate-speed.py', file, spacing], /speed: \d/);
    const t = await timeCli(file, 'npm');
    const l = await timeCli(file, 'launcher');
    const c = await timeCli(file, 'compiled');
    numpy.push(n.ms);
    viaNpm.push(t.ms);
    launcher.push(l.ms);
    compiled.push(c.ms);
    speeds = `numpy ${/speed: ([\d.]+)/.exec(n.out)![1]} m/s, CLI ${/speed: ([^\n]+)/.exec(l.out)![1]}`;
  }
  const load = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');
  console.log(`capture: ${file} (10 000 000 samples × 2 channels)`);
  console.log(`machine: ${cpus().length} cores, load average before ${load(loadBefore)}, after ${load(loadavg())}; numpy ${probe.stdout.trim()}`);
  console.log(`numpy script (loadtxt + one threshold per channel), median of ${ROUNDS}: ${s(median(numpy))}   [${numpy.map(s).join(', ')}]`);
  const line = (label: string, xs: number[], note = '') =>
    console.log(`${label.padEnd(38)}${s(median(xs))}   [${xs.map(s).join(', ')}]  → ${(median(xs) / median(numpy)).toFixed(2)}× numpy${note}`);
  line('CLI, npm run --silent analyze:', viaNpm);
  line('CLI, sh scripts/cli.sh analyze:', launcher, ' (target ≤ 0.2×)');
  line('CLI, node dist/node/…/analyze.js:', compiled, ' (the bundle alone, without the launcher\'s settings)');
  console.log(`check: ${speeds} (simulated truth ${BIG_CAPTURE_SHOT.speed} m/s)`);
}
