// BullMQ starts sandboxed processors in a worker thread, which does not inherit tsx's loader: register it here,
// then hand BullMQ the TypeScript processor as this module's default export.
import { register } from 'tsx/esm/api';

register();
const { default: processor } = await import(new URL('./notify.ts', import.meta.url).href);
export default processor;
