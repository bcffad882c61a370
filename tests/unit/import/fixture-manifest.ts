// Reads the fixture generator's manifest: the known true values each demo capture was written from.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { WrittenCapture } from '../../../fixtures/lib/write-capture-layout.ts';

export const CAPTURES_DIR = join(import.meta.dirname, '../../../fixtures/captures');

export type Truth = WrittenCapture['truth'];

export function readManifest(): Record<string, Truth> {
  return JSON.parse(readFileSync(join(CAPTURES_DIR, 'manifest.json'), 'utf8')).files;
}

export function readCapture(name: string): Uint8Array {
  return new Uint8Array(readFileSync(join(CAPTURES_DIR, name)));
}
