import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScopeCsv } from '../../../../shared/import/parse-scope-csv.ts';
import { readCaptureFile } from '../../../../worker/import/read-capture-file.ts';
import { checkAgainstTruth } from '../../import/check-against-truth.ts';
import { CAPTURES_DIR, readCapture, readManifest } from '../../import/fixture-manifest.ts';

// The disk reader's byte scanner must give what the generator wrote, and agree to the bit with the text path.
const manifest = readManifest();

describe('readCaptureFile on every fixture layout', () => {
  for (const [name, truth] of Object.entries(manifest)) {
    it.each([4096, undefined])(`When ${name} is read from disk (head of %s bytes), then it matches the generator and the text path bit for bit`, async (headBytes) => {
      const capture = await readCaptureFile(join(CAPTURES_DIR, name), { headBytes });
      checkAgainstTruth(capture, truth);
      const text = parseScopeCsv(readCapture(name));
      // Same grid to the bit; the jitter of the disk path comes from a convex hull, so equal to rounding.
      if (capture.time.kind === 'uniform' && text.time.kind === 'uniform') {
        expect([capture.time.t0, capture.time.dt]).toEqual([text.time.t0, text.time.dt]);
        expect(Math.abs(capture.time.jitter - text.time.jitter)).toBeLessThanOrEqual(1e-9 * text.time.dt);
      } else {
        expect(capture.time).toEqual(text.time);
      }
      capture.channels.forEach((c, k) => expect(Array.from(c.values)).toEqual(Array.from(text.channels[k].values)));
      expect(capture.warnings).toEqual(text.warnings);
      // Plain buffers: loops over typed arrays on resizable ones run about 2× slower in Node 20's V8.
      for (const c of capture.channels) expect((c.values.buffer as ArrayBuffer & { resizable?: boolean }).resizable).not.toBe(true);
      expect(capture.metadata).toEqual(text.metadata);
    });
  }
});
