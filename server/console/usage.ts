/**
 * Console routes for usage from the daily roll-up: GET /usage?accountId&from&to&groupBy and
 * GET /usage/export.csv (one row per day, account and operation). Days are UTC, `to` inclusive;
 * the defaults are the current calendar month up to today. Developers see only their accounts.
 */
import { z } from 'zod';
import {
  MAX_USAGE_DAYS,
  USAGE_CSV_COLUMNS,
  UsageQuerySchema,
  UsageReportSchema,
  type UsageQuery,
} from '../../shared/console/usage.js';
import { CSV_ROW_CAP } from '../../shared/console/request-log.js';
import { daysInclusive, listUsageRows, usageReport } from '../accounts/usage-report.js';
import { monthStartUtc, utcDay } from '../accounts/usage.js';
import { problem } from '../http/problem.js';
import { queryScope } from './accounts.js';
import { sendCsv } from './request-log.js';
import { ALL_ROLES, consoleRoute, type ConsoleRouteModule } from './route.js';

/** The day range of a query with its defaults, refused (422) when reversed or too long. */
export function dayRange(query: Pick<UsageQuery, 'from' | 'to'>, now: Date): { from: string; to: string } {
  const to = query.to ?? utcDay(now);
  const from = query.from ?? utcDay(monthStartUtc(now));
  const days = daysInclusive(from, to);
  if (days < 1) {
    throw problem('validation-failed', '"to" must not be before "from".', {
      errors: [{ field: 'query.to', message: 'must not be before from', value: to }],
    });
  }
  if (days > MAX_USAGE_DAYS) {
    throw problem('validation-failed', `A usage query covers at most ${MAX_USAGE_DAYS} days.`, {
      errors: [{ field: 'query.from', message: `range is ${days} days`, value: from }],
    });
  }
  return { from, to };
}

const UsageExportQuerySchema = UsageQuerySchema.omit({ groupBy: true });

export const usageRoutes: ConsoleRouteModule = {
  register(router, deps) {
    consoleRoute(router, {
      method: 'get',
      path: '/usage',
      roles: ALL_ROLES,
      summary: 'Requests, units and errors between two days, grouped by day, operation or account',
      request: { query: UsageQuerySchema },
      response: UsageReportSchema,
      handler: async ({ query, user }) => {
        const range = dayRange(query, deps.clock());
        const scope = queryScope(user, query.accountId);
        const report = await usageReport(deps.store, { ...range, groupBy: query.groupBy }, scope);
        return {
          ...range,
          groupBy: query.groupBy,
          accountIds: scope === null ? null : [...scope],
          ...report,
        };
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/usage/export.csv',
      roles: ALL_ROLES,
      summary: 'Export usage as CSV: one row per day, account and operation',
      request: { query: UsageExportQuerySchema },
      response: z.string().meta({ description: 'text/csv (RFC 4180), one header row' }),
      responseContentType: 'text/csv',
      handler: async ({ query, user, res }) => {
        const range = dayRange(query, deps.clock());
        const scope = queryScope(user, query.accountId);
        const rows = await listUsageRows(deps.store, range, scope, CSV_ROW_CAP + 1);
        sendCsv(
          res,
          `usage-${range.from}-${range.to}.csv`,
          USAGE_CSV_COLUMNS,
          rows.slice(0, CSV_ROW_CAP) as unknown as Record<string, unknown>[],
          { total: rows.length, cap: CSV_ROW_CAP },
        );
      },
    });
  },
};
