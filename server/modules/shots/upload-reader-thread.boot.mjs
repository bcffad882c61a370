// Starts upload-reader-thread (compiled, or TypeScript through tsx) in a worker thread.
import { loadBeside } from '../../../scripts/lib/load-beside.mjs';

await loadBeside(import.meta.url, 'upload-reader-thread');
