import { ImportError } from './import-error.ts';

export type CaptureEncoding = 'utf-8' | 'latin1' | 'utf-16le' | 'utf-16be';

export interface DecodeCaptureBytesOptions {
  /** Text encoding of the file. @default detected: a BOM decides; else UTF-8 when the bytes are valid UTF-8, else Latin-1 */
  encoding?: CaptureEncoding;
}

export interface DecodedCapture {
  text: string;
  encoding: CaptureEncoding;
  /** Whether the file began with a byte order mark (removed from `text`). */
  bom: boolean;
}

/** How far into the file binary content is looked for: enough to see past any preamble. */
const BINARY_PROBE_BYTES = 65_536;

/**
 * Turns the bytes of a scope export into text. Scope software writes UTF-8 (with or without BOM), Latin-1 (where
 * "µs" is the single byte 0xB5) or, rarely, UTF-16 with a BOM. Binary files (a NUL byte, or many control bytes,
 * in the first 64 KiB) are refused with a message instead of being decoded into junk.
 */
export function decodeCaptureBytes(bytes: Uint8Array, options: DecodeCaptureBytesOptions = {}): DecodedCapture {
  if (!(bytes instanceof Uint8Array)) throw new TypeError('bytes must be a Uint8Array');
  let { encoding } = options;
  let bom = false;
  let start = 0;
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
    bom = true;
    start = 3;
    encoding ??= 'utf-8';
  } else if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) {
    bom = true;
    start = 2;
    encoding ??= 'utf-16le';
  } else if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) {
    bom = true;
    start = 2;
    encoding ??= 'utf-16be';
  }
  const body = bytes.subarray(start);
  if (encoding !== 'utf-16le' && encoding !== 'utf-16be') refuseBinary(body);
  if (encoding === undefined) {
    try {
      return { text: new TextDecoder('utf-8', { fatal: true }).decode(body), encoding: 'utf-8', bom };
    } catch {
      encoding = 'latin1';
    }
  }
  // WHATWG "latin1" is windows-1252, a superset of ISO-8859-1 in the printable range; 0xB5 is µ in both.
  const text = new TextDecoder(encoding).decode(body);
  return { text, encoding, bom };
}

function refuseBinary(bytes: Uint8Array): void {
  const end = Math.min(bytes.length, BINARY_PROBE_BYTES);
  let control = 0;
  let line = 1;
  for (let i = 0; i < end; i++) {
    const b = bytes[i];
    if (b === 10) line++;
    else if (b === 0) {
      throw new ImportError(`the file holds binary data (a zero byte at offset ${i}), not CSV text; export the capture from the scope as CSV`, line);
    } else if (b < 32 && b !== 9 && b !== 13 && b !== 12) control++;
  }
  if (end > 0 && control > 16 && control / end > 0.01) {
    throw new ImportError(`the file holds binary data (${control} control bytes in the first ${end} bytes), not CSV text; export the capture from the scope as CSV`);
  }
}
