import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type * as z from 'zod';
import { can, type Permission, type Role } from '../../shared/contracts/roles.ts';
import { Membership } from '../db/models/index.ts';
import { forbidden, notFound, unauthorized } from './errors.ts';
import { parseInput } from './validate.ts';
import './request-context.ts';

/**
 * Who may call a route:
 * - `public`: anyone, signed in or not;
 * - `user`: any signed-in user (their own account's data only);
 * - `lab`: a member of the lab the route is about whose role has `permission`. The lab comes from `:labId`, or
 *   from `labOf` for routes addressed by a record id (a shot, a capture). A lab the caller does not belong to
 *   answers 404, exactly like one that does not exist, so other labs' records cannot even be probed.
 */
export type Access =
  | { kind: 'public' }
  | { kind: 'user' }
  | { kind: 'lab'; permission: Permission; labOf?: (req: Request) => Promise<string | null> };

export interface RouteDef {
  method: 'get' | 'post' | 'patch' | 'put' | 'delete';
  /** Express path under the app root, e.g. `/api/labs/:labId/members`. */
  path: string;
  access: Access;
  summary: string;
  /** Request body schema: the parsed value replaces `req.body`. */
  body?: z.ZodType;
  /** Query-string schema: the parsed value is in `res.locals.query`. */
  query?: z.ZodType;
  /** Body is multipart/form-data with files in this field (documentation; the handler receives them). */
  multipartFiles?: string;
  /** Or the body is one file itself, of one of these media types (documentation; the handler receives it). */
  fileBody?: string[];
  /** Success status and what the response holds, for the OpenAPI document. @default 200, "JSON" */
  response?: {
    status: number;
    description: string;
    /** A body that is not JSON (e.g. `text/event-stream`), with an example of it for the document. */
    content?: { type: string; example: string };
  };
  handler: (req: Request, res: Response) => unknown;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

async function roleIn(labId: string, userId: string): Promise<Role | null> {
  const membership = await Membership.findOne({ where: { labId, userId }, attributes: ['role'] });
  return membership?.role ?? null;
}

function guard(route: RouteDef): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    // Ids in the path are UUIDs; anything else cannot name a record, so it is simply not found.
    for (const [name, value] of Object.entries(req.params)) {
      if (name.endsWith('Id') && typeof value === 'string' && !UUID.test(value)) return next(notFound());
    }
    const { access } = route;
    if (access.kind === 'public') return next();
    if (!req.auth) return next(req.authError ?? unauthorized());
    if (access.kind === 'user') return next();
    const labId = access.labOf ? await access.labOf(req) : (req.params.labId as string | undefined);
    if (!labId) return next(notFound());
    const role = await roleIn(labId, req.auth.userId);
    if (!role) return next(notFound());
    if (!can(role, access.permission)) return next(forbidden());
    req.lab = { id: labId, role };
    next();
  };
}

function validateBody(schema: z.ZodType): RequestHandler {
  return (req, _res, next) => {
    req.body = parseInput(schema, req.body ?? {});
    next();
  };
}

function validateQuery(schema: z.ZodType): RequestHandler {
  return (req, res, next) => {
    res.locals.query = parseInput(schema, req.query ?? {});
    next();
  };
}

/** Mounts route definitions with their access guard and body validation; returns them for the route registry. */
export function mountRoutes(router: Router, routes: RouteDef[]): RouteDef[] {
  for (const route of routes) {
    const chain: RequestHandler[] = [guard(route)];
    if (route.body) chain.push(validateBody(route.body));
    if (route.query) chain.push(validateQuery(route.query));
    chain.push(async (req, res) => {
      await route.handler(req, res);
    });
    router[route.method](route.path, ...chain);
  }
  return routes;
}
