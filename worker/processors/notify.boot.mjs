// BullMQ starts sandboxed processors in a worker thread, which does not inherit tsx's loader: register it here,
// then hand BullMQ the TypeScript processor as this module's default export. The compiled build (dist/node) has
// the .js beside this file and needs no loader.
import { existsSync } from 'node:fs';

const compiled = new URL('./notify.js', import.meta.url);
let loaded;
if (existsSync(compiled)) loaded = await import(compiled.href);
else {
  const { register } = await import('tsx/esm/api');
  register();
  loaded = await import(new URL('./notify.ts', import.meta.url).href);
}
export default loaded.default;
