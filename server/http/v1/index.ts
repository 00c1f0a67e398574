/**
 * The /v1 calculation API router.
 *
 * Order: API-key authentication (401) → metering (every authenticated request is recorded, see
 * middleware/metering.ts) → per-key rate limit (429 'rate-limited') → body reader (media type
 * 415, JSON / CSV parsing 413, 400) → the key checked again now that the body is in (401 if it
 * was revoked meanwhile) → the route modules in {@link v1RouteModules}.
 *
 * A route module registers its routes on the router and guards each with
 * `requireOperation('<operation id>')` from middleware/operation.ts (scope check, metering and
 * quota). Paths inside the router are relative to /v1 (e.g. `router.get('/steam/saturation', …)`).
 */
import express from 'express';
import type { AppDeps } from '../../deps.js';
import { authenticate, reauthenticate } from '../middleware/auth.js';
import { bodyReader } from '../middleware/body.js';
import { metering } from '../middleware/metering.js';
import { perKeyRateLimit } from '../middleware/rate-limit.js';
import { usageRoutes } from './usage.js';
import { steamRoutes } from './steam.js';
import { liquorRoutes } from './liquors.js';
import { storedLiquorRoutes } from './stored-liquors.js';
import { evaporatorRoutes } from './evaporators.js';
import { batchRoutes } from './batch.js';
import type { V1RouteModule } from './module.js';

/** Route modules of /v1, registered in this order. Append one line per module. */
export const v1RouteModules: V1RouteModule[] = [
  usageRoutes,
  steamRoutes,
  liquorRoutes,
  storedLiquorRoutes,
  evaporatorRoutes,
  batchRoutes,
];

export function createV1Router(deps: AppDeps): express.Router {
  const router = express.Router();
  router.use(authenticate(deps));
  router.use(metering(deps));
  router.use(perKeyRateLimit());
  router.use(bodyReader(deps.config.bodyLimitBytes));
  router.use(reauthenticate(deps));
  for (const module of v1RouteModules) module.register(router, deps);
  return router;
}
