// Wall time of a whole process (start-up included), for the benchmarks that compare against a command line.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { BIG_CAPTURE_SHOT } from './big-capture.ts';

export const ROOT = path.resolve(import.meta.dirname, '../..');

/** Runs `command args` in the checkout; resolves with its wall time (ms) and output, rejects unless it exits 0 and prints `expect`. */
export function timeProcess(command: string, args: string[], expect: RegExp): Promise<{ ms: number; out: string }> {
  return new Promise((resolve, reject) => {
    const started = performance.now();
    const child = spawn(command, args, { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (d: Buffer) => { out += d.toString(); });
    child.stderr.on('data', (d: Buffer) => { out += d.toString(); });
    child.on('error', reject);
    child.on('close', (code) => {
      const ms = performance.now() - started;
      if (code !== 0 || !expect.test(out)) reject(new Error(`${path.basename(command)} ${args.join(' ')} failed (exit ${code}): ${out.slice(0, 500)}`));
      else resolve({ ms, out });
    });
  });
}

/** The analyze CLI on the big capture (its two gates): `npm run --silent analyze` as users run it (npm, then
 * scripts/cli.sh and the compiled bundle), `sh scripts/cli.sh analyze` (the same without
 * npm's start-up), the compiled bundle alone (`node dist/node/…`: without cli.sh's malloc setting either), or the
 * TypeScript through tsx (how npm run analyze ran before issue 13c). */
export function timeCli(file: string, how: 'npm' | 'launcher' | 'compiled' | 'tsx' = 'tsx'): Promise<{ ms: number; out: string }> {
  const [a, b] = BIG_CAPTURE_SHOT.gatePositions;
  const gates = ['--gate', `Gate A@${a}`, '--gate', `Gate B@${b}`];
  if (how === 'npm') return timeProcess('npm', ['run', '--silent', 'analyze', '--', file, ...gates], /speed: \d/);
  if (how === 'launcher') return timeProcess('sh', ['scripts/cli.sh', 'analyze', file, ...gates], /speed: \d/);
  return how === 'tsx'
    ? timeProcess(path.join(ROOT, 'node_modules/.bin/tsx'), ['worker/cli/analyze.ts', file, ...gates], /speed: \d/)
    : timeProcess(process.execPath, ['dist/node/worker/cli/analyze.js', file, ...gates], /speed: \d/);
}
