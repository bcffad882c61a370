/** Byte offset where 1-based line `line` starts (LF, CRLF or CR line ends), past a UTF-8 BOM on line 1. */
export function lineStartOffset(bytes: Uint8Array, line: number): number {
  let p = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  for (let l = 1; l < line; l++) {
    while (p < bytes.length && bytes[p] !== 10 && bytes[p] !== 13) p++;
    if (p < bytes.length && bytes[p] === 13) {
      p++;
      if (p < bytes.length && bytes[p] === 10) p++;
    } else if (p < bytes.length) {
      p++;
    }
  }
  return p;
}
