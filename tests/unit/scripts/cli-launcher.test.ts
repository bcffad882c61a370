// scripts/cli.sh, the launcher of `npm run analyze` and `npm run import`: runs the compiled bundle at once when the
// build is current (its own `find` test, which must cover the sources run-compiled.mjs checks), else run-compiled.mjs;
// always with glibc's malloc asked for huge pages, keeping the caller's own GLIBC_TUNABLES, and without the extra
// certificates Node would read at start (the tools open no connection).
import { spawnSync } from 'node:child_process';
import { chmodSync, copyFileSync, mkdirSync, mkdtempSync, readFileSync, realpathSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { NODE_SOURCES } from '../../../scripts/lib/node-build-state.mjs';

const root = resolve(import.meta.dirname, '../../..');
const dir = realpathSync(mkdtempSync(join(tmpdir(), 'gatepost-cli-launcher-')));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function write(path: string, text: string): string {
  mkdirSync(dirname(path), { recursive: true });
  writeFileSync(path, text);
  return path;
}

/** A project holding the launcher, a build of a given age and one source; `node` on PATH is a stand-in that prints
 * what it was started with, so the test sees the launcher's choice without running anything. */
function project(name: string): { home: string; run: (args: string[], env?: Record<string, string>) => { status: number | null; stdout: string; stderr: string } } {
  const home = join(dir, name);
  mkdirSync(join(home, 'scripts'), { recursive: true });
  copyFileSync(join(root, 'scripts/cli.sh'), join(home, 'scripts/cli.sh'));
  const bin = write(join(home, 'bin/node'), '#!/bin/sh\necho "GLIBC_TUNABLES=$GLIBC_TUNABLES"\n[ -z "${NODE_EXTRA_CA_CERTS+set}" ] || echo "NODE_EXTRA_CA_CERTS=$NODE_EXTRA_CA_CERTS"\necho "$@"\n');
  chmodSync(bin, 0o755);
  const run = (args: string[], env: Record<string, string> = {}) => {
    const r = spawnSync('sh', [join(home, 'scripts/cli.sh'), ...args], { cwd: home, encoding: 'utf8', env: { PATH: `${join(home, 'bin')}:/usr/bin:/bin`, ...env } });
    return { status: r.status, stdout: r.stdout, stderr: r.stderr };
  };
  return { home, run };
}

describe('scripts/cli.sh', () => {
  it('When package.json runs the tools, then it runs them through the launcher', () => {
    const scripts = (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { scripts: Record<string, string> }).scripts;
    expect(scripts.analyze).toBe('sh scripts/cli.sh analyze');
    expect(scripts.import).toBe('sh scripts/cli.sh import');
  });

  it('When the launcher tests the build, then it looks at the same sources as run-compiled.mjs', () => {
    const text = readFileSync(join(root, 'scripts/cli.sh'), 'utf8');
    const listed = /&& find ([^\n\\]+)/.exec(text)?.[1].trim().split(/\s+/);
    expect(listed).toEqual([...NODE_SOURCES, 'package-lock.json', 'tsconfig.json']);
  });

  it('When the build is current, then the bundle runs at once with huge pages asked for; when a source is newer, run-compiled.mjs runs', () => {
    const { home, run } = project('current');
    const source = write(join(home, 'shared/a.ts'), 'export {};\n');
    const stamp = write(join(home, 'dist/node/.built'), 'now\n');
    write(join(home, 'dist/node/worker/cli/analyze.js'), '');
    const at = (path: string, seconds: number) => utimesSync(path, seconds, seconds);
    for (const path of [source, join(home, 'shared'), join(home, 'scripts/cli.sh'), join(home, 'scripts')]) at(path, 1000);
    at(stamp, 2000);
    const fresh = run(['analyze', 'shot.csv', '--spacing', '0.1']);
    expect(fresh.status).toBe(0);
    expect(fresh.stdout).toBe(`GLIBC_TUNABLES=glibc.malloc.hugetlb=1\n${join(home, 'dist/node/worker/cli/analyze.js')} shot.csv --spacing 0.1\n`);
    // The caller's own tunables stay, ours after them.
    expect(run(['analyze', 'x.csv'], { GLIBC_TUNABLES: 'glibc.malloc.check=0' }).stdout).toMatch(/^GLIBC_TUNABLES=glibc\.malloc\.check=0:glibc\.malloc\.hugetlb=1\n/);
    // Node's extra certificates are not read: the tools open no connection (~85 ms of each start saved).
    expect(run(['analyze', 'x.csv'], { NODE_EXTRA_CA_CERTS: '/etc/ssl/certs/ca-certificates.crt' }).stdout).toBe(`GLIBC_TUNABLES=glibc.malloc.hugetlb=1\n${join(home, 'dist/node/worker/cli/analyze.js')} x.csv\n`);
    at(source, 3000);
    expect(run(['analyze', 'shot.csv']).stdout).toBe(`GLIBC_TUNABLES=glibc.malloc.hugetlb=1\n${join(home, 'scripts/run-compiled.mjs')} worker/cli/analyze.ts shot.csv\n`);
  });

  it('When there is no build, or the tool is not one of the two, then it says so or builds first', () => {
    const { home, run } = project('unbuilt');
    expect(run(['import', 'a.csv'], { NODE_EXTRA_CA_CERTS: '/etc/ssl/certs/ca-certificates.crt' }).stdout).toBe(`GLIBC_TUNABLES=glibc.malloc.hugetlb=1\n${join(home, 'scripts/run-compiled.mjs')} worker/cli/import.ts a.csv\n`);
    const wrong = run(['fixtures']);
    expect(wrong.status).toBe(2);
    expect(wrong.stdout).toBe('');
    expect(wrong.stderr).toBe('usage: sh scripts/cli.sh analyze|import ARGS...\n');
  });

  it('When the real launcher runs the analyze CLI, then its output and exit codes are the CLI\'s', () => {
    const launch = (...args: string[]) => spawnSync('sh', ['scripts/cli.sh', 'analyze', ...args], { cwd: root, encoding: 'utf8' });
    const help = launch('--help');
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^usage: analyze FILE \[--gate CHANNEL@POSITION_M\]/);
    const bad = launch('no-such-file.csv');
    expect(bad.status).toBe(2);
    expect(bad.stdout).toBe('');
    expect(bad.stderr).toBe('analyze: cannot open no-such-file.csv: no such file\n');
  });
});
