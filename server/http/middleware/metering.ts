/**
 * Metering of every authenticated /v1 request, whatever its outcome.
 *
 * Installed right after authentication. It wraps `res.end`: when the handler (or the error
 * handler) finishes the response, the usage event, the daily roll-up and the request-log row are
 * written in one synchronous transaction (server/accounts/metering.ts) and only then is the
 * original `res.end` called, which hands the bytes to the socket. Express's `res.send`/`res.json`
 * write the whole body through a single `res.end`, so for JSON responses no byte leaves before the
 * row is committed. (A streamed response would send headers with its first `res.write`; its row
 * is still committed before the final chunk.) If the client disconnects first, the request is
 * recorded with status 499 when the socket closes.
 *
 * If the database refuses the write, the client gets a 500 problem instead of an unbilled result.
 */
import type { RequestHandler, Response } from 'express';
import { recordRequest } from '../../accounts/metering.js';
import { logBody } from '../../accounts/request-log.js';
import { unitsUsedThisMonth } from '../../accounts/usage.js';
import type { AppDeps } from '../app.js';
import { presentedToken } from './auth.js';
import { elapsedMs } from './request-id.js';
import './locals.js';

function chunkOf(args: unknown[]): Buffer | string | undefined {
  const first = args[0];
  if (typeof first === 'string' || Buffer.isBuffer(first)) return first;
  if (first instanceof Uint8Array) return Buffer.from(first);
  return undefined;
}

export function metering(deps: AppDeps): RequestHandler {
  const accountStmt = deps.sqlite.prepare(
    'SELECT monthly_unit_quota AS quota, retain_request_bodies AS retain FROM accounts WHERE id = ?',
  );
  return (req, res, next) => {
    const auth = res.locals.auth;
    if (!auth) throw new Error('metering must run after authentication');
    const account = accountStmt.get(auth.accountId) as { quota: number; retain: number } | undefined;
    const now = deps.clock();
    res.locals.meter = {
      operation: 'unmatched',
      units: 0,
      quota: account?.quota ?? 0,
      usedBefore: unitsUsedThisMonth(deps.sqlite, auth.accountId, now),
    };
    const retain = account?.retain === 1;
    const token = presentedToken(req.get('authorization'));
    let recorded = false;

    const record = (status: number, responseChunk: Buffer | string | undefined): void => {
      recorded = true;
      const meter = res.locals.meter!;
      const limit = deps.config.logBodyLimitBytes;
      recordRequest(deps.sqlite, {
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
      });
    };

    const originalEnd = res.end.bind(res) as (...args: unknown[]) => Response;
    res.end = function meteredEnd(this: Response, ...args: unknown[]): Response {
      if (!recorded) {
        try {
          record(res.statusCode, chunkOf(args));
        } catch (err) {
          console.error(`[metering] could not record request ${res.locals.requestId}:`, err);
          if (!res.headersSent) {
            const body = JSON.stringify({
              type: '/problems/internal',
              title: 'Internal error',
              status: 500,
              detail: 'The request could not be metered; no result was returned.',
              instance: req.originalUrl.split('?')[0],
              requestId: res.locals.requestId,
            });
            res.statusCode = 500;
            res.setHeader('Content-Type', 'application/problem+json');
            res.setHeader('Content-Length', Buffer.byteLength(body));
            return originalEnd(body);
          }
        }
      }
      return originalEnd(...args);
    } as Response['end'];
    res.on('close', () => {
      if (!recorded && !res.writableFinished) {
        try {
          record(499, undefined);
        } catch (err) {
          console.error(`[metering] could not record aborted request ${res.locals.requestId}:`, err);
        }
      }
    });
    next();
  };
}
