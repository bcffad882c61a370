// BullMQ starts sandboxed processors in a worker thread: hand it the processor (compiled, or TypeScript through
// tsx) as this module's default export. The thread then readies itself for its first job (warm-thread.ts).
import { loadBeside } from '../../scripts/lib/load-beside.mjs';

const processor = await loadBeside(import.meta.url, 'ingest-capture');
void loadBeside(import.meta.url, 'warm-thread').then(({ warmThread }) => warmThread('ingest')).catch(() => {});

export default processor.default;
