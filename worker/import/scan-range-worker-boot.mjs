// Starts scan-range-worker.ts in a worker thread: workers do not inherit tsx's loader, so register it here.
import { register } from 'tsx/esm/api';

register();
await import(new URL('./scan-range-worker.ts', import.meta.url).href);
