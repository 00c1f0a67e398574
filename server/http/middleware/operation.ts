/**
 * Per-operation guard for /v1 routes: scope check, operation recording and quota-checked charging.
 * The declared operations (server/http/v1/operation.ts) are guarded with {@link guardOperation};
 * a variable cost is added with {@link chargeUnits} once the request can be read.
 *
 * Both refuse with 429 'quota-exceeded' before any calculation when the account's monthly quota
 * would be exceeded. Units are billed only when the response succeeds (status < 400).
 */
import type { RequestHandler, Response } from 'express';
import { operationInfo, type OperationId, type OperationInfo } from '../../../shared/operations.js';
import { nextMonthStartUtc } from '../../accounts/usage.js';
import { problem } from '../problem.js';
import './locals.js';

/**
 * Adds `units` to the current request's charge; throws ProblemError 429 'quota-exceeded' if the
 * account's used units this month plus this request's charge would exceed the monthly quota.
 */
export function chargeUnits(res: Response, units: number): void {
  const meter = res.locals.meter;
  if (!meter) throw new Error('chargeUnits called outside an authenticated /v1 request');
  if (!Number.isInteger(units) || units < 0)
    throw new Error(`chargeUnits: units must be a non-negative integer`);
  const wanted = meter.units + units;
  const used = meter.usedByOthers();
  if (used + wanted > meter.quota) {
    const remaining = Math.max(0, meter.quota - used);
    throw problem(
      'quota-exceeded',
      `This request costs ${wanted} units but only ${remaining} of the monthly quota of ${meter.quota} units remain.`,
      { headers: { 'Retry-After': String(secondsUntilReset(res)) } },
    );
  }
  meter.units = wanted;
  meter.usedByOthersAtCharge = used;
}

/**
 * Gives back units charged with {@link chargeUnits} for work that was refused after all (a batch
 * charges every case up front so that it cannot overshoot the quota, then bills only the cases
 * that succeeded).
 */
export function releaseUnits(res: Response, units: number): void {
  const meter = res.locals.meter;
  if (!meter) throw new Error('releaseUnits called outside an authenticated /v1 request');
  if (!Number.isInteger(units) || units < 0 || units > meter.units)
    throw new Error(`releaseUnits: units must be a non-negative integer no larger than the charge`);
  meter.units -= units;
}

function secondsUntilReset(res: Response): number {
  const clock = res.app.get('clock') as (() => Date) | undefined;
  const now = clock ? clock() : new Date();
  return Math.max(1, Math.ceil((nextMonthStartUtc(now).getTime() - now.getTime()) / 1000));
}

/**
 * Middleware for one catalogued operation: 403 'forbidden' naming the missing scope, records the
 * operation for metering, then charges its base units (429 'quota-exceeded' if over quota).
 */
export function requireOperation(id: OperationId): RequestHandler {
  return guardOperation(operationInfo(id)!);
}

/** {@link requireOperation} for a catalogue entry (shared/operations.ts). */
export function guardOperation(spec: OperationInfo): RequestHandler {
  const id = spec.id;
  return (_req, res, next) => {
    const auth = res.locals.auth;
    const meter = res.locals.meter;
    if (!auth || !meter) throw new Error('requireOperation used outside the /v1 router');
    meter.operation = id;
    if (!auth.scopes.includes(spec.scope)) {
      throw problem('forbidden', `This API key lacks the scope "${spec.scope}" needed for ${id}.`);
    }
    chargeUnits(res, spec.units);
    next();
  };
}
