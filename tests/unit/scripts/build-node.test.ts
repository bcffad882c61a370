// Issue 13 (the CLI's fixed costs): `npm run analyze` and `npm run import` run the compiled build (scripts/cli.sh,
// tested in cli-launcher.test.ts, and scripts/run-compiled.mjs, which builds dist/node only when it is older than its
// sources); the CLIs are bundled into one file each, and a bundled module still finds the files beside it (the scan's
// worker-thread boot file).
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { bundleCli, nodeBuildIsCurrent } from '../../../scripts/lib/build-node.ts';

const root = resolve(import.meta.dirname, '../../..');
const dir = mkdtempSync(join(tmpdir(), 'gatepost-build-node-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function write(path: string, text: string): string {
  mkdirSync(dirname(path), { recursive: true });
  writeFileSync(path, text);
  return path;
}

describe('the compiled build of the Node side', () => {
  it('When a tool is bundled, then it is one file and each module\'s import.meta.url is still that of its own compiled file', async () => {
    const project = join(dir, 'project');
    write(join(project, 'lib/where.ts'), "export const beside = (name: string): string => new URL(`./${name}`, import.meta.url).href;\n");
    write(join(project, 'tool/main.ts'), [
      "import { pathToFileURL } from 'node:url';",
      "import { beside } from '../lib/where.ts';",
      'if (import.meta.url === pathToFileURL(process.argv[1]).href) console.log(beside(\'boot.mjs\'));',
      '',
    ].join('\n'));
    const out = join(dir, 'out');
    await bundleCli(project, 'tool/main.ts', out);
    const bundle = join(out, 'tool/main.js');
    expect(readFileSync(bundle, 'utf8')).not.toMatch(/from\s+["']\.\.?\//);
    const run = spawnSync(process.execPath, [bundle], { encoding: 'utf8' });
    expect(run.stderr).toBe('');
    // The boot file beside lib/where.ts's compiled file, not beside the bundle (out/tool/).
    expect(run.stdout.trim()).toBe(pathToFileURL(join(out, 'lib/boot.mjs')).href);
  });

  it('When a source, the lock file or tsconfig.json is newer than the build\'s stamp, then the build is not current', () => {
    const project = join(dir, 'fresh');
    const source = write(join(project, 'worker/a.ts'), 'export {};\n');
    const lock = write(join(project, 'package-lock.json'), '{}\n');
    expect(nodeBuildIsCurrent(project)).toBe(false); // never built
    const stamp = write(join(project, 'dist/node/.built'), 'now\n');
    const at = (path: string, seconds: number) => utimesSync(path, seconds, seconds);
    at(source, 1000); at(lock, 1000); at(stamp, 2000);
    expect(nodeBuildIsCurrent(project)).toBe(true);
    at(source, 3000);
    expect(nodeBuildIsCurrent(project)).toBe(false);
    at(source, 1000); at(lock, 3000);
    expect(nodeBuildIsCurrent(project)).toBe(false);
  });

  it('When run-compiled.mjs runs a tool (scripts/cli.sh calls it when the build is stale), then it leaves a current build and keeps the CLI\'s output and exit codes', () => {
    const launch = (...args: string[]) => spawnSync(process.execPath, ['scripts/run-compiled.mjs', ...args], { cwd: root, encoding: 'utf8' });
    const help = launch('worker/cli/analyze.ts', '--help');
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^usage: analyze FILE \[--gate CHANNEL@POSITION_M\]/);
    expect(nodeBuildIsCurrent(root)).toBe(true);
    const bad = launch('worker/cli/analyze.ts', 'no-such-file.csv');
    expect(bad.status).toBe(2);
    expect(bad.stdout).toBe('');
    expect(bad.stderr).toBe('analyze: cannot open no-such-file.csv: no such file\n');
    const badImport = launch('worker/cli/import.ts', '--bogus');
    expect(badImport.status).toBe(2);
    expect(badImport.stderr).toMatch(/^import: unknown option --bogus; usage:/);
  });

  it('When the analyze bundle is loaded, then the analysis engine (zod and the rest) is not yet: it loads during the read', () => {
    // Runs after the test above, which left dist/node current. zod marks globalThis when it is evaluated.
    const bundle = pathToFileURL(join(root, 'dist/node/worker/cli/analyze.js')).href;
    const probe = `await import(${JSON.stringify(bundle)}); console.log(typeof globalThis.__zod_globalRegistry);`;
    const loaded = spawnSync(process.execPath, ['--input-type=module', '-e', probe], { cwd: root, encoding: 'utf8' });
    expect(loaded.stderr).toBe('');
    expect(loaded.stdout.trim()).toBe('undefined');
  });
});
