/**
 * Console route GET /overview: requests and units today and this month, the error rate
 * (share of requests with status ≥ 400), the 95th-percentile latency (nearest-rank method over
 * this month's usage_events), top operations, accounts at or above 80 % of their quota, and a
 * 30-day daily series. Developers see only their accounts' figures.
 */
import { NEAR_QUOTA_PERCENT, OverviewQuerySchema, OverviewSchema } from '../../shared/console/overview.js';
import { overview } from '../accounts/usage-report.js';
import { queryScope } from './accounts.js';
import { ALL_ROLES, consoleRoute, type ConsoleRouteModule } from './route.js';

export const OVERVIEW_DAYS = 30;
export const TOP_OPERATIONS = 5;

export const overviewRoutes: ConsoleRouteModule = {
  register(router, deps) {
    consoleRoute(router, {
      method: 'get',
      path: '/overview',
      roles: ALL_ROLES,
      summary: 'Traffic, errors, latency and quota at a glance',
      request: { query: OverviewQuerySchema },
      response: OverviewSchema,
      handler: async ({ query, user }) => {
        const now = deps.clock();
        const scope = queryScope(user, query.accountId);
        return {
          generatedAt: now.toISOString(),
          ...(await overview(deps.store, now, scope, {
            nearQuotaPercent: NEAR_QUOTA_PERCENT,
            days: OVERVIEW_DAYS,
            topOperations: TOP_OPERATIONS,
          })),
        };
      },
    });
  },
};
