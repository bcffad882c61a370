// Starts scan-range-worker.ts in a worker thread: workers do not inherit tsx's loader, so register it here
// (the compiled build, dist/node, has the .js beside this file and needs no loader).
import { existsSync } from 'node:fs';

const compiled = new URL('./scan-range-worker.js', import.meta.url);
if (existsSync(compiled)) await import(compiled.href);
else {
  const { register } = await import('tsx/esm/api');
  register();
  await import(new URL('./scan-range-worker.ts', import.meta.url).href);
}
