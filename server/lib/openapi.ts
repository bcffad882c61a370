import * as z from 'zod';
import { PERMISSIONS } from '../../shared/contracts/roles.ts';
import type { RouteDef } from './routes.ts';

const errorSchema = {
  type: 'object',
  required: ['error'],
  properties: {
    error: {
      type: 'object',
      required: ['code', 'message'],
      properties: { code: { type: 'string' }, message: { type: 'string', description: 'Meant for people' }, details: {} },
    },
  },
};

function jsonSchema(schema: z.ZodType, io: 'input' | 'output' = 'input') {
  // OpenAPI 3.1 uses JSON Schema 2020-12, which is zod's own target.
  const { $schema: _ignored, ...rest } = z.toJSONSchema(schema, { io, unrepresentable: 'any' }) as Record<string, unknown>;
  return rest;
}

function queryParameters(schema: z.ZodType) {
  const s = jsonSchema(schema) as { properties?: Record<string, unknown>; required?: string[] };
  return Object.entries(s.properties ?? {}).map(([name, prop]) => ({
    name, in: 'query', required: s.required?.includes(name) ?? false, schema: prop,
  }));
}

/**
 * The OpenAPI 3.1 document of every route, generated from the same route table and zod schemas the server
 * validates with, so it cannot drift from what the server accepts.
 */
export function buildOpenApi(routes: RouteDef[], info: { version: string; serverUrl: string }) {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const route of routes) {
    const openPath = route.path.replace(/:(\w+)/g, '{$1}');
    const params = [...route.path.matchAll(/:(\w+)/g)].map((m) => ({
      name: m[1], in: 'path', required: true, schema: m[1].endsWith('Id') ? { type: 'string', format: 'uuid' } : { type: 'string' },
    }));
    const access = route.access;
    const who = access.kind === 'public' ? 'Anyone.' : access.kind === 'user' ? 'Any signed-in user (their own account).'
      : `Members of the lab whose role is ${(PERMISSIONS[access.permission] as readonly string[]).join(', ')} (permission \`${access.permission}\`).`;
    const ok = route.response ?? { status: route.method === 'post' ? 200 : route.method === 'delete' ? 204 : 200, description: 'Success' };
    const operation: Record<string, unknown> = {
      summary: route.summary,
      description: `Who may call it: ${who}`,
      parameters: [...params, ...(route.query ? queryParameters(route.query) : [])],
      responses: {
        [ok.status]: 'content' in ok && ok.content
          ? { description: ok.description, content: { [ok.content.type]: { schema: { type: 'string' }, example: ok.content.example } } }
          : { description: ok.description },
        default: { description: 'An error, with a message meant for people', content: { 'application/json': { schema: errorSchema } } },
      },
      ...(access.kind === 'public' ? { security: [] } : {}),
    };
    if (route.body) {
      operation.requestBody = { required: true, content: { 'application/json': { schema: jsonSchema(route.body) } } };
    } else if (route.multipartFiles || route.fileBody) {
      const content: Record<string, unknown> = {};
      if (route.multipartFiles) {
        content['multipart/form-data'] = { schema: { type: 'object', properties: { [route.multipartFiles]: { type: 'array', items: { type: 'string', format: 'binary' } } } } };
      }
      // OpenAPI 3.1: a body that is a file's bytes has a media type and no schema (contentMediaType is implied).
      for (const type of route.fileBody ?? []) content[type] = {};
      operation.requestBody = { required: true, content };
    }
    (paths[openPath] ??= {})[route.method] = operation;
  }
  return {
    openapi: '3.1.0',
    info: { title: 'Gatepost API', version: info.version, description: 'Light-gate speed measurement: labs, shots, captures, analyses. SI units throughout.' },
    servers: [{ url: info.serverUrl }],
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'gp_session', description: 'Set by POST /api/auth/login' },
        token: { type: 'http', scheme: 'bearer', description: 'Personal API token (gpt_…) from /api/me/tokens' },
      },
    },
    security: [{ session: [] }, { token: [] }],
    paths,
  };
}
