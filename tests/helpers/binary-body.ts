/** A supertest parser that keeps a response's raw bytes (supertest leaves unknown content types such as PDF out of `body`). */
export function binaryBody(res: { on(event: string, listener: (chunk: Buffer) => void): unknown }, cb: (err: Error | null, body: unknown) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (c) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
}
