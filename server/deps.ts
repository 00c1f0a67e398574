/**
 * What every room of the server is handed at start-up: the database, the configuration, the clock
 * and the hooks between rooms. This module imports nothing of the app but types, so any module
 * may depend on it without closing an import circle; `server/app.ts` composes the modules.
 */
import type express from 'express';
import type { Config } from './config.js';
import type { Store } from './db/store.js';
import type { EnginePool } from './workers/engine-pool.js';
import type { SharedState } from './integrations/shared-state.js';

export interface AppDeps {
  /** The data store (SQLite or PostgreSQL) every repository goes through (server/db/store.ts). */
  store: Store;
  config: Config;
  /** Injectable clock: every time the service reasons about (expiry, quotas, logs) comes from here. */
  clock: () => Date;
  /** Recorded with every usage event and request-log row. */
  engineVersion: string;
  /**
   * Called after a metered request whose units took its account across a quota-notice threshold
   * (80 % or 100 %). The composition root points it at billing's quota notices, so metering
   * needs no import of billing.
   */
  onQuotaThresholdCrossed?: (accountId: number) => void;
  /**
   * The node's job runner (server/http/jobs/runner.ts), made and started by `createApp`, stopped
   * by `closeApp` after its current chunk.
   */
  jobRunner?: JobRunnerHandle;
  /** Set to draining on SIGTERM (main.ts): /readyz then answers 503. Absent in most tests. */
  lifecycle?: Lifecycle;
  /**
   * The worker threads of heavy calculations (server/workers/engine-pool.ts). `createApp` makes
   * one from the config when absent (threads started at the first heavy task); main.ts gives one
   * whose threads start at once. Destroyed by `closeApp` after the HTTP drain.
   */
  enginePool?: EnginePool;
  /**
   * Redis-backed state shared between nodes (rate limits, key-cache invalidation). createApp opens
   * it when `config.redisUrl` is set and closeApp closes it; absent: everything stays in memory.
   */
  shared?: SharedState;
}

/** What the rest of the app asks of the job runner. */
export interface JobRunnerHandle {
  /** A job was stored on this node: look for work now rather than at the next poll. */
  wake(): void;
  /** A job ended outside the runner (cancelled): send its callback. */
  ended(jobId: string): void;
  /** Deletes the jobs whose results have expired; resolves with how many. */
  prune(): Promise<number>;
  /** Stops after the current chunk, leaving the job resumable (queued again). */
  stop(): Promise<void>;
}

/**
 * Shared between main.ts, the app (/readyz) and the HTTP server: `draining` is set once on
 * SIGTERM; after the HTTP drain main.ts calls `closeApp` (server/app.ts), which destroys what the
 * app owns beyond the database (the calculation pool), and then closes the database.
 */
export interface Lifecycle {
  draining: boolean;
}

/** Routes outside /v1 (OpenAPI document, docs page, console API, webhooks, static console). */
export interface AppModule {
  register(app: express.Express, deps: AppDeps): void;
}
