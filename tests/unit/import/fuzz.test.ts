import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { ImportError } from '../../../shared/import/import-error.ts';
import { parseScopeCsv } from '../../../shared/import/parse-scope-csv.ts';
import { readCaptureStream } from '../../../worker/import/read-capture-stream.ts';
import { readCapture, readManifest } from './fixture-manifest.ts';

// Property-based fuzzing: whatever the bytes, the importer either returns a capture or throws an ImportError
// (never another exception, never a hang), and what it returns is bounded by the input.
const seeds = Object.keys(readManifest()).map((name) => {
  const bytes = readCapture(name);
  // The first 60 lines keep each run fast while holding every layout's preamble, header and data.
  let end = 0;
  for (let lines = 0; end < bytes.length && lines < 60; end++) if (bytes[end] === 10 || bytes[end] === 13) lines++;
  return bytes.slice(0, end);
});

const mutation = fc.oneof(
  fc.record({ kind: fc.constant('flip' as const), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }),
  fc.record({ kind: fc.constant('delete' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 40 }) }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.constantFrom('\n', '\r', ',', ';', '\t', '"', 'NaN', 'µs', '\u0000', '1e999', '-', '.', 'ERR', ',,,,', '\ufeff') }),
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
);

function mutate(seed: Uint8Array, steps: { kind: string; at: number; byte?: number; length?: number; text?: string }[]): Uint8Array {
  let bytes = seed;
  for (const m of steps) {
    const at = bytes.length === 0 ? 0 : m.at % bytes.length;
    if (m.kind === 'flip') bytes = Uint8Array.from(bytes, (b, i) => (i === at ? (m.byte as number) : b));
    else if (m.kind === 'delete') bytes = Uint8Array.from([...bytes.subarray(0, at), ...bytes.subarray(at + (m.length as number))]);
    else if (m.kind === 'insert') bytes = Uint8Array.from([...bytes.subarray(0, at), ...new TextEncoder().encode(m.text as string), ...bytes.subarray(at)]);
    else bytes = bytes.slice(0, at);
  }
  return bytes;
}

function checkOutcome(run: () => ImportedCapture, input: Uint8Array): void {
  let capture: ImportedCapture;
  try {
    capture = run();
  } catch (error) {
    if (!(error instanceof ImportError)) throw error;
    expect(error.message.length).toBeGreaterThan(0);
    return;
  }
  // Never more samples than lines, and every channel as long as the capture says.
  const lines = input.filter((b) => b === 10 || b === 13).length + 1;
  expect(capture.length).toBeLessThanOrEqual(lines);
  for (const c of capture.channels) expect(c.values.length).toBe(capture.length);
}

describe('importer fuzzing (fast-check)', () => {
  const heapBefore = process.memoryUsage().heapUsed;

  it('When random bytes are parsed, then only ImportError is thrown', () => {
    fc.assert(fc.property(fc.uint8Array({ maxLength: 2000 }), (bytes) => checkOutcome(() => parseScopeCsv(bytes), bytes)), { numRuns: 300 });
  });

  it('When random text of CSV characters is parsed, then only ImportError is thrown', () => {
    const csvish = fc.string({ unit: fc.constantFrom(...'0123456789.,;\t \n\r-+eENa"#:µ'.split('')), maxLength: 600 });
    fc.assert(fc.property(csvish, (text) => {
      const bytes = new TextEncoder().encode(text);
      checkOutcome(() => parseScopeCsv(bytes), bytes);
    }), { numRuns: 300 });
  });

  it('When valid fixtures are mutated, then the text path and the stream path only throw ImportError', async () => {
    await fc.assert(fc.asyncProperty(fc.nat({ max: seeds.length - 1 }), fc.array(mutation, { minLength: 1, maxLength: 6 }), async (which, steps) => {
      const bytes = mutate(seeds[which], steps);
      checkOutcome(() => parseScopeCsv(bytes), bytes);
      let streamed: ImportedCapture | null = null;
      try {
        streamed = await readCaptureStream((async function* () { yield bytes; })(), { headBytes: 1024 });
      } catch (error) {
        if (!(error instanceof ImportError)) throw error;
      }
      if (streamed !== null) checkOutcome(() => streamed as ImportedCapture, bytes);
    }), { numRuns: 200 });
  });

  it('When the fuzzing is done, then the heap has not grown without bound', () => {
    // A loose bound: a leak of even one capture per run would exceed it.
    expect(process.memoryUsage().heapUsed - heapBefore).toBeLessThan(200 << 20);
  });
});
