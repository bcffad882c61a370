import { describe, expect, it } from 'vitest';
import type { ImportedCapture } from '../../../shared/contracts/capture.ts';
import { parseScopeCsv, parseScopeCsvText } from '../../../shared/import/parse-scope-csv.ts';
import { scanCaptureBytes } from '../../../shared/import/scan-capture-bytes.ts';
import { readCapture, readManifest } from './fixture-manifest.ts';

// parseScopeCsv reads a plain numeric body with the byte scanner (scanCaptureBytes) and everything else as text
// (parseScopeCsvText): for every file both must give the same capture to the bit, layout and warnings included.
const manifest = readManifest();

const bits = (values: ArrayLike<number>) => Buffer.from(new Float64Array(Array.from(values)).buffer);

function expectSameCapture(fast: ImportedCapture, text: ImportedCapture) {
  expect(fast.length).toBe(text.length);
  expect(fast.layout).toEqual(text.layout);
  expect(fast.metadata).toEqual(text.metadata);
  expect(fast.warnings).toEqual(text.warnings);
  expect(fast.timeOrigin).toEqual(text.timeOrigin);
  expect(fast.valueKind).toEqual(text.valueKind);
  expect(fast.channels.map(({ values: _v, ...c }) => c)).toEqual(text.channels.map(({ values: _v, ...c }) => c));
  fast.channels.forEach((c, k) => {
    expect(c.values.constructor).toBe(text.channels[k].values.constructor);
    expect(bits(c.values).equals(bits(text.channels[k].values))).toBe(true);
  });
  if (text.time.kind === 'explicit') expect(bits((fast.time as { t: Float64Array }).t).equals(bits(text.time.t))).toBe(true);
  else expect(fast.time).toEqual(text.time);
}

/** The outcome of a reader: its capture, or the message it refused the file with. */
function attempt(read: () => ImportedCapture | null): ImportedCapture | null | { refused: string } {
  try {
    return read();
  } catch (error) {
    return { refused: (error as Error).message };
  }
}

describe('parseScopeCsv with the byte scanner against the text reader', () => {
  for (const name of Object.keys(manifest)) {
    it.each([[undefined], [4096]])(`When ${name} is read (head of %s bytes), then the scanner gives the text reader's capture or leaves the file to it`, (headBytes) => {
      const bytes = readCapture(name);
      const text = attempt(() => parseScopeCsvText(bytes));
      const fast = attempt(() => scanCaptureBytes(bytes, {}, headBytes));
      if (fast === null) return; // left to the text reader
      expect(fast).not.toHaveProperty('refused');
      expect(text).not.toHaveProperty('refused');
      expectSameCapture(fast as ImportedCapture, text as ImportedCapture);
    });
  }

  it('When plain files are read, then the scanner does read them (the comparison above is not empty)', () => {
    for (const name of ['plain-time.csv', 'preamble-samples-only.csv', 'decimal-comma-latin1.csv', 'index-column.csv']) {
      expect(scanCaptureBytes(readCapture(name), {}), name).not.toBeNull();
      expect(parseScopeCsv(readCapture(name)).layout.reader).toBe('text');
    }
  });

  it('When the last line has no line end, then it is read all the same', () => {
    const bytes = readCapture('plain-time.csv');
    let end = bytes.length;
    while (bytes[end - 1] === 10 || bytes[end - 1] === 13) end--;
    const trimmed = bytes.slice(0, end);
    const fast = scanCaptureBytes(trimmed, {});
    expect(fast).not.toBeNull();
    expectSameCapture(fast!, parseScopeCsvText(trimmed));
  });

  it.each([
    ['a ragged row', (lines: string[]) => { lines[1234] = `${lines[1234]},9.999`; }],
    ['a time that repeats', (lines: string[]) => { lines[500] = lines[499]; }],
    ['text in a value', (lines: string[]) => { lines[700] = lines[700].replace(/,[^,]*$/, ',abc'); }],
  ])('When a file has %s, then the scanner leaves it to the text reader, whose message names the line', (_what, spoil) => {
    const lines = Buffer.from(readCapture('plain-time.csv')).toString('latin1').split('\n');
    spoil(lines);
    const bytes = new Uint8Array(Buffer.from(lines.join('\n'), 'latin1'));
    expect(scanCaptureBytes(bytes, {})).toBeNull();
    const viaParse = attempt(() => parseScopeCsv(bytes));
    expect(viaParse).toEqual(attempt(() => parseScopeCsvText(bytes)));
    expect(viaParse).toHaveProperty('refused', expect.stringMatching(/^line \d/));
  });
});
