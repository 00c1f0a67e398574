/**
 * `X-Request-Id` on every response: the client's value when well-formed (1–128 chars of
 * [A-Za-z0-9._-]), otherwise a fresh UUID v4. Also stamps the arrival time for latency.
 */
import crypto from 'node:crypto';
import type { RequestHandler } from 'express';
import './locals.js';

export const REQUEST_ID_PATTERN = /^[A-Za-z0-9._-]{1,128}$/;

export function requestId(): RequestHandler {
  return (req, res, next) => {
    res.locals.startedAt = process.hrtime.bigint();
    const offered = req.get('x-request-id');
    const id = offered !== undefined && REQUEST_ID_PATTERN.test(offered) ? offered : crypto.randomUUID();
    res.locals.requestId = id;
    res.setHeader('X-Request-Id', id);
    next();
  };
}

/** Milliseconds since the request arrived (hrtime, monotonic), rounded to an integer. */
export function elapsedMs(startedAt: bigint | undefined): number {
  if (startedAt === undefined) return 0;
  return Math.round(Number(process.hrtime.bigint() - startedAt) / 1e6);
}
