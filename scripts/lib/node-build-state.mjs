// Whether the compiled build of the Node side (dist/node, made by build-node.ts) is current. Plain JavaScript with
// no dependencies, so that the launcher of the compiled CLIs (scripts/run-compiled.mjs) can ask before anything is
// compiled and without loading TypeScript; build-node.ts re-exports it.
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';

/** The folders compiled into dist/node. */
export const NODE_SOURCES = ['server', 'worker', 'shared', 'fixtures/lib', 'scripts'];
/** The folder of the compiled build. */
export const NODE_BUILD_DIR = 'dist/node';
/** The file in NODE_BUILD_DIR whose time says when the build was made. */
export const NODE_BUILD_STAMP = '.built';

/** Every file under `dir` (node_modules excepted) whose name `keep` accepts. */
export function filesUnder(dir, keep) {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return entry.name === 'node_modules' ? [] : filesUnder(path, keep);
    return keep(entry.name) ? [path] : [];
  });
}

/** True when dist/node was built after every source, the lock file and the TypeScript configuration changed. */
export function nodeBuildIsCurrent(root) {
  const stamp = join(root, NODE_BUILD_DIR, NODE_BUILD_STAMP);
  if (!existsSync(stamp)) return false;
  const built = statSync(stamp).mtimeMs;
  const inputs = NODE_SOURCES.flatMap((dir) => filesUnder(join(root, dir), () => true));
  inputs.push(...['package-lock.json', 'tsconfig.json'].map((f) => join(root, f)).filter((f) => existsSync(f)));
  return inputs.every((path) => statSync(path).mtimeMs < built);
}
