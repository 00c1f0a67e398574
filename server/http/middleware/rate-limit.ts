/**
 * Per-key rate limit (express-rate-limit 8): a one-minute window, the limit taken from the key's
 * own `rate_limit_per_minute`, keyed by key id, IETF draft-7 `RateLimit` / `RateLimit-Policy`
 * headers, and a 429 problem 'rate-limited' (distinct from 'quota-exceeded').
 *
 * Why draft-7 rather than draft-8: draft-8's policy carries a partition key that express-rate-limit
 * computes as a SHA-256 of the limiter key on every response, which showed in profiles of the
 * metered route; draft-7 says the same (limit, remaining, reset, window) without it.
 *
 * The store is in memory (one per app): correct for a single process. Several processes
 * behind a balancer would need a shared store.
 */
import type { RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import { problem } from '../problem.js';
import './locals.js';

export function perKeyRateLimit(): RequestHandler {
  return rateLimit({
    windowMs: 60_000,
    limit: (_req, res) => res.locals.auth?.rateLimitPerMinute ?? 60,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (_req, res) => `key:${res.locals.auth?.keyId ?? 'none'}`,
    handler: (_req, res, next) => {
      const limit = res.locals.auth?.rateLimitPerMinute ?? 60;
      next(problem('rate-limited', `This API key allows ${limit} requests per minute.`));
    },
    // Our key generator does not use the IP address, so the IP-related checks do not apply.
    validate: { ip: false, trustProxy: false, xForwardedForHeader: false, keyGeneratorIpFallback: false },
  });
}
