import type { NextFunction, Request, Response } from 'express';
import { AppError } from './errors.ts';

const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Refuses state-changing requests that a browser sent from another site or origin (CSRF, issue 12 item 5): a page on
 * another port of the same host is "same-site", so SameSite=Lax cookies alone do not stop it. Browsers label every
 * request with Sec-Fetch-Site (and cross-origin ones with Origin); only the app's own pages (`same-origin`) and
 * typed-in navigations (`none`) may change things with the session cookie. Requests with neither header (scripts,
 * curl) and Bearer-token requests (a cross-site page cannot add that header without CORS, which the API never
 * grants) pass. The own origin is the public URL's, or the Host the request was sent to (the Vite dev proxy).
 */
export function createSameOriginCheck(publicUrl: string) {
  const publicOrigin = new URL(publicUrl).origin;
  return (req: Request, _res: Response, next: NextFunction): void => {
    if (!UNSAFE.has(req.method)) return next();
    if (/^Bearer\s/i.test(req.headers.authorization ?? '')) return next();
    const site = req.headers['sec-fetch-site'];
    const origin = req.headers.origin;
    const ownOrigins = [publicOrigin, `${req.protocol}://${req.headers.host}`];
    const foreignSite = typeof site === 'string' && site !== 'same-origin' && site !== 'none';
    const foreignOrigin = typeof origin === 'string' && !ownOrigins.includes(origin);
    if (!foreignSite && !foreignOrigin) return next();
    next(new AppError(403, 'cross_site_request',
      `This request came from another page (${typeof origin === 'string' ? origin : `a ${site} page`}), not from Gatepost itself, so it was refused. ` +
        'Make the change in Gatepost; scripts use an API token.'));
  };
}
