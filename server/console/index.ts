/**
 * The console API, mounted at /console-api by ONE app module ({@link consoleApiModule}).
 *
 * Pipeline: cookie-parser → JSON body (size-limited: BODY_LIMIT) → console session (reads the
 * access cookie into res.locals.user) → CSRF check (POST/PUT/PATCH/DELETE) → every module in
 * {@link consoleRouteModules}, each declaring its routes with consoleRoute() (server/console/route.ts).
 * Unknown console paths fall through to the app's 404 problem.
 *
 * Other areas append their module to consoleRouteModules, one line each.
 */
import cookieParser from 'cookie-parser';
import express from 'express';
import { consoleSettings } from '../config.js';
import type { AppDeps, AppModule } from '../deps.js';
import { jsonBodyGuard } from '../http/middleware/body.js';
import { auditRouteModule } from './audit.js';
import { billingRouteModule } from './billing.js';
import { authRouteModule } from './auth/routes.js';
import { csrfCheck } from './auth/csrf.js';
import { sessionMiddleware } from './auth/session.js';
import { buildConsoleOpenApiDocument } from './openapi.js';
import { outboxRouteModule } from './outbox.js';
import { CONSOLE_BASE, consoleRouteTable, type ConsoleRouteModule } from './route.js';
import { usersRouteModule } from './users.js';
import { overviewRoutes } from './overview.js';
import { accountRoutes } from './accounts.js';
import { keyRoutes } from './keys.js';
import { requestLogRoutes } from './request-log.js';
import { usageRoutes } from './usage.js';
import { liquorRoutes } from './liquors.js';
import { workbenchRoutes } from './workbench.js';

/** Console route modules, registered in this order. Append yours, one line. */
export const consoleRouteModules: ConsoleRouteModule[] = [
  authRouteModule,
  usersRouteModule,
  auditRouteModule,
  outboxRouteModule,
  billingRouteModule,
  overviewRoutes,
  accountRoutes,
  keyRoutes,
  requestLogRoutes,
  usageRoutes,
  liquorRoutes,
  workbenchRoutes,
];

/** Builds the console router (without mounting it). */
export function createConsoleRouter(deps: AppDeps): express.Router {
  const router = express.Router();
  router.use((_req, res, next) => {
    res.locals.consoleDeps = deps;
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  router.use(cookieParser());
  router.use(
    express.json({ limit: deps.config.bodyLimitBytes, type: ['application/json', 'application/*+json'] }),
  );
  // The same nesting limit and refused property names as /v1 bodies.
  router.use(jsonBodyGuard());
  router.use(sessionMiddleware(deps));
  router.use(csrfCheck(deps));
  router.get('/openapi.json', (_req, res) => {
    res.json(buildConsoleOpenApiDocument(consoleRouteTable));
  });
  for (const module of consoleRouteModules) module.register(router, deps);
  return router;
}

export const consoleApiModule: AppModule = {
  register(app, deps) {
    const trustProxy = consoleSettings(deps.config).trustProxy;
    if (trustProxy !== false) app.set('trust proxy', trustProxy);
    app.use(CONSOLE_BASE, createConsoleRouter(deps));
  },
};
