/**
 * The composition root of the HTTP service: the app of `server/http/app.ts` with the service's
 * modules outside /v1, and the hooks that connect rooms without an import between them (metering
 * tells billing's quota notices when an account crosses a threshold; the key cache and the
 * shared state's invalidation channel). main.ts and the tests build the service here, and close
 * what it opened with {@link closeApp} after the HTTP drain.
 */
import type express from 'express';
import { forgetKnownKeys, onLocalAuthChange } from './accounts/keys.js';
import { flushMetering } from './accounts/metering.js';
import { scheduleQuotaCheck } from './billing/quota-notices.js';
import { paymentsWebhookModule } from './billing/webhook.js';
import { consoleApiModule } from './console/index.js';
import { consoleStaticModule } from './console/static.js';
import type { AppDeps, AppModule } from './deps.js';
import { createHttpApp } from './http/app.js';
import { createJobRunner } from './http/jobs/runner.js';
import { v1Operations } from './http/v1/operations/index.js';
import { openApiModule } from './http/openapi.js';
import { engineSettings } from './config.js';
import { createEnginePool } from './workers/engine-pool.js';
import { connectSharedState } from './integrations/shared-state.js';

export type { AppDeps, AppModule } from './deps.js';

/** Routes outside /v1, registered in this order after /v1. */
export const appModules: readonly AppModule[] = [
  openApiModule,
  consoleApiModule,
  paymentsWebhookModule,
  consoleStaticModule,
];

/**
 * The whole service on `deps`. A hook the caller did not set gets the service's own, on `deps`
 * itself: rooms keep per-deps state keyed by the object (the payment client, for one), so the app
 * must run on the caller's object, not a copy.
 */
export function createApp(deps: AppDeps): express.Express {
  deps.onQuotaThresholdCrossed ??= (accountId) => scheduleQuotaCheck(deps, accountId);
  // Threads start at the first heavy task: an app that never runs one starts none.
  deps.enginePool ??= createEnginePool(engineSettings(deps.config));
  if (deps.config.redisUrl !== undefined && deps.shared === undefined) {
    const shared = connectSharedState(deps.config.redisUrl);
    deps.shared = shared;
    // Key-cache invalidation between nodes: a change made through this node's connection is
    // announced, and another node's announcement drops the keys this node remembers.
    onLocalAuthChange(deps.store, () => shared.publishAuthChange());
    shared.onAuthChange(() => forgetKnownKeys(deps.store));
  }
  const app = createHttpApp(deps, appModules);
  // Jobs: this node runs queued batches and sweeps (and resumes interrupted ones) in the background.
  if (!deps.jobRunner) {
    const runner = createJobRunner(deps, v1Operations);
    deps.jobRunner = runner;
    runner.start();
  }
  return app;
}

/**
 * Ends what the app owns besides the database, after the HTTP drain (main.ts's shutdown, tests):
 * the job runner (after its current chunk), the metering commits still queued or in flight (PostgreSQL commits them asynchronously), the
 * calculation pool's threads (a request still waiting for the pool then fails with 500) and the
 * Redis connections of the shared state. Idempotent; the database stays the caller's to close.
 */
export async function closeApp(deps: AppDeps): Promise<void> {
  // The job runner first: it stops after its current chunk (committed, metered) and queues the job again.
  await deps.jobRunner?.stop();
  await flushMetering(deps.store);
  await deps.enginePool?.destroy();
  await deps.shared?.close();
}
