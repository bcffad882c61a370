// `npm run analyze` and `npm run import`: runs a command-line tool from the compiled build (dist/node, see
// lib/build-node.ts), in this same process, after building it when it is older than its sources (the first run after
// a clone or a change; its one line goes to stderr, as standard output is the tool's result).
//   node scripts/run-compiled.mjs worker/cli/analyze.ts ARGS...
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { NODE_BUILD_DIR, nodeBuildIsCurrent } from './lib/node-build-state.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const entry = process.argv[2];
if (entry === undefined || !entry.endsWith('.ts')) {
  process.stderr.write('usage: node scripts/run-compiled.mjs SOURCE.ts [ARGS...]\n');
  process.exit(2);
}
if (!nodeBuildIsCurrent(root)) {
  const built = spawnSync(process.execPath, ['--import', 'tsx', join(root, 'scripts/lib/build-node.ts')], { cwd: root, stdio: ['ignore', 2, 2] });
  if (built.status !== 0) {
    process.stderr.write(`could not compile the Node side into ${NODE_BUILD_DIR} (exit ${built.status ?? built.signal}); see above\n`);
    process.exit(1);
  }
}
const compiled = join(root, NODE_BUILD_DIR, entry.replace(/\.ts$/, '.js'));
// The tool sees the arguments as if node had been started on it: argv[1] is its own file.
process.argv.splice(1, 2, compiled);
try {
  await import(pathToFileURL(compiled).href);
} catch (error) {
  // Another first run may have been moving its build into place at that instant (build-node.ts): once more.
  if (error?.code !== 'ERR_MODULE_NOT_FOUND') throw error;
  await new Promise((resolve) => setTimeout(resolve, 200));
  await import(pathToFileURL(compiled).href);
}
