/**
 * Per-key rate limit (express-rate-limit 8): a one-minute window, the limit taken from the key's
 * own `rate_limit_per_minute`, keyed by key id, IETF draft-7 `RateLimit` / `RateLimit-Policy`
 * headers, and a 429 problem 'rate-limited' (distinct from 'quota-exceeded').
 *
 * Why draft-7 rather than draft-8: draft-8's policy carries a partition key that express-rate-limit
 * computes as a SHA-256 of the limiter key on every response, which showed in profiles of the
 * metered route; draft-7 says the same (limit, remaining, reset, window) without it.
 *
 * The store is in memory (one per app) unless the app has shared state (`REDIS_URL`): then the
 * counts live in Redis (server/integrations/shared-state.ts), so every node of the service counts
 * the same minute. A Redis that cannot be asked fails closed: {@link failClosed} answers 503.
 */
import type { RequestHandler } from 'express';
import { rateLimit, type Store } from 'express-rate-limit';
import type { AppDeps } from '../../deps.js';
import { SHARED_STATE_RETRY_AFTER_S, SharedStateUnavailableError } from '../../integrations/shared-state.js';
import { problem } from '../problem.js';
import './locals.js';

/** The 503 of a limit that cannot be counted (shared store down): never a 500, never no limit. */
export function limitsUnavailable(): ReturnType<typeof problem> {
  return problem(
    'busy',
    'Request limits cannot be checked right now (the shared limit store is unreachable); nothing was done. Retry after the Retry-After header.',
    { headers: { 'Retry-After': String(SHARED_STATE_RETRY_AFTER_S) } },
  );
}

let lastOutageLog = 0;
let refusedSinceLog = 0;
/** Logs refusals for an unreachable store at most once per 10 s (an outage refuses every request). */
export function logLimitsUnavailable(err: SharedStateUnavailableError): void {
  refusedSinceLog++;
  const now = Date.now();
  if (now - lastOutageLog < 10_000) return;
  console.error(`[limits] ${refusedSinceLog} request(s) refused with 503: ${err.message}`);
  lastOutageLog = now;
  refusedSinceLog = 0;
}

/** `limiter`, with a failure of its shared store answered as {@link limitsUnavailable}. */
export function failClosed(limiter: RequestHandler): RequestHandler {
  return (req, res, next) =>
    limiter(req, res, (err?: unknown) => {
      if (err instanceof SharedStateUnavailableError) {
        logLimitsUnavailable(err);
        next(limitsUnavailable());
        return;
      }
      next(err as Error | undefined);
    });
}

/** The limiter's store: Redis under `ebullio:rl:<name>:` when the app shares state, else memory (undefined). */
export function limiterStore(deps: AppDeps, name: string): Store | undefined {
  return deps.shared?.rateLimitStore(name);
}

export function perKeyRateLimit(deps?: AppDeps): RequestHandler {
  const store = deps ? limiterStore(deps, 'key') : undefined;
  const limiter = rateLimit({
    windowMs: 60_000,
    limit: (_req, res) => res.locals.auth?.rateLimitPerMinute ?? 60,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (_req, res) => `key:${res.locals.auth?.keyId ?? 'none'}`,
    handler: (_req, res, next) => {
      const limit = res.locals.auth?.rateLimitPerMinute ?? 60;
      next(problem('rate-limited', `This API key allows ${limit} requests per minute.`));
    },
    ...(store ? { store } : {}),
    // Our key generator does not use the IP address, so the IP-related checks do not apply.
    validate: { ip: false, trustProxy: false, xForwardedForHeader: false, keyGeneratorIpFallback: false },
  });
  return store ? failClosed(limiter) : limiter;
}
