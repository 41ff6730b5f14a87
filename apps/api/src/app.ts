import { randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import type { AppDeps } from './app-deps';
import { bearerAuthenticator } from './auth/access-tokens';
import { authRoutes } from './auth/auth-routes';
import { depotsRoutes } from './depots/depots-routes';
import { depotSetupRoutes } from './depots/depot-setup-routes';
import { ratesRoutes } from './rates/rates-routes';
import { scenarioRoutes } from './scenarios/scenario-routes';
import { fleetRoutes } from './fleet/fleet-routes';
import { plansRoutes } from './plans/plans-routes';
import { costsRoutes } from './costs/costs-routes';
import { ocppRoutes } from './ocpp/ocpp-routes';
import { yardRoutes } from './yard/yard-routes';
import { liveRoutes } from './live/live-routes';
import { districtRoutes } from './district/district-routes';
import { outboxRoutes } from './dev/outbox-routes';
import { testControlRouter } from './dev/test-control-routes';
import { apiNotFound, errorHandler } from './http/error-handler';
import { JSON_BODY_LIMIT_BYTES, METER_BODY_LIMIT_BYTES, RUNS_CSV_BODY_LIMIT_BYTES } from './http/limits';
import { ApiRoutes, type RegisteredRoute } from './http/route';
import { idempotencyStore } from './http/idempotency';
import { newOpenApiRegistry, openApiDocument } from './openapi/document';
import { usersRoutes } from './users/users-routes';
import { z } from 'zod';

const REQUEST_ID = /^[\w.-]{1,64}$/;

export interface BuiltApp {
  app: Express;
  routes: RegisteredRoute[];
}

export function createApp(deps: AppDeps): BuiltApp {
  const app = express();
  app.disable('x-powered-by');
  // API answers are never kept (no-store): an ETag would only cost a hash of every body.
  app.disable('etag');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          // Plain http on loopback in development: asking browsers to upgrade would break it.
          'upgrade-insecure-requests': deps.config.PUBLIC_URL?.startsWith('https:') ? [] : null,
        },
      },
      strictTransportSecurity: deps.config.PUBLIC_URL?.startsWith('https:') ?? false,
    }),
  );
  app.use(
    pinoHttp({
      logger: deps.log,
      genReqId: (req, res) => {
        const incoming = req.headers['x-request-id'];
        const id = typeof incoming === 'string' && REQUEST_ID.test(incoming) ? incoming : randomUUID();
        res.setHeader('X-Request-Id', id);
        return id;
      },
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      serializers: {
        req: (req) => ({ id: req.id, method: req.method, url: req.url }),
        res: (res) => ({ statusCode: res.statusCode }),
      },
    }),
  );

  const router = express.Router();
  router.use((_req, res, next) => {
    // API answers carry tokens and organisation data: no browser or proxy may keep them.
    res.setHeader('Cache-Control', 'no-store');
    // The client's clock follows the API's (tests and development may stand it at a fixed instant).
    res.setHeader('X-Server-Time', String(deps.clock().getTime()));
    next();
  });
  // Interval-data and runs files arrive as JSON strings; everything else is small. A larger body
  // is refused before it is read (413 naming the limit).
  router.use('/depots/:depotId/meter-data', express.json({ limit: METER_BODY_LIMIT_BYTES, strict: true }));
  router.use(
    '/depots/:depotId/service-days/:date/csv',
    express.json({ limit: RUNS_CSV_BODY_LIMIT_BYTES, strict: true }),
  );
  router.use(express.json({ limit: JSON_BODY_LIMIT_BYTES, strict: true }));
  router.use(cookieParser());
  const openapi = newOpenApiRegistry();
  const api = new ApiRoutes(
    router,
    openapi,
    bearerAuthenticator(deps.db, deps.config.JWT_SECRET, deps.clock, deps.knownUsers),
    idempotencyStore(deps.db, deps.clock),
    // A write's own notifications are heard before its answer: the writer's next read is fresh.
    () => Promise.all([deps.knownUsers?.sync(), deps.yardNights?.sync(), deps.costsInputs?.sync()]),
  );

  api.add(
    {
      method: 'get',
      path: '/health',
      summary: 'Answers 200 when the API and its database work',
      tag: 'system',
      access: 'public',
      response: z.object({ status: z.literal('ok') }),
    },
    async ({ res }) => {
      try {
        await deps.ping();
      } catch {
        res.status(503).json({ error: { code: 'unavailable', message: 'The database does not answer' } });
        return;
      }
      return { status: 'ok' as const };
    },
  );
  authRoutes(api, deps);
  usersRoutes(api, deps);
  depotsRoutes(api, deps);
  depotSetupRoutes(api, deps);
  ratesRoutes(api, deps);
  scenarioRoutes(api, deps);
  fleetRoutes(api, deps);
  plansRoutes(api, deps);
  costsRoutes(api, deps);
  ocppRoutes(api, deps);
  yardRoutes(api, deps);
  liveRoutes(api, deps);
  outboxRoutes(api, deps);
  districtRoutes(api, deps);
  if (deps.testControl && deps.config.NODE_ENV === 'test')
    router.use('/testing', testControlRouter(deps.db, deps.clock, deps.testControl));

  const document = openApiDocument(openapi);
  router.get('/openapi.json', (_req, res) => {
    res.json(document);
  });
  router.use(apiNotFound);
  app.use('/api', router);

  const webDist = deps.config.WEB_DIST;
  if (webDist && existsSync(path.join(webDist, 'index.html'))) {
    app.use(express.static(webDist, { index: false, maxAge: '1h' }));
    // Every other path is a client route: the app decides what to show.
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(webDist, 'index.html'));
    });
  }
  app.use(errorHandler);
  return { app, routes: api.registered };
}
