/**
 * Splits text into lines at LF, CRLF or a lone CR (old spreadsheet exports). A final line ending does not make an
 * extra empty line, so `lines[i]` is file line i + 1.
 */
export function splitLines(text: string): string[] {
  const lines = text.split(/\r\n|\n|\r/);
  if (lines.length > 1 && lines[lines.length - 1] === '') lines.pop();
  return lines;
}
