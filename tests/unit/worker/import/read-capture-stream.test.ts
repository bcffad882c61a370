import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseScopeCsv } from '../../../../shared/import/parse-scope-csv.ts';
import { readCaptureStream } from '../../../../worker/import/read-capture-stream.ts';
import { readCapture } from '../../import/fixture-manifest.ts';
import { rejection } from '../../../helpers/import-rejection.ts';

/** A lazily generated stream that counts how much of it was pulled. */
function generated(chunks: () => Generator<Uint8Array>) {
  const counter = { bytes: 0 };
  const source = {
    async *[Symbol.asyncIterator]() {
      for (const chunk of chunks()) {
        counter.bytes += chunk.length;
        yield chunk;
      }
    },
  };
  return { source, counter };
}

const encoder = new TextEncoder();
const GIB = 1 << 30;

describe('readCaptureStream stops early on junk', () => {
  it('When a 1 GiB stream is text junk from the start, then it stops after the head with a message', async () => {
    const { source, counter } = generated(function* () {
      const line = encoder.encode('lorem ipsum dolor sit amet, consectetur adipiscing elit\n');
      const chunk = new Uint8Array(64 << 10).map((_, i) => line[i % line.length]);
      for (let sent = 0; sent < GIB; sent += chunk.length) yield chunk;
    });
    const error = await rejection(readCaptureStream(source));
    expect(error.message).toBe('line 4,680: no rows of numbers were found in 4680 lines at the start of the file; this does not look like an oscilloscope CSV export');
    expect(counter.bytes).toBeLessThanOrEqual((256 << 10) + (64 << 10));
  });

  it('When a 1 GiB stream has no line end at all, then it stops after the head', async () => {
    const { source, counter } = generated(function* () {
      const chunk = new Uint8Array(64 << 10).fill(0x41);
      for (let sent = 0; sent < GIB; sent += chunk.length) yield chunk;
    });
    expect((await rejection(readCaptureStream(source))).message).toBe('line 1: no line end in the first 256 KiB; this is not a CSV text file');
    expect(counter.bytes).toBeLessThanOrEqual((256 << 10) + (64 << 10));
  });

  it('When good rows turn into 1 GiB of junk, then it stops at the first junk line', async () => {
    const { source, counter } = generated(function* () {
      yield encoder.encode(`Time (s),CH1 (V)\n${Array.from({ length: 50_000 }, (_, i) => `${i}e-6,0.5`).join('\n')}\n`);
      const junk = encoder.encode('#### garbage ####\n'.repeat(4096));
      for (let sent = 0; sent < GIB; sent += junk.length) yield junk;
    });
    const error = await rejection(readCaptureStream(source));
    expect(error.message).toBe("line 50,002: expected 2 numbers, found '#### garbage ####' in the time column");
    expect(counter.bytes).toBeLessThan(4 << 20);
  });

  it('When a data line grows past the line limit, then it stops with the line number', async () => {
    const { source, counter } = generated(function* () {
      yield encoder.encode('t (s),a\n0,1\n1,2\n2,3\n3,');
      const digits = new Uint8Array(64 << 10).fill(0x35);
      for (let sent = 0; sent < GIB; sent += digits.length) yield digits;
    });
    const error = await rejection(readCaptureStream(source, { headBytes: 1024, maxLineBytes: 1 << 20 }));
    expect(error.message).toBe('line 5: a line is longer than 1 MiB, which no row of samples is; this is not a capture file');
    expect(counter.bytes).toBeLessThan(3 << 20);
  });
});

describe('readCaptureStream chunking', () => {
  it('When a fixture arrives in random chunk sizes, then the result is the text path result', async () => {
    const bytes = readCapture('sentinels-footer.csv');
    const text = parseScopeCsv(bytes);
    await fc.assert(fc.asyncProperty(fc.array(fc.integer({ min: 1, max: 20_000 }), { minLength: 1, maxLength: 40 }), async (sizes) => {
      const source = (async function* () {
        let at = 0;
        for (let k = 0; at < bytes.length; k++) {
          const n = sizes[k % sizes.length];
          yield bytes.subarray(at, at + n);
          at += n;
        }
      })();
      const capture = await readCaptureStream(source, { headBytes: 1024 });
      expect(capture.length).toBe(text.length);
      capture.channels.forEach((c, k) => expect(Array.from(c.values)).toEqual(Array.from(text.channels[k].values)));
      expect(capture.metadata).toEqual(text.metadata);
    }), { numRuns: 25 });
  });
});
