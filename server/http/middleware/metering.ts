/**
 * Metering of every authenticated /v1 request, whatever its outcome.
 *
 * Installed right after authentication. It wraps `res.end`: when the handler (or the error
 * handler) finishes the response, the request's record (usage event, daily roll-up, request-log
 * row) goes to the app's group-commit writer (server/accounts/metering.ts), and the original
 * `res.end`, which hands the bytes to the socket, is called only once the transaction holding the
 * record has committed: on the next turn of the event loop, together with the other requests
 * finished in this one. Express's `res.send`/`res.json` write the whole body through a single
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
 * in-flight requests, so concurrent requests cannot spend the same remaining units twice.
 */
import type { RequestHandler, Response } from 'express';
import { committedUnitsThisMonth, meteringWriter, type RequestRecord } from '../../accounts/metering.js';
import { logBody } from '../../accounts/request-log.js';
import { scheduleQuotaCheck, thresholdsReached } from '../../billing/quota-notices.js';
import type { AppDeps } from '../app.js';
import { presentedToken } from './auth.js';
import { elapsedMs } from './request-id.js';
import type { MeterState } from './locals.js';

function chunkOf(args: unknown[]): Buffer | string | undefined {
  const first = args[0];
  if (typeof first === 'string' || Buffer.isBuffer(first)) return first;
  if (first instanceof Uint8Array) return Buffer.from(first);
  return undefined;
}

export function metering(deps: AppDeps): RequestHandler {
  // The meters of requests in flight, per account: their charged units count against the quota
  // of the account's other requests until they are committed (this process only; see rate-limit.ts).
  const inFlight = new Map<number, Set<MeterState>>();
  const writer = meteringWriter(deps.sqlite);
  return (req, res, next) => {
    const auth = res.locals.auth;
    if (!auth) throw new Error('metering must run after authentication');
    const siblings = inFlight.get(auth.accountId) ?? new Set<MeterState>();
    inFlight.set(auth.accountId, siblings);
    const meter: MeterState = {
      operation: 'unmatched',
      units: 0,
      quota: auth.monthlyUnitQuota,
      usedByOthers: () => {
        let pending = 0;
        for (const other of siblings) if (other !== meter) pending += other.units;
        return committedUnitsThisMonth(deps.sqlite, auth.accountId, deps.clock()) + pending;
      },
    };
    siblings.add(meter);
    const leave = () => {
      siblings.delete(meter);
      if (siblings.size === 0 && inFlight.get(auth.accountId) === siblings) inFlight.delete(auth.accountId);
    };
    res.locals.meter = meter;
    const retain = auth.retainRequestBodies;
    // The presented key is needed only to redact it from logged bodies.
    const token = retain ? presentedToken(req.get('authorization')) : undefined;
    let recorded = false;

    const recordOf = (status: number, responseChunk: Buffer | string | undefined): RequestRecord => {
      const limit = deps.config.logBodyLimitBytes;
      return {
        at: deps.clock(),
        accountId: auth.accountId,
        keyId: auth.keyId,
        operation: meter.operation,
        status,
        units: status < 400 ? meter.units : 0,
        latencyMs: elapsedMs(res.locals.startedAt),
        requestId: res.locals.requestId ?? '',
        engineVersion: deps.engineVersion,
        method: req.method,
        path: req.originalUrl.split('?')[0] ?? req.originalUrl,
        requestBody: retain ? logBody(req.body, limit, token) : null,
        responseBody: retain ? logBody(responseChunk, limit, token) : null,
      };
    };
    // Quota e-mails (80 % / 100 %, once a month): only a request that crossed a threshold
    // schedules the check, which then runs after this turn, off the hot path.
    const noticeQuota = (status: number) => {
      if (status < 400 && meter.units > 0) {
        const before = meter.usedByOthersAtCharge ?? 0;
        const after = before + meter.units;
        if (thresholdsReached(after, meter.quota).length > thresholdsReached(before, meter.quota).length) {
          scheduleQuotaCheck(deps, auth.accountId);
        }
      }
    };

    const originalEnd = res.end.bind(res) as (...args: unknown[]) => Response;
    const refuseUnmetered = (err: unknown): void => {
      console.error(`[metering] could not record request ${res.locals.requestId}:`, err);
      if (res.headersSent) {
        // Headers (and maybe a part of a streamed body) have left: cut the response short.
        res.destroy();
        return;
      }
      const body = JSON.stringify({
        type: '/problems/internal',
        title: 'Internal error',
        status: 500,
        detail: 'The request could not be metered; no result was returned.',
        instance: req.originalUrl.split('?')[0],
        requestId: res.locals.requestId,
      });
      res.statusCode = 500;
      res.removeHeader('ETag');
      res.setHeader('Content-Type', 'application/problem+json');
      res.setHeader('Content-Length', Buffer.byteLength(body));
      originalEnd(body);
    };
    res.end = function meteredEnd(this: Response, ...args: unknown[]): Response {
      if (recorded) return originalEnd(...args);
      recorded = true;
      const status = res.statusCode;
      let record: RequestRecord;
      try {
        record = recordOf(status, chunkOf(args));
      } catch (err) {
        leave();
        refuseUnmetered(err);
        return this;
      }
      // The units move from "in flight" to the database when the group commits.
      writer.submit(record, (err) => {
        leave();
        if (err !== undefined) return refuseUnmetered(err);
        noticeQuota(status);
        originalEnd(...args);
      });
      return this;
    } as Response['end'];
    res.on('close', () => {
      if (!recorded && !res.writableFinished) {
        recorded = true;
        let record: RequestRecord;
        try {
          record = recordOf(499, undefined);
        } catch (err) {
          leave();
          console.error(`[metering] could not record aborted request ${res.locals.requestId}:`, err);
          return;
        }
        writer.submit(record, (err) => {
          leave();
          if (err !== undefined)
            console.error(`[metering] could not record aborted request ${res.locals.requestId}:`, err);
        });
      }
    });
    next();
  };
}
