import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeCaptureLayout } from '../../../../fixtures/lib/write-capture-layout.ts';
import { parseScopeCsv } from '../../../../shared/import/parse-scope-csv.ts';
import { countLineEnds } from '../../../../shared/import/count-line-ends.ts';
import { readCaptureFile, rowsUpperBound, shortestRowBytes } from '../../../../worker/import/read-capture-file.ts';
import { ScanThread } from '../../../../worker/import/scan-thread.ts';
import { prepareInTwoThreads } from '../../../../worker/cli/prepare-in-two-threads.ts';
import { analyzeShot, parseAnalysisOptions } from '../../../../shared/analysis/analyze-shot.ts';
import type { PrepareChannelsReply } from '../../../../shared/analysis/prepare-channel.ts';
import { checkAgainstTruth } from '../../import/check-against-truth.ts';
import { CAPTURES_DIR, readManifest } from '../../import/fixture-manifest.ts';
import { rejection } from '../../../helpers/import-rejection.ts';

const dir = mkdtempSync(join(tmpdir(), 'gatepost-import-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** An 8000-row capture (a stand-in square and sine wave) in the plain-time layout, with its truth. */
function written(n = 8000) {
  const a = Float64Array.from({ length: n }, (_, i) => (i % 1000 < 500 ? 4.8 : 0.2));
  const b = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 100));
  return writeCaptureLayout('plain-time', { t0: -1e-3, dt: 1e-7, channels: [{ name: 'Gate A', values: a }, { name: 'Gate B', values: b }] });
}

function save(name: string, bytes: Uint8Array | string): string {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
}

describe('readCaptureFile', () => {
  it('When the file is missing, empty or a folder, then the message says which', async () => {
    expect((await rejection(readCaptureFile(join(dir, 'nope.csv')))).message).toBe(`cannot open ${join(dir, 'nope.csv')}: no such file`);
    expect((await rejection(readCaptureFile(save('empty.csv', '')))).message).toBe('the file is empty: there is no text in it');
    expect((await rejection(readCaptureFile(dir))).message).toBe(`${dir} is a folder, not a file`);
  });

  it('When a file is split across two threads, then the result matches the generator and the one-thread read', async () => {
    const { bytes, truth } = written();
    const path = save('two.csv', bytes);
    const [two, one] = await Promise.all([
      readCaptureFile(path, { threads: 2, headBytes: 4096 }),
      readCaptureFile(path, { threads: 1, headBytes: 4096 }),
    ]);
    expect(two.layout.reader).toBe('two threads');
    checkAgainstTruth(two, truth);
    expect(two.time).toMatchObject({ kind: 'uniform', t0: (one.time as { t0: number }).t0, dt: (one.time as { dt: number }).dt });
    expect(Math.abs((two.time as { jitter: number }).jitter - (one.time as { jitter: number }).jitter)).toBeLessThan(1e-9 * 1e-7);
    two.channels.forEach((c, k) => expect(c.values).toEqual(one.channels[k].values));
  });

  it('When the split file has blank lines, a footer and bad data in its second half, then each is handled as in one thread', async () => {
    const { bytes } = written();
    const text = new TextDecoder().decode(bytes);
    const lines = text.split('\n');
    lines.splice(100, 0, '');
    lines.splice(6000, 0, '', '');
    const withBlanks = `${lines.join('\n')}End of record\nSaved by,bench PC\n`;
    const capture = await readCaptureFile(save('blanks.csv', withBlanks), { threads: 2, headBytes: 4096 });
    const reference = parseScopeCsv(new TextEncoder().encode(withBlanks));
    expect(capture.length).toBe(8000);
    expect(capture.channels[1].values).toEqual(reference.channels[1].values);
    expect(capture.metadata).toEqual(reference.metadata);

    lines.splice(7000, 1, '-3e-4,ERR,0.5');
    const error = await rejection(readCaptureFile(save('bad.csv', lines.join('\n')), { threads: 2, headBytes: 4096 }));
    expect(error.message).toBe("line 7,001: expected 3 numbers, found 'ERR'");
  });

  it('When a sample index skips exactly where the file is split between threads, then the skip is still found', async () => {
    const header = 'Sample interval,1e-7\nIndex,CH1\n';
    const body = Array.from({ length: 20_000 }, (_, i) => `${i},${(i % 9) / 10}`);
    const dataOffset = header.length;
    const size = dataOffset + body.join('\n').length + 1;
    // The reader splits at the first line start after the middle of the data (read-capture-file.ts).
    const text = header + body.join('\n') + '\n';
    const mid = dataOffset + Math.floor((size - dataOffset) / 2);
    const splitLine = text.slice(0, text.indexOf('\n', mid) + 1).split('\n').length; // 1-based line after the split
    const k = splitLine - 3; // body row on that line
    // Every index from there on one higher: the only gap is at the split. Same lengths, so the split stays put.
    for (let j = k; j < body.length; j++) body[j] = `${j + 1},${(j % 9) / 10}`;
    const error = await rejection(readCaptureFile(save('index-split.csv', header + body.join('\n') + '\n'), { threads: 2, headBytes: 1024 }));
    expect(error.message).toBe(`line ${splitLine.toLocaleString('en-US')}: the sample index ${k + 1} does not follow ${k - 1} (indices must count up by one)`);
  });

  it('When later rows are much shorter than the head suggested, then the arrays (sized for the most rows the bytes could hold) take them all', async () => {
    const long = Array.from({ length: 200 }, (_, i) => `${(i * 1e-6).toExponential(15)},${(0.123456789012345 + i).toFixed(15)}`);
    const short = Array.from({ length: 20_000 }, (_, i) => `${200 + i}e-6,${i % 10}`);
    const text = `Time (s),CH1 (V)\n${long.join('\n')}\n${short.join('\n')}\n`;
    const capture = await readCaptureFile(save('grow.csv', text), { threads: 1, headBytes: 2048 });
    const reference = parseScopeCsv(new TextEncoder().encode(text));
    expect(capture.length).toBe(20_200);
    expect(capture.channels[0].values).toEqual(reference.channels[0].values);
    // Plain buffers, never grown (a row is at least a digit and a delimiter or line end per field).
    const buffer = capture.channels[0].values.buffer as ArrayBuffer & { resizable?: boolean };
    expect(buffer.resizable).not.toBe(true);
    const dataBytes = new TextEncoder().encode(text).length - 'Time (s),CH1 (V)\n'.length;
    expect(buffer.byteLength).toBe((Math.ceil(dataBytes / 4) + 1) * 8);
  });

  it('When rows after the head are much shorter than any the reader saw, then the two-thread read counts the lines and still matches', async () => {
    // The arrays are sized from the shortest row in the head, after the split and at the end; rows a quarter of
    // that length in the first part outgrow the bound, and the read is done again with the lines counted.
    const long = (i: number) => `${(i * 1e-6).toExponential(15)},${(0.123456789012345 + (i % 7)).toFixed(15)}`;
    const rows = [
      ...Array.from({ length: 100 }, (_, i) => long(i)),
      ...Array.from({ length: 6000 }, (_, i) => `${100 + i}e-6,${i % 10}`),
      ...Array.from({ length: 3000 }, (_, i) => long(6100 + i)),
    ];
    const text = `Time (s),CH1 (V)\n${rows.join('\n')}\n`;
    const path = save('outgrown.csv', text);
    const bytes = new TextEncoder().encode(text);
    const shortestSeen = shortestRowBytes(bytes, text.indexOf('\n') + 1, 2048, 10);
    expect(shortestSeen).toBe(long(0).length + 1);
    const middle = Math.floor(bytes.length / 2);
    expect(rows.slice(0, 6100).join('\n').length).toBeLessThan(middle); // the short rows are all in the first part
    expect(rowsUpperBound(middle, shortestSeen)).toBeLessThan(6100);
    const two = await readCaptureFile(path, { threads: 2, headBytes: 2048 });
    const reference = parseScopeCsv(bytes);
    expect(two.layout.reader).toBe('two threads');
    expect(two.length).toBe(9100);
    expect(two.channels[0].values).toEqual(reference.channels[0].values);
    expect(two.time).toEqual(reference.time);
  });

  it("When the first part's rows are shorter than the bound assumed but still fit the whole arrays, then it never writes into the second part's rows", async () => {
    // The first part's rows are a little over 4/5 of the length the bound assumed: more rows than its share of the
    // arrays (cap0), fewer than the arrays hold in all. The first part must stop at its share (and the read be done
    // again counted) rather than run on over the rows the other thread writes at the same time.
    const long = (i: number) => `${(i * 1e-6).toExponential(15)},${(0.123456789012345 + (i % 7)).toFixed(15)}`;
    const mid = (i: number) => `${(i * 1e-6).toExponential(6)},${(0.5 + (i % 7)).toFixed(6)}`;
    const rows = [
      ...Array.from({ length: 60 }, (_, i) => long(i)),
      ...Array.from({ length: 7000 }, (_, i) => mid(60 + i)),
      ...Array.from({ length: 4200 }, (_, i) => long(7060 + i)),
    ];
    const text = `Time (s),CH1 (V)\n${rows.join('\n')}\n`;
    const bytes = new TextEncoder().encode(text);
    const dataOffset = text.indexOf('\n') + 1;
    const shortestSeen = shortestRowBytes(bytes, dataOffset, 2048, 10);
    expect(shortestSeen).toBe(long(0).length + 1);
    const split = text.indexOf('\n', dataOffset + Math.floor((bytes.length - dataOffset) / 2)) + 1;
    const rowsBefore = text.slice(dataOffset, split).split('\n').length - 1;
    const cap0 = rowsUpperBound(split - dataOffset, shortestSeen);
    expect(rowsBefore).toBeGreaterThan(cap0); // outgrows its share…
    expect(rowsBefore).toBeLessThan(cap0 + rowsUpperBound(bytes.length - split, shortestSeen)); // …not the arrays
    const two = await readCaptureFile(save('overlap.csv', text), { threads: 2, headBytes: 2048 });
    const reference = parseScopeCsv(bytes);
    expect(two.length).toBe(rows.length);
    expect(two.channels[0].values).toEqual(reference.channels[0].values);
    expect(two.time).toMatchObject({ kind: 'uniform', t0: 0, dt: 1e-6 });
    // The jitter only to its rounding level: the two-thread read merges hulls where one pass fits them whole.
    expect((two.time as { jitter: number }).jitter).toBeLessThan(1e-9 * 1e-6);
  });

  it('When the printed times start to repeat only in the second part of a split file, then the grid is rebuilt as in one thread', async () => {
    // Four significant digits: i·1e-8 s repeats from i = 10 000 on, past the middle of 12 000 rows.
    const dt = 1e-8;
    const text = `Sample interval,${dt}\nTime,CH1\n${Array.from({ length: 12_000 }, (_, i) => `${i === 0 ? '0' : (i * dt).toPrecision(4)},${i % 5}`).join('\n')}\n`;
    const path = save('late-repeats-split.csv', text);
    const [two, one] = await Promise.all([readCaptureFile(path, { threads: 2, headBytes: 2048 }), readCaptureFile(path, { threads: 1, headBytes: 2048 })]);
    expect(one.timeOrigin?.how).toBe('rebuilt');
    expect(two.timeOrigin?.how).toBe('rebuilt');
    expect(two.time).toEqual(one.time);
    expect(two.channels[0].values).toEqual(one.channels[0].values);
  });

  it('When counting the shortest row, then blank lines and a last line without its end do not count', () => {
    const bytes = new TextEncoder().encode('1,2\n  \n\n10,20\r\n3,4\n5');
    expect(shortestRowBytes(bytes, 0, bytes.length, 10)).toBe(4);
    expect(shortestRowBytes(bytes, 4, bytes.length, 10)).toBe(4); // '3,4\n'
    expect(shortestRowBytes(bytes, 4, 12, 10)).toBe(Infinity);
    expect(rowsUpperBound(100, 10)).toBe(14); // 100 bytes over 8 bytes a row, plus one
  });

  it('When the times are unevenly spaced, then the reader keeps them (read again with times)', async () => {
    const nonuniform = 'Time (s),CH1 (V)\n' + Array.from({ length: 20_000 }, (_, i) => `${i < 10_000 ? i : 2 * i - 10_000}e-7,${i % 3}`).join('\n') + '\n';
    const capture = await readCaptureFile(save('uneven.csv', nonuniform), { threads: 2, headBytes: 4096 });
    expect(capture.time.kind).toBe('explicit');
    expect(capture.time.kind === 'explicit' && capture.time.t[15_000]).toBeCloseTo(2e-3, 15);
  });
});

describe('readCaptureFile on fixtures split across two threads', () => {
  // CR line ends, Latin-1 with a decimal comma, and a footer with sentinels: the split must not change a number.
  for (const name of ['two-header-rows.tsv', 'decimal-comma-latin1.csv', 'sentinels-footer.csv']) {
    it(`When ${name} is read by two threads, then it matches the generator`, async () => {
      const capture = await readCaptureFile(join(CAPTURES_DIR, name), { threads: 2, headBytes: 2048 });
      expect(capture.layout.reader).toBe('two threads');
      checkAgainstTruth(capture, readManifest()[name]);
    });
  }
});

describe('readCaptureFile falls back to the text path', () => {
  it('When the data fields are quoted or the file is UTF-16, then the text path reads it', async () => {
    const quoted = await readCaptureFile(save('quoted.csv', '"Time (s)","CH1 (V)"\n"0","1.5"\n"1e-6","2.5"\n"2e-6","3.5"\n'), { threads: 2 });
    expect(quoted.layout.reader).toBe('text');
    expect(Array.from(quoted.channels[0].values)).toEqual([1.5, 2.5, 3.5]);
    const text = '\ufeffTime (s),CH1 (V)\n0,1.5\n1e-6,2.5\n2e-6,3.5\n';
    const utf16 = new Uint8Array(text.length * 2);
    for (let i = 0; i < text.length; i++) [utf16[2 * i], utf16[2 * i + 1]] = [text.charCodeAt(i) & 0xff, text.charCodeAt(i) >> 8];
    const wide = await readCaptureFile(save('utf16.csv', utf16));
    expect(wide.layout).toMatchObject({ reader: 'text', encoding: 'utf-16le' });
    expect(Array.from(wide.channels[0].values)).toEqual([1.5, 2.5, 3.5]);
  });
});

describe('countLineEnds', () => {
  it('When counting line ends four bytes at a time, then the count equals a byte-by-byte count at every alignment', () => {
    const bytes = new TextEncoder().encode('a\nbb\n\n\nccc\r\nd\n'.repeat(37));
    for (let start = 0; start < 8; start++) {
      for (let end = bytes.length - 8; end <= bytes.length; end++) {
        let direct = 0;
        for (let i = start; i < end; i++) if (bytes[i] === 10) direct++;
        expect(countLineEnds(bytes, start, end, 10)).toBe(direct);
        expect(countLineEnds(bytes.subarray(1), Math.max(0, start - 1), end - 1, 13)).toBe(bytes.subarray(1).subarray(Math.max(0, start - 1), end - 1).filter((b) => b === 13).length);
      }
    }
  });
});

describe('readCaptureFile with the installation\'s limits (issue 12)', () => {
  const tooDeep = 'the file holds more than 7,999 samples per channel, the most this installation reads (setting GATEPOST_MAX_SAMPLES_PER_CHANNEL). Export a shorter record or a lower sample rate.';
  const tooWide = 'the file has 2 channels; this installation reads at most 1 per capture (setting GATEPOST_MAX_CHANNELS_PER_CAPTURE). Export only the channels of the gates, or split the file.';

  it('When a file has one sample per channel more than maxSamples, then both readers refuse it; at the limit they read it', async () => {
    const path = save('limit.csv', written().bytes);
    for (const threads of [1, 2] as const) {
      expect((await rejection(readCaptureFile(path, { threads, headBytes: 4096, maxSamples: 7_999 }))).message, `threads ${threads}`).toBe(tooDeep);
      expect((await readCaptureFile(path, { threads, headBytes: 4096, maxSamples: 8_000 })).length).toBe(8000);
    }
  });

  it('When a file has more channels than maxChannels, then both readers refuse it before reading samples', async () => {
    const path = save('wide.csv', written().bytes);
    for (const threads of [1, 2] as const) {
      expect((await rejection(readCaptureFile(path, { threads, headBytes: 4096, maxChannels: 1 }))).message, `threads ${threads}`).toBe(tooWide);
    }
  });
});

describe('readCaptureFile with a second thread the caller keeps (the analyze CLI)', () => {
  // `prepares: true` (as the CLI makes it): the thread loads the analysis modules right after each scan's reply;
  // without it, on the first prepare request.
  it.each([{ prepares: true }, {}])('When the caller brings the thread (%o), then the reads use it, it stays up after them, and it prepares channels as analyzeShot would', async (threadOptions) => {
    const { bytes } = written(20_000);
    const path = save('kept.csv', bytes);
    const thread = new ScanThread(threadOptions);
    try {
      const own = await readCaptureFile(path, { threads: 2, headBytes: 4096 });
      const first = await readCaptureFile(path, { threads: 2, headBytes: 4096, thread });
      const second = await readCaptureFile(path, { threads: 2, headBytes: 4096, thread });
      for (const capture of [first, second]) {
        expect(capture.layout.reader).toBe('two threads');
        capture.channels.forEach((c, k) => expect(Buffer.from(c.values.buffer, c.values.byteOffset, c.values.byteLength).equals(Buffer.from(own.channels[k].values.buffer, own.channels[k].values.byteOffset, own.channels[k].values.byteLength))).toBe(true));
      }
      // Half of the channels go to the kept thread; the analysis from them is the one analyzeShot makes alone.
      const options = { spacing: 0.1 };
      const prepared = await prepareInTwoThreads(thread, second, parseAnalysisOptions(options));
      expect(prepared).not.toBeNull();
      expect(prepared?.[0].found?.pulses.length).toBeGreaterThan(5);
      expect(analyzeShot(second, options, prepared ?? undefined)).toEqual(analyzeShot(second, options));
      // The thread itself answers (prepareInTwoThreads would fall back to this thread if it failed).
      const b = second.channels[1].values;
      const answer = await thread.request<PrepareChannelsReply>({ kind: 'prepare', channels: [{ buffer: b.buffer as SharedArrayBuffer, byteOffset: b.byteOffset, length: b.length }], time: second.time, opts: parseAnalysisOptions(options) });
      expect(answer.failure).toBeNull();
      expect(answer.prepared).toEqual([prepared?.[1]]);
      // Not with smoothing (the traces would differ), nor from arrays another thread cannot see.
      expect(await prepareInTwoThreads(thread, second, parseAnalysisOptions({ ...options, smoothing: { windowSize: 11, polynomial: 2 } }))).toBeNull();
      const plain = { ...second, channels: second.channels.map((c) => ({ ...c, values: Float64Array.from(c.values) })) };
      expect(await prepareInTwoThreads(thread, plain, parseAnalysisOptions(options))).toBeNull();
      expect(() => analyzeShot(second, { ...options, smoothing: { windowSize: 11, polynomial: 2 } }, prepared ?? undefined)).toThrow(/only without smoothing/);
    } finally {
      await thread.close();
    }
  });
});
