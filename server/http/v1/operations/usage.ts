/**
 * The calling account's usage in the current calendar month (UTC): totals, by operation, by
 * day, and the quota (limit, used, remaining, resetsAt).
 */
import { UsageResponseSchema } from '../../../../shared/contracts/usage.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { monthUsage } from '../../../accounts/usage.js';
import { declareOperation } from '../operation.js';

/** A worked answer for the invented North Mill account (a test checks its schema and its sums). */
export const usageExample = {
  month: '2026-12',
  quota: { limit: 50_000, used: 1_218, remaining: 48_782, resetsAt: '2027-01-01T00:00:00.000Z' },
  totals: { requests: 412, units: 1_218, errors: 9 },
  byOperation: [
    { operation: operationCatalogue.multipleEffect.id, requests: 41, units: 800, errors: 1 },
    { operation: operationCatalogue.singleEffect.id, requests: 80, units: 395, errors: 1 },
    { operation: operationCatalogue.steamSaturation.id, requests: 23, units: 23, errors: 0 },
    { operation: operationCatalogue.usageRead.id, requests: 268, units: 0, errors: 7 },
  ],
  byDay: [
    { day: '2026-12-01', requests: 230, units: 690, errors: 5 },
    { day: '2026-12-02', requests: 182, units: 528, errors: 4 },
  ],
};

export const usageRead = declareOperation({
  operation: operationCatalogue.usageRead,
  method: 'get',
  path: '/v1/usage',
  openApiName: 'getUsage',
  tag: 'Usage',
  summary: "The calling account's usage this month and its quota (costs 0 units)",
  description:
    'Totals, by operation and by day for the current calendar month (UTC), and the quota: limit, used, remaining and when it resets. ' +
    'Requests answered with a status of 400 or more are counted but charge no units.',
  response: { description: 'Usage this month', schema: UsageResponseSchema, example: usageExample },
  send: 'json',
  // parsed through the contract so the response can never drift from the documented schema
  run: async (_input, ctx) =>
    UsageResponseSchema.parse(await monthUsage(ctx.store, ctx.accountId, ctx.clock())),
});
