import type { Request } from 'express';

/** The caller's address as Express sees it (behind a proxy, set `trust proxy` so this is the client's). */
export function clientIp(req: Request): string {
  return req.ip ?? req.socket.remoteAddress ?? 'unknown';
}
