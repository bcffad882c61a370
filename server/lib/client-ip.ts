import type { Request } from 'express';

/** The caller's address: the socket's, or behind the proxy named by GATEPOST_TRUST_PROXY the one it forwarded. */
export function clientIp(req: Request): string {
  return req.ip ?? req.socket.remoteAddress ?? 'unknown';
}
