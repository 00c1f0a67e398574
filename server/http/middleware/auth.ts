/**
 * API-key authentication: `Authorization: Bearer <key>`. Failures are 401 'unauthorized' with
 * `WWW-Authenticate: Bearer` (RFC 6750 §3) and a detail naming the reason: missing, malformed,
 * unknown, revoked, expired or rotated (see server/accounts/keys.ts on why "unknown" never reveals
 * whether a public id exists).
 *
 * Failed attempts are limited per client address: after {@link KEY_FAILURE_LIMIT} presented but
 * refused keys (unknown, revoked, expired, rotated) within {@link KEY_FAILURE_WINDOW_MS}, the
 * address gets 429 'rate-limited' with Retry-After until the window ends, before its key is even
 * looked up. Only failures count, so a client using a valid key never moves towards the limit.
 *
 * With shared state (REDIS_URL) the failures are counted in Redis (a rate-limit-redis store under
 * `ebullio:rl:key-failures:`, a window per address from its first failure), so the limit holds
 * for the address across all nodes; a Redis that cannot be asked is a 503 (fail closed).
 */
import type { Request, RequestHandler, Response } from 'express';
import { ipKeyGenerator } from 'express-rate-limit';
import {
  authenticateToken,
  authenticateTokenOnSqlite,
  type AuthenticatedKey,
  type AuthResult,
} from '../../accounts/keys.js';
import type { AppDeps } from '../../deps.js';
import { SharedStateUnavailableError, type SharedRateLimitStore } from '../../integrations/shared-state.js';
import { problem } from '../problem.js';
import type { AuthContext } from './locals.js';
import { limitsUnavailable, logLimitsUnavailable } from './rate-limit.js';
import './locals.js';

const DETAILS = {
  missing: 'No API key: send "Authorization: Bearer <key>".',
  malformed: 'The Authorization header is not "Bearer <key>" with a well-formed key.',
  unknown: 'The API key is not recognised.',
  revoked: 'The API key has been revoked.',
  expired: 'The API key has expired.',
  rotated: 'The API key was rotated and its overlap window has ended; use its replacement.',
} as const;

function unauthorized(reason: keyof typeof DETAILS) {
  const error = reason === 'missing' ? '' : ', error="invalid_token"';
  return problem('unauthorized', DETAILS[reason], {
    headers: { 'WWW-Authenticate': `Bearer realm="ebullio"${error}` },
  });
}

/** Refused keys one client address may present per window before it is turned away. */
export const KEY_FAILURE_LIMIT = 30;
/** The failure window (fixed, shared by all addresses: one map swap ends it for everybody). */
export const KEY_FAILURE_WINDOW_MS = 60_000;
/** Addresses remembered per window at most; beyond it new addresses go uncounted (memory bound). */
const KEY_FAILURE_MAX_ADDRESSES = 100_000;

/** Failed key attempts per address in the current fixed window (synchronous: a Map lookup). */
class KeyFailureCounter {
  private counts = new Map<string, number>();
  private windowStart = Number.NEGATIVE_INFINITY;

  private roll(now: number): void {
    if (now - this.windowStart >= KEY_FAILURE_WINDOW_MS || now < this.windowStart) {
      this.counts = new Map();
      this.windowStart = now;
    }
  }

  /** Seconds until the window ends when the address is over the limit, else 0. */
  blockedFor(address: string, now: number): number {
    this.roll(now);
    if ((this.counts.get(address) ?? 0) < KEY_FAILURE_LIMIT) return 0;
    return Math.max(1, Math.ceil((this.windowStart + KEY_FAILURE_WINDOW_MS - now) / 1000));
  }

  fail(address: string, now: number): void {
    this.roll(now);
    const n = this.counts.get(address);
    if (n === undefined && this.counts.size >= KEY_FAILURE_MAX_ADDRESSES) return;
    this.counts.set(address, (n ?? 0) + 1);
  }
}

/** Failed key attempts per address in Redis, for all nodes (asynchronous: one round trip). */
class SharedKeyFailureCounter {
  constructor(private readonly store: SharedRateLimitStore) {
    // The store needs only its window from express-rate-limit's options.
    void store.init({ windowMs: KEY_FAILURE_WINDOW_MS } as Parameters<SharedRateLimitStore['init']>[0]);
  }

  /**
   * Seconds until the address's window ends when it is over the limit, else 0. Redis expires the
   * window in real time, so this is measured on the real clock, not the app's injectable one.
   */
  async blockedFor(address: string): Promise<number> {
    const info = await this.store.get(address);
    const now = Date.now();
    if (info === undefined || info.totalHits < KEY_FAILURE_LIMIT) return 0;
    const reset = info.resetTime?.getTime() ?? now + KEY_FAILURE_WINDOW_MS;
    return Math.max(1, Math.ceil((reset - now) / 1000));
  }

  async fail(address: string): Promise<void> {
    await this.store.increment(address);
  }
}

function tooManyRefusedKeys(wait: number) {
  return problem('rate-limited', 'Too many refused API keys from this address; try again later.', {
    headers: { 'Retry-After': String(wait) },
  });
}

/** Presented token of the request, if any (used for redaction). */
export function presentedToken(header: string | undefined): string | undefined {
  const m = header === undefined ? null : /^Bearer +(\S+)\s*$/i.exec(header);
  return m?.[1];
}

/** The context of a key, for metering and the request log. */
function contextOf(key: AuthenticatedKey): AuthContext {
  return {
    accountId: key.accountId,
    keyId: key.id,
    publicId: key.publicId,
    scopes: key.scopes,
    rateLimitPerMinute: key.rateLimitPerMinute,
    monthlyUnitQuota: key.account.monthlyUnitQuota,
    retainRequestBodies: key.account.retainRequestBodies,
  };
}

export interface AuthenticateOptions {
  /**
   * Called for a request refused with 401 whose key is known (revoked, expired, rotated), before
   * the refusal is thrown: the /v1 router logs it for the key's account (unmetered), so a
   * developer debugging the 401 finds it in the console's request log.
   */
  onRefusedKnownKey?: (req: Request, res: Response, auth: AuthContext) => void;
}

/** The token the Authorization header presents, or the 401 for a missing or malformed one. */
function presentedOrRefused(req: Request): string {
  const header = req.get('authorization');
  if (header === undefined || header.trim() === '') throw unauthorized('missing');
  const token = presentedToken(header);
  if (token === undefined) throw unauthorized('malformed');
  return token;
}

/**
 * The 401 for a refused key. A known key's refusal is logged for its account first. An unknown
 * (or missing, malformed) key names no account: there is no tenant to show the row to, and
 * logging it anywhere would let anyone fill the log with guesses, so it is not logged.
 */
function refusal(
  result: Extract<AuthResult, { ok: false }>,
  req: Request,
  res: Response,
  options: AuthenticateOptions,
) {
  if ('key' in result) options.onRefusedKnownKey?.(req, res, contextOf(result.key));
  return unauthorized(result.reason);
}

/**
 * The store's key lookup. SQLite: synchronous (prepared statements), so the hot path has no
 * await; other stores answer a promise. The checks around it are the same.
 */
function keyLookup(deps: AppDeps): (token: string, now: Date) => AuthResult | Promise<AuthResult> {
  const sqlite = deps.store.sqlite;
  return (token, now) =>
    sqlite
      ? authenticateTokenOnSqlite(sqlite, deps.config.secret, token, now)
      : authenticateToken(deps.store, deps.config.secret, token, now);
}

export function authenticate(deps: AppDeps, options: AuthenticateOptions = {}): RequestHandler {
  const shared = deps.shared?.rateLimitStore('key-failures');
  if (shared) return authenticateShared(deps, options, new SharedKeyFailureCounter(shared));
  const failures = new KeyFailureCounter();
  const lookup = keyLookup(deps);
  return (req, res, next) => {
    const token = presentedOrRefused(req);
    const now = deps.clock();
    const address = ipKeyGenerator(req.ip ?? '0.0.0.0');
    const wait = failures.blockedFor(address, now.getTime());
    if (wait > 0) throw tooManyRefusedKeys(wait);
    const admit = (result: AuthResult): void => {
      if (!result.ok) {
        failures.fail(address, now.getTime());
        throw refusal(result, req, res, options);
      }
      res.locals.auth = contextOf(result.key);
      next();
    };
    const result = lookup(token, now);
    if (result instanceof Promise) return result.then(admit);
    admit(result);
  };
}

/**
 * {@link authenticate} with the failures counted in Redis: the same checks in the same order, one
 * round trip before the lookup and one more for a refused key. Redis down: 503, nothing looked up.
 */
function authenticateShared(
  deps: AppDeps,
  options: AuthenticateOptions,
  failures: SharedKeyFailureCounter,
): RequestHandler {
  return async (req, res, next) => {
    const token = presentedOrRefused(req);
    const address = ipKeyGenerator(req.ip ?? '0.0.0.0');
    try {
      const wait = await failures.blockedFor(address);
      if (wait > 0) throw tooManyRefusedKeys(wait);
      // Read after the await: a revocation committed meanwhile is seen by this request.
      const result = await authenticateToken(deps.store, deps.config.secret, token, deps.clock());
      if (!result.ok) {
        await failures.fail(address);
        throw refusal(result, req, res, options);
      }
      res.locals.auth = contextOf(result.key);
    } catch (err) {
      if (err instanceof SharedStateUnavailableError) {
        logLimitsUnavailable(err);
        throw limitsUnavailable();
      }
      throw err;
    }
    next();
  };
}

/**
 * Authentication happens on the headers, but a body can take seconds to arrive: after the body
 * is read, the key is checked again, so a key revoked (or expired) while its request's body was
 * still coming is refused with the same 401 as at the door. Cheap: the found key is remembered
 * while the database's auth_revision is unchanged (server/accounts/keys.ts).
 */
export function reauthenticate(deps: AppDeps): RequestHandler {
  const lookup = keyLookup(deps);
  const admitted = (result: AuthResult, res: Response): void => {
    if (!result.ok) {
      res.locals.meter?.keyRefused();
      throw unauthorized(result.reason);
    }
  };
  return (req, res, next) => {
    // On SQLite the check runs in the same turn as the end of the body.
    const recheck = (): void | Promise<void> => {
      const token = presentedToken(req.get('authorization'));
      if (token === undefined) return admitted({ ok: false, reason: 'malformed' }, res);
      const result = lookup(token, deps.clock());
      return result instanceof Promise ? result.then((r) => admitted(r, res)) : admitted(result, res);
    };
    // Multipart bodies are read by the route (upload.ts), which calls this again when done.
    res.locals.recheckKey = recheck;
    const pending = recheck();
    if (pending) return pending.then(() => next());
    next();
  };
}
