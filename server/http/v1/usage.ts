/**
 * GET /v1/usage (scope 'usage', 0 units): the calling account's usage in the current calendar
 * month (UTC): totals, by operation, by day, and the quota (limit, used, remaining, resetsAt).
 */
import { UsageResponseSchema } from '../../../shared/contracts/usage.js';
import { monthUsage } from '../../accounts/usage.js';
import { requireOperation } from '../middleware/operation.js';
import type { V1RouteModule } from './module.js';

export const usageRoutes: V1RouteModule = {
  register(router, deps) {
    router.get('/usage', requireOperation('usage.read'), (_req, res) => {
      // parsed through the contract so the response can never drift from the documented schema
      res.json(UsageResponseSchema.parse(monthUsage(deps.sqlite, res.locals.auth!.accountId, deps.clock())));
    });
  },
};
