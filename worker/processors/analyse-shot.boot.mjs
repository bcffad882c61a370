// BullMQ starts sandboxed processors in a worker thread: hand it the processor (compiled, or TypeScript through
// tsx) as this module's default export.
import { loadBeside } from '../../scripts/lib/load-beside.mjs';

export default (await loadBeside(import.meta.url, 'analyse-shot')).default;
