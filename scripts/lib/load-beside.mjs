// Loads a module from a worker thread's boot file: the compiled .js beside the boot file when there is one (the
// build in dist/node that npm start runs), else the .ts through tsx's loader, which worker threads do not inherit.
import { existsSync } from 'node:fs';

/** The module `name` (without extension) in the folder of the file at `bootUrl` (the boot file's import.meta.url). */
export async function loadBeside(bootUrl, name) {
  const compiled = new URL(`./${name}.js`, bootUrl);
  if (existsSync(compiled)) return import(compiled.href);
  const { register } = await import('tsx/esm/api');
  register();
  return import(new URL(`./${name}.ts`, bootUrl).href);
}
