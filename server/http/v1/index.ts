/**
 * The /v1 calculation API router.
 *
 * Order: API-key authentication (401) → metering (every authenticated request is recorded, see
 * middleware/metering.ts) → per-key rate limit (429 'rate-limited') → body reader (media type
 * 415, JSON / CSV parsing 413, 400) → the key checked again now that the body is in (401 if it
 * was revoked meanwhile) → the declared operations ({@link v1Operations}), each guarded by its
 * scope, quota and metering → any extra route modules ({@link v1RouteModules}).
 */
import express from 'express';
import type { AppDeps } from '../../deps.js';
import { authenticate, reauthenticate } from '../middleware/auth.js';
import { bodyReader } from '../middleware/body.js';
import { metering } from '../middleware/metering.js';
import { perKeyRateLimit } from '../middleware/rate-limit.js';
import type { V1RouteModule } from './module.js';
import { mountOperation } from './operation.js';
import { v1Operations } from './operations/index.js';

/**
 * Route modules registered after the declared operations (paths relative to /v1). The API's own
 * operations are declarations; this hook is for routes that are not operations (tests add probes).
 */
export const v1RouteModules: V1RouteModule[] = [];

export function createV1Router(deps: AppDeps): express.Router {
  const router = express.Router();
  const meter = metering(deps);
  // A 401 for a known key is logged (unmetered) under its account; see middleware/auth.ts.
  router.use(authenticate(deps, { onRefusedKnownKey: meter.logRefusal }));
  router.use(meter);
  router.use(perKeyRateLimit(deps));
  router.use(bodyReader(deps.config.bodyLimitBytes));
  router.use(reauthenticate(deps));
  for (const decl of v1Operations) mountOperation(router, decl, deps);
  for (const module of v1RouteModules) module.register(router, deps);
  return router;
}
