import { useLabEventPublisher } from './lib/lab-events.ts';
import { existsSync } from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { createAuthenticate } from './lib/authenticate.ts';
import type { Deps } from './lib/deps.ts';
import { createErrorHandler } from './lib/error-handler.ts';
import { notFound } from './lib/errors.ts';
import { buildOpenApi } from './lib/openapi.ts';
import { createSameOriginCheck } from './lib/same-origin.ts';
import { rejectUnstorableText } from './lib/text-input.ts';
import { mountRoutes, type RouteDef } from './lib/routes.ts';
import { accountRoutes } from './modules/account/routes.ts';
import { analysisRoutes } from './modules/analyses/routes.ts';
import { auditRoutes } from './modules/audit/routes.ts';
import { authRoutes } from './modules/auth/routes.ts';
import { campaignRoutes } from './modules/campaigns/routes.ts';
import { eventRoutes } from './modules/events/routes.ts';
import { exportRoutes } from './modules/exports/routes.ts';
import { captureRoutes } from './modules/captures/routes.ts';
import { healthRoutes } from './modules/health/routes.ts';
import { invitationRoutes } from './modules/invitations/routes.ts';
import { labRoutes } from './modules/labs/routes.ts';
import { libraryRoutes } from './modules/library/routes.ts';
import { notificationRoutes } from './modules/notifications/routes.ts';
import { outboxRoutes } from './modules/outbox/routes.ts';
import { reportRoutes } from './modules/reports/routes.ts';
import { reviewRoutes } from './modules/reviews/routes.ts';
import { shotRoutes } from './modules/shots/routes.ts';
import { storageRoutes } from './modules/storage/routes.ts';
import { tokenRoutes } from './modules/tokens/routes.ts';
import { batchRoutes } from './modules/batches/routes.ts';
import { benchRoutes } from './modules/bench/routes.ts';
import { trendRoutes } from './modules/trends/routes.ts';

const API_VERSION = '0.1.0';

/** Every API route, in one list: the server mounts it, the authorization-matrix test checks it row by row. */
export function allRoutes(deps: Deps): RouteDef[] {
  const routes: RouteDef[] = [
    ...healthRoutes(deps),
    ...authRoutes(deps),
    ...tokenRoutes(deps),
    ...accountRoutes(deps),
    ...labRoutes(deps),
    ...storageRoutes(deps),
    ...invitationRoutes(deps),
    ...outboxRoutes(deps),
    ...campaignRoutes(),
    ...libraryRoutes(),
    ...shotRoutes(deps),
    ...analysisRoutes(deps),
    ...captureRoutes(deps),
    ...auditRoutes(),
    ...reviewRoutes(deps),
    ...notificationRoutes(),
    ...exportRoutes(),
    ...reportRoutes(deps),
    ...trendRoutes(),
    ...batchRoutes(deps),
    ...benchRoutes(),
    ...eventRoutes(deps),
  ];
  routes.push({
    method: 'get',
    path: '/api/openapi.json',
    access: { kind: 'public' },
    summary: 'This document: every route, generated from the route table and its zod schemas',
    handler(_req, res) {
      res.json(buildOpenApi(routes, { version: API_VERSION, serverUrl: deps.config.publicUrl }));
    },
  });
  return routes;
}

/** Builds the Express app without listening, so tests can drive it with supertest. */
export function buildApp(deps: Deps): Express {
  useLabEventPublisher(deps.redis);
  const app = express();
  app.disable('x-powered-by');
  // X-Forwarded-For only from the proxy the settings name (GATEPOST_TRUST_PROXY); otherwise the socket's address.
  const proxies = deps.config.trustProxy.split(',').map((p) => p.trim()).filter(Boolean);
  app.set('trust proxy', proxies.length > 0 ? proxies : false);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // uPlot and Tailwind set inline styles; scripts stay same-origin only.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'upgrade-insecure-requests': deps.config.publicUrl.startsWith('https:') ? [] : null,
        },
      },
      // Plain-HTTP loopback installs must not be told to insist on HTTPS.
      strictTransportSecurity: deps.config.publicUrl.startsWith('https:'),
    }),
  );
  app.use(cookieParser());
  app.use('/api', express.json({ limit: '1mb' }), rejectUnstorableText);
  app.use('/api', (req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      deps.logger.info({ method: req.method, url: req.originalUrl, status: res.statusCode, ms: Math.round(ms * 10) / 10 }, 'request');
    });
    res.set('Cache-Control', 'no-store');
    next();
  });
  app.use('/api', createSameOriginCheck(deps.config.publicUrl));
  app.use('/api', createAuthenticate({ jwtSecret: deps.config.jwtSecret, redis: deps.redis }));

  const router = express.Router();
  mountRoutes(router, allRoutes(deps));
  app.use(router);
  app.use('/api', (_req, _res, next) => next(notFound('No such API route.')));

  const clientDir = path.resolve(deps.config.clientDir);
  if (existsSync(path.join(clientDir, 'index.html'))) {
    // A build folder left over from an earlier version may still hold source maps: never serve them.
    app.use((req, _res, next) => (req.path.endsWith('.map') ? next(notFound('No such file.')) : next()));
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => res.sendFile(path.join(clientDir, 'index.html')));
  }
  app.use(createErrorHandler(deps.logger));
  return app;
}
