/**
 * Metering of every authenticated /v1 request, whatever its outcome.
 *
 * Installed right after authentication. It wraps `res.end`: when the handler (or the error
 * handler) finishes the response, the request's record (usage event, daily roll-up, request-log
 * row) goes to the app's group-commit writer (server/accounts/metering.ts), and the original
 * `res.end`, which hands the bytes to the socket, is called only once the transaction holding the
 * record has committed, together with the other requests finished in this turn of the event loop
 * (on SQLite in the next turn; on PostgreSQL once its COMMIT is acknowledged). Express's `res.send`/`res.json` write the whole body through a single
 * `res.end`, so for JSON responses no byte leaves before the row is committed. (A streamed
 * response would send headers with its first `res.write`; its row is still committed before the
 * final chunk.) If the client disconnects first, the request is recorded with status 499 when
 * the socket closes.
 *
 * If the database refuses the write, the client gets a 500 problem instead of an unbilled result.
 *
 * Quota: each request's meter is kept in a per-account in-flight set until its row is written.
 * `meter.usedByOthers()` (used by `chargeUnits` when units are charged, i.e. after the body is
 * read) returns the units committed this month plus those charged by the account's other
 * in-flight requests, so concurrent requests cannot spend the same remaining units twice. The
 * committed units come from memory (server/accounts/metering.ts), so the check stays synchronous;
 * the middleware awaits only the month's first read on PostgreSQL.
 */
import type { Request, RequestHandler, Response } from 'express';
import {
  knownUnitsThisMonth,
  loadUnitsThisMonth,
  meteringWriter,
  QuotaSpentElsewhere,
  reservedUnits,
  type MeteringWriter,
  type RequestRecord,
} from '../../accounts/metering.js';
import crypto from 'node:crypto';
import { carriesKey, logBody, redactText, type RedactionContext } from '../../accounts/request-log.js';
import { nextMonthStartUtc, thresholdsReached } from '../../accounts/usage.js';
import type { AppDeps } from '../../deps.js';
import { presentedToken } from './auth.js';
import { problem, problemBody, type ProblemError } from '../problem.js';
import { elapsedMs } from './request-id.js';
import type { AuthContext, MeterState } from './locals.js';

function chunkOf(args: unknown[]): Buffer | string | undefined {
  const first = args[0];
  if (typeof first === 'string' || Buffer.isBuffer(first)) return first;
  if (first instanceof Uint8Array) return Buffer.from(first);
  return undefined;
}

/**
 * The URL without its query string (the log and the problem name the path, never the query), with
 * key-shaped segments redacted (a key sent as `/v1/liquors/<key>` is not stored).
 */
export function pathOf(url: string): string {
  const query = url.indexOf('?');
  return redactText(query === -1 ? url : url.slice(0, query));
}

/**
 * A request id the client offered is stored and echoed back: one that carries a key (issued
 * format, the presented key or its secret part, the bootstrap key) is replaced by a fresh UUID
 * before either happens. Other ids, UUIDs included, are kept for the client's correlation.
 */
function keepRequestIdKeyFree(req: Request, res: Response, bootstrapKey: string | undefined): void {
  const id = res.locals.requestId;
  if (id === undefined || req.get('x-request-id') !== id) return;
  if (carriesKey(id, [presentedToken(req.get('authorization')), bootstrapKey])) {
    const fresh = crypto.randomUUID();
    res.locals.requestId = fresh;
    res.setHeader('X-Request-Id', fresh);
  }
}

/** What every metered request of one app shares. */
interface MeteringContext {
  deps: AppDeps;
  writer: MeteringWriter;
  /** The meters of requests in flight, per account (see the module comment on quota). */
  inFlight: Map<number, Set<MeteredRequest>>;
}

/**
 * One authenticated request's meter and its way through the group commit. Its steps are methods
 * rather than closures made per request: profiles of the metered route showed the allocation.
 */
class MeteredRequest implements MeterState {
  operation = 'unmatched';
  units = 0;
  quota: number;
  usedByOthersAtCharge?: number;
  idempotentReplay?: boolean;
  beforeSend?: (status: number) => Promise<void>;
  private recorded = false;
  /** PostgreSQL: the clock when the request was metered (its month total was read then). */
  startedAt: Date | undefined;
  private readonly siblings: Set<MeteredRequest>;
  private readonly originalEnd: (...args: unknown[]) => Response;
  /** The presented key, kept only when a logged body must be redacted. */
  private readonly token: string | undefined;

  constructor(
    private readonly ctx: MeteringContext,
    private readonly req: Request,
    private readonly res: Response,
    private readonly auth: AuthContext,
    /** A refused key's request: logged for its account, never metered (see `logRefusal`). */
    private logOnly = false,
  ) {
    this.quota = auth.monthlyUnitQuota;
    let siblings = ctx.inFlight.get(auth.accountId);
    if (!siblings) {
      siblings = new Set();
      ctx.inFlight.set(auth.accountId, siblings);
    }
    siblings.add(this);
    this.siblings = siblings;
    this.originalEnd = res.end.bind(res) as (...args: unknown[]) => Response;
    this.token = auth.retainRequestBodies ? presentedToken(req.get('authorization')) : undefined;
    keepRequestIdKeyFree(req, res, ctx.deps.config.bootstrapApiKey);
  }

  /** The key was refused after the body arrived (revoked or expired meanwhile): log, never meter. */
  keyRefused(): void {
    this.logOnly = true;
  }

  usedByOthers(): number {
    let pending = 0;
    for (const other of this.siblings) if (other !== this) pending += other.units;
    const { deps } = this.ctx;
    const { store } = deps;
    const accountId = this.auth.accountId;
    const now = deps.clock();
    // Known: read on SQLite now, on PostgreSQL by the middleware before the request went on. The
    // one gap: the month turned during the request on PostgreSQL; it is then checked against the
    // month it started in, and the new month is read for the requests after it.
    let committed = knownUnitsThisMonth(store, accountId, now);
    if (committed === undefined) {
      loadUnitsThisMonth(store, accountId, now)?.catch((err: unknown) =>
        console.error('[metering] could not read the month total:', err),
      );
      committed = knownUnitsThisMonth(store, accountId, this.startedAt ?? now) ?? 0;
    }
    // Units a job running on this node has set aside for its chunk count as spent too.
    return committed + pending + reservedUnits(store, accountId);
  }

  /** Leaves the in-flight set once the record is committed (or could not be). */
  private leave(): void {
    this.siblings.delete(this);
    const { inFlight } = this.ctx;
    if (this.siblings.size === 0 && inFlight.get(this.auth.accountId) === this.siblings) {
      inFlight.delete(this.auth.accountId);
    }
  }

  private redaction(): RedactionContext {
    return { presentedToken: this.token, requestId: this.res.locals.requestId };
  }

  private recordOf(status: number, responseChunk: Buffer | string | undefined): RequestRecord {
    const { deps } = this.ctx;
    const { req, res, auth } = this;
    const retain = auth.retainRequestBodies;
    const limit = deps.config.logBodyLimitBytes;
    return {
      at: deps.clock(),
      accountId: auth.accountId,
      keyId: auth.keyId,
      operation: this.operation,
      status,
      units: status < 400 ? this.units : 0,
      latencyMs: elapsedMs(res.locals.startedAt),
      requestId: res.locals.requestId ?? '',
      engineVersion: deps.engineVersion,
      method: req.method,
      path: pathOf(req.originalUrl),
      requestBody: retain ? logBody(req.body, limit, this.redaction()) : null,
      responseBody: retain ? logBody(responseChunk, limit, this.redaction()) : null,
      ...(this.logOnly ? { logOnly: true, units: 0 } : {}),
      ...(this.idempotentReplay ? { idempotentReplay: true, units: 0 } : {}),
    };
  }

  /**
   * Quota e-mails (80 % / 100 %, once a month): only a request that crossed a threshold
   * schedules the check, which then runs after this turn, off the hot path.
   */
  private noticeQuota(status: number): void {
    if (status < 400 && this.units > 0) {
      const before = this.usedByOthersAtCharge ?? 0;
      const after = before + this.units;
      if (thresholdsReached(after, this.quota).length > thresholdsReached(before, this.quota).length) {
        this.ctx.deps.onQuotaThresholdCrossed?.(this.auth.accountId);
      }
    }
  }

  /** The database refused the record: a 500 problem instead of an unbilled result. */
  private refuseUnmetered(err: unknown): void {
    console.error(`[metering] could not record request ${this.res.locals.requestId}:`, err);
    this.answerInstead(problem('internal', 'The request could not be metered; no result was returned.'));
  }

  /**
   * Answers a problem in place of the response the handler wrote, which was held until metering
   * committed; if its headers (and maybe part of a streamed body) have left, cuts it short.
   */
  private answerInstead(p: ProblemError): void {
    const { res } = this;
    if (res.headersSent) {
      res.destroy();
      return;
    }
    const body = JSON.stringify(problemBody(res, p));
    res.statusCode = p.status;
    res.removeHeader('ETag');
    for (const [name, value] of Object.entries(p.headers)) res.setHeader(name, value);
    res.setHeader('Content-Type', 'application/problem+json');
    res.setHeader('Content-Length', Buffer.byteLength(body));
    this.send([body]);
  }

  /**
   * PostgreSQL, several nodes: other nodes spent the account's quota while this request ran, and
   * the commit refused to charge it (server/accounts/metering.ts `chargeWithinQuotas`; the log row
   * says 429 with 0 units). The client gets the quota problem chargeUnits would have given, not
   * the result it was not charged for.
   */
  private refuseOverQuota(refusal: QuotaSpentElsewhere): void {
    const now = this.ctx.deps.clock();
    const untilNextMonth = (nextMonthStartUtc(now).getTime() - now.getTime()) / 1000;
    this.answerInstead(
      problem(
        'quota-exceeded',
        `This request costs ${refusal.units} units but only ${refusal.remaining} of the monthly quota of ` +
          `${refusal.quota} units remain (spent by this account's other requests meanwhile); no result was returned.`,
        { headers: { 'Retry-After': String(Math.max(1, Math.ceil(untilNextMonth))) } },
      ),
    );
  }

  /**
   * Hands the final answer to the socket, after the idempotency hook (if any) has stored it or
   * given the key back, so a retry never sees an answer the client has not been sent.
   */
  private send(args: unknown[]): void {
    const hook = this.beforeSend;
    if (!hook) {
      this.originalEnd(...args);
      return;
    }
    this.beforeSend = undefined;
    hook(this.res.statusCode).then(
      () => this.originalEnd(...args),
      (err: unknown) => {
        console.error(`[idempotency] could not store the answer of ${this.res.locals.requestId}:`, err);
        this.originalEnd(...args);
      },
    );
  }

  /** `res.end`: queue the record, and hand the bytes to the socket once it is committed. */
  end(args: unknown[]): void {
    if (this.recorded) {
      this.originalEnd(...args);
      return;
    }
    this.recorded = true;
    const status = this.res.statusCode;
    let record: RequestRecord;
    try {
      record = this.recordOf(status, chunkOf(args));
    } catch (err) {
      this.leave();
      this.refuseUnmetered(err);
      return;
    }
    // The units move from "in flight" to the database when the group commits.
    this.ctx.writer.submit(record, (err) => {
      this.leave();
      if (err instanceof QuotaSpentElsewhere) return this.refuseOverQuota(err);
      if (err !== undefined) return this.refuseUnmetered(err);
      this.noticeQuota(status);
      this.send(args);
    });
  }

  /** The socket closed: a request that never finished is recorded as 499. */
  closed(): void {
    if (this.recorded || this.res.writableFinished) return;
    this.recorded = true;
    // The client went away before an answer: the key is given back for its retry.
    this.beforeSend?.(499).catch((err: unknown) =>
      console.error('[idempotency] could not release a key:', err),
    );
    this.beforeSend = undefined;
    const requestId = this.res.locals.requestId;
    let record: RequestRecord;
    try {
      record = this.recordOf(499, undefined);
    } catch (err) {
      this.leave();
      console.error(`[metering] could not record aborted request ${requestId}:`, err);
      return;
    }
    this.ctx.writer.submit(record, (err) => {
      this.leave();
      if (err !== undefined) console.error(`[metering] could not record aborted request ${requestId}:`, err);
    });
  }
}

/** The metering middleware, and the hook that logs a refused key's request (see {@link metering}). */
export type MeteringMiddleware = RequestHandler & {
  /**
   * Logs the request of a known key refused with 401 (revoked, expired, rotated) under the key's
   * account: a request-log row with its status, no usage event and 0 units. Call it before the
   * refusal is thrown; the row is committed, like any other, before the 401 leaves.
   */
  logRefusal(req: Request, res: Response, auth: AuthContext): void;
};

function install(meter: MeteredRequest, res: Response): void {
  res.end = function meteredEnd(this: Response, ...args: unknown[]): Response {
    meter.end(args);
    return this;
  } as Response['end'];
  res.on('close', () => meter.closed());
}

/** The requests in flight of each store's apps (one map per store), for {@link unitsInFlight}. */
const inFlightByStore = new WeakMap<object, Map<number, Set<MeteredRequest>>>();

/**
 * Units charged by the account's requests in flight on this node (not yet committed): a job's
 * quota check counts them, so a chunk cannot spend what a request is about to.
 */
export function unitsInFlight(store: object, accountId: number): number {
  let units = 0;
  for (const meter of inFlightByStore.get(store)?.get(accountId) ?? []) units += meter.units;
  return units;
}

export function metering(deps: AppDeps): MeteringMiddleware {
  let inFlight = inFlightByStore.get(deps.store);
  if (!inFlight) {
    inFlight = new Map();
    inFlightByStore.set(deps.store, inFlight);
  }
  const ctx: MeteringContext = { deps, writer: meteringWriter(deps.store), inFlight };
  const middleware: RequestHandler = (req, res, next) => {
    const auth = res.locals.auth;
    if (!auth) throw new Error('metering must run after authentication');
    const meter = new MeteredRequest(ctx, req, res, auth);
    res.locals.meter = meter;
    install(meter, res);
    // PostgreSQL: the month total the quota is checked against is read before the request goes on
    // (only the account's first request of the month waits). SQLite reads it at the charge.
    if (!deps.store.sqlite) {
      meter.startedAt = deps.clock();
      const loading = loadUnitsThisMonth(deps.store, auth.accountId, meter.startedAt);
      if (loading) return loading.then(() => next());
    }
    next();
  };
  return Object.assign(middleware, {
    logRefusal(req: Request, res: Response, auth: AuthContext): void {
      install(new MeteredRequest(ctx, req, res, auth, true), res);
    },
  });
}
