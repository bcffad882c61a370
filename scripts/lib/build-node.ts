// The compiled build of the Node side (API server, worker, their threads, the database CLI, the fake SMTP server):
// every .ts file of server/, worker/, shared/, fixtures/lib/ and scripts/ becomes a .js file at the same place under
// dist/node/, imports rewritten from .ts to .js, with esbuild (no type check: `npm run typecheck` does that). The
// .mjs thread boot files and .json data files are copied beside them. Run by `npm start`; `npm run build:node`.
import { copyFileSync, existsSync, mkdirSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build, type Plugin } from 'esbuild';

export const NODE_SOURCES = ['server', 'worker', 'shared', 'fixtures/lib', 'scripts'];
/** The folder of the compiled build, and the file whose time says when it was made. */
export const NODE_BUILD_DIR = 'dist/node';
const STAMP = '.built';

function filesUnder(dir: string, keep: (name: string) => boolean): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return entry.name === 'node_modules' ? [] : filesUnder(path, keep);
    return keep(entry.name) ? [path] : [];
  });
}

function newestMtime(paths: string[]): number {
  return Math.max(0, ...paths.map((p) => statSync(p).mtimeMs));
}

/** Each relative import stays an import of the compiled sibling (.ts → .js); packages stay imports of node_modules. */
const keepImports: Plugin = {
  name: 'keep-imports',
  setup(b) {
    b.onResolve({ filter: /.*/ }, (args) => {
      if (args.kind === 'entry-point') return undefined;
      return { path: args.path.startsWith('.') ? args.path.replace(/\.ts$/, '.js') : args.path, external: true };
    });
  },
};

/** True when dist/node was built after every source, the lock file and the TypeScript configuration changed. */
export function nodeBuildIsCurrent(root: string): boolean {
  const stamp = join(root, NODE_BUILD_DIR, STAMP);
  if (!existsSync(stamp)) return false;
  const inputs = NODE_SOURCES.flatMap((dir) => filesUnder(join(root, dir), () => true));
  inputs.push(...['package-lock.json', 'tsconfig.json'].map((f) => join(root, f)).filter((f) => existsSync(f)));
  return statSync(stamp).mtimeMs > newestMtime(inputs);
}

/** Compiles the Node side into dist/node (replacing what was there); returns the number of files written. */
export async function buildNode(root: string): Promise<number> {
  const out = join(root, NODE_BUILD_DIR);
  rmSync(out, { recursive: true, force: true });
  const sources = NODE_SOURCES.flatMap((dir) => filesUnder(join(root, dir), (name) => name.endsWith('.ts') && !name.endsWith('.d.ts') && !name.endsWith('.as.ts')));
  await build({
    absWorkingDir: root,
    entryPoints: sources,
    outdir: out,
    outbase: root,
    bundle: true,
    plugins: [keepImports],
    platform: 'node',
    format: 'esm',
    target: 'node20',
    sourcemap: 'linked',
    logLevel: 'warning',
  });
  const assets = NODE_SOURCES.flatMap((dir) => filesUnder(join(root, dir), (name) => name.endsWith('.mjs') || name.endsWith('.json')));
  for (const asset of assets) {
    const target = join(out, relative(root, asset));
    mkdirSync(dirname(target), { recursive: true });
    copyFileSync(asset, target);
  }
  writeFileSync(join(out, STAMP), `${new Date().toISOString()}\n`);
  return sources.length + assets.length;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const root = join(dirname(fileURLToPath(import.meta.url)), '../..');
  const started = performance.now();
  const files = await buildNode(root);
  console.log(`compiled the Node side into ${NODE_BUILD_DIR}: ${files} files in ${((performance.now() - started) / 1000).toFixed(1)} s`);
}
