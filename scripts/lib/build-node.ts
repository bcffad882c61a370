// The compiled build of the Node side (API server, worker, their threads, the database CLI, the fake SMTP server):
// every .ts file of server/, worker/, shared/, fixtures/lib/ and scripts/ becomes a .js file at the same place under
// dist/node/, imports rewritten from .ts to .js, with esbuild (no type check: `npm run typecheck` does that). The
// .mjs thread boot files and .json data files are copied beside them. The command-line tools (CLI_BUNDLES) are
// bundled instead: one file with everything they import, packages included, so that a run resolves and loads one
// module instead of a few hundred. Run by `npm start`, by `npm run analyze` / `npm run import`
// (scripts/run-compiled.mjs) when the build is older than its sources, and by `npm run build:node`.
import { copyFileSync, mkdirSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build, type Plugin } from 'esbuild';
import { filesUnder, NODE_BUILD_DIR, NODE_BUILD_STAMP, NODE_SOURCES, nodeBuildIsCurrent } from './node-build-state.mjs';

export { NODE_BUILD_DIR, NODE_SOURCES, nodeBuildIsCurrent };

/** Entry points built as one bundled file each (at their usual place in dist/node). */
export const CLI_BUNDLES = ['worker/cli/analyze.ts', 'worker/cli/import.ts'];

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

/**
 * In a bundle, `import.meta.url` would be the bundle's address for every module in it; this keeps each of our
 * modules' own (the address of its compiled .js file in dist/node), so that files found beside a module, such as
 * a worker thread's boot file, are still found.
 */
function keepModuleUrls(root: string, out: string, bundle: string): Plugin {
  return {
    name: 'keep-module-urls',
    setup(b) {
      b.onLoad({ filter: /\.ts$/ }, (args) => {
        const source = readFileSync(args.path, 'utf8');
        if (args.path.includes('/node_modules/') || !source.includes('import.meta')) return undefined;
        if (/import\.meta\.(dirname|filename)/.test(source)) {
          return { errors: [{ text: 'use import.meta.url in a bundled module (keep-module-urls rewrites only that)' }] };
        }
        const compiled = join(out, relative(root, args.path)).replace(/\.ts$/, '.js');
        const from = relative(dirname(join(out, bundle)), compiled);
        const url = `new URL(${JSON.stringify(`./${from}`)}, import.meta.url).href`;
        return { contents: source.replaceAll('import.meta.url', url), loader: 'ts' };
      });
    },
  };
}

const COMMON = { bundle: true, platform: 'node', format: 'esm', target: 'node20', sourcemap: 'linked', logLevel: 'warning' } as const;

/** Bundles the tool at `entry` (a .ts path relative to `root`) into one .js file at the same place under `out`,
 * everything it imports included; its modules' import.meta.url stay those of their compiled files under `out`. */
export async function bundleCli(root: string, entry: string, out: string): Promise<void> {
  const bundle = entry.replace(/\.ts$/, '.js');
  await build({ ...COMMON, absWorkingDir: root, entryPoints: [join(root, entry)], outfile: join(out, bundle), plugins: [keepModuleUrls(root, out, bundle)] });
}

/** Compiles the Node side into dist/node (replacing what was there); returns the number of files written. It is
 * built beside it and moved in when complete, so a run that starts meanwhile finds the old build or the new one. */
export async function buildNode(root: string): Promise<number> {
  const out = join(root, NODE_BUILD_DIR);
  const partial = `${out}.partial-${process.pid}`;
  rmSync(partial, { recursive: true, force: true });
  const sources = NODE_SOURCES.flatMap((dir) => filesUnder(join(root, dir), (name) => name.endsWith('.ts') && !name.endsWith('.d.ts') && !name.endsWith('.as.ts')));
  await build({ ...COMMON, absWorkingDir: root, outbase: root, entryPoints: sources, outdir: partial, plugins: [keepImports] });
  for (const entry of CLI_BUNDLES) await bundleCli(root, entry, partial);
  const assets = NODE_SOURCES.flatMap((dir) => filesUnder(join(root, dir), (name) => name.endsWith('.mjs') || name.endsWith('.json')));
  for (const asset of assets) {
    const target = join(partial, relative(root, asset));
    mkdirSync(dirname(target), { recursive: true });
    copyFileSync(asset, target);
  }
  writeFileSync(join(partial, NODE_BUILD_STAMP), `${new Date().toISOString()}\n`);
  // Another process may be swapping its own build in at the same moment (two first runs of a CLI after a clone):
  // then one of the renames finds the place taken or emptied, and this one tries again; the last one stays.
  const old = `${out}.old-${process.pid}`;
  for (let attempt = 1; ; attempt++) {
    rmSync(old, { recursive: true, force: true });
    try {
      renameSync(out, old);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
    }
    try {
      renameSync(partial, out);
      break;
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      if ((code !== 'ENOTEMPTY' && code !== 'EEXIST') || attempt === 5) throw error;
    }
  }
  rmSync(old, { recursive: true, force: true });
  return sources.length + assets.length;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const root = join(dirname(fileURLToPath(import.meta.url)), '../..');
  const started = performance.now();
  const files = await buildNode(root);
  // On stderr: run-compiled.mjs builds before a CLI whose standard output is its result.
  console.error(`compiled the Node side into ${NODE_BUILD_DIR}: ${files} files in ${((performance.now() - started) / 1000).toFixed(1)} s`);
}
