import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CAPTURES_DIR, readManifest } from '../../import/fixture-manifest.ts';

const root = join(import.meta.dirname, '../../../..');
const cli = (...args: string[]) => spawnSync(process.execPath, ['--import', 'tsx', join(root, 'worker/cli/import.ts'), ...args], { encoding: 'utf8', cwd: root });

describe('npm run import (worker/cli/import.ts)', () => {
  it('When a file cannot be read, then exit code 2 and one line on stderr', () => {
    const run = cli(join(CAPTURES_DIR, 'plain-time.csv'), '/no/such/capture.csv');
    expect(run.status).toBe(2);
    expect(run.stderr).toBe('import: /no/such/capture.csv: cannot open /no/such/capture.csv: no such file\n');
    expect(run.stdout).toContain('samples    4000');
  });

  it('When --json is given, then the detected layout and time base come as JSON matching the generator', () => {
    const run = cli(join(CAPTURES_DIR, 'two-header-rows.tsv'), '--json');
    expect(run.status).toBe(0);
    const out = JSON.parse(run.stdout);
    const truth = readManifest()['two-header-rows.tsv'];
    expect(out.length).toBe(truth.length);
    expect(out.channels.map((c: { name: string }) => c.name)).toEqual(truth.channels.map((c) => c.name));
    expect(out.layout).toMatchObject({ delimiter: 'tab', headerRows: 2, bom: true, lineEnding: 'CR' });
    expect(Math.abs(out.time.t0 - truth.t0)).toBeLessThanOrEqual(truth.timeTolerance);
  });
});
