import type express from 'express';
import type { AppDeps } from '../../deps.js';

/** A /v1 route module: registers its routes (paths relative to /v1) on the v1 router. */
export interface V1RouteModule {
  register(router: express.Router, deps: AppDeps): void;
}
