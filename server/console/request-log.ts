/**
 * Console routes for the request log: GET /request-log (server-side paging, sort and filters),
 * GET /request-log/:id (redacted bodies and timings), GET /request-log/export.csv (the same
 * filters, at most CSV_ROW_CAP rows), POST /request-log/:id/replay (the logged calculation run again
 * on today's engine, metered to the entry's account; server/http/replay.ts). Developers see only
 * their accounts' rows.
 *
 * Also `sendCsv`, the CSV attachment response the usage export shares (the writer: ../http/csv.ts).
 */
import type { Response } from 'express';
import { z } from 'zod';
import {
  CSV_ROW_CAP,
  REQUEST_LOG_CSV_COLUMNS,
  RequestLogDetailSchema,
  RequestLogFilterSchema,
  RequestLogIdParamsSchema,
  RequestLogPageSchema,
  RequestLogQuerySchema,
  RequestLogSortSchema,
  ReplayResultSchema,
  type RequestLogFilter,
  type RequestLogItem,
} from '../../shared/console/request-log.js';
import { getAccount } from '../accounts/accounts.js';
import {
  countRequestLog,
  getRequestLogEntry,
  listRequestLog,
  queryRequestLog,
  type RequestLogFilterInput,
  type RequestLogRow,
} from '../accounts/request-log-query.js';
import { toCsv } from '../http/csv.js';
import { problem } from '../http/problem.js';
import { replayEntry } from '../http/replay.js';
import { queryScope, scopeOf } from './accounts.js';
import { ALL_ROLES, consoleRoute, type ConsoleRouteModule } from './route.js';

/** Sends rows as an RFC 4180 CSV attachment with a header row. */
export function sendCsv(
  res: Response,
  filename: string,
  columns: readonly string[],
  rows: Iterable<Record<string, unknown>>,
  info: { total: number; cap: number },
): void {
  const rowList = [...rows];
  const text = toCsv(columns, rowList);
  res.setHeader('Content-Type', 'text/csv; charset=utf-8; header=present');
  res.setHeader('Content-Disposition', `attachment; filename="${filename}"`);
  res.setHeader('X-Total-Count', String(info.total));
  if (info.total > rowList.length) res.setHeader('X-Export-Truncated', `rows capped at ${info.cap}`);
  res.status(200).send(text);
}

function filterInput(q: RequestLogFilter): RequestLogFilterInput {
  return {
    keyId: q.keyId,
    operation: q.operation,
    status: q.status,
    from: q.from ? new Date(q.from) : undefined,
    to: q.to ? new Date(q.to) : undefined,
    requestId: q.requestId,
  };
}

function item(row: RequestLogRow): RequestLogItem {
  return { ...row, at: row.at.toISOString() };
}

const ExportQuerySchema = RequestLogFilterSchema.extend({
  sort: RequestLogSortSchema.default('at'),
  order: z.enum(['asc', 'desc']).default('desc'),
});

function checkRange(q: RequestLogFilter): void {
  if (q.from && q.to && Date.parse(q.to) <= Date.parse(q.from)) {
    throw problem('validation-failed', '"to" must be after "from".', {
      errors: [{ field: 'query.to', message: 'must be after from', value: q.to }],
    });
  }
}

export const requestLogRoutes: ConsoleRouteModule = {
  register(router, deps) {
    /** The entry if the user may see it: 404 when there is none, 403 outside the user's accounts. */
    const visibleEntry = async (id: number, user: Parameters<typeof scopeOf>[0]) => {
      const row = await getRequestLogEntry(deps.store, id, null);
      if (!row) throw problem('not-found', `There is no request-log entry ${id}.`);
      const scope = scopeOf(user);
      if (scope !== null && (row.accountId === null || !scope.includes(row.accountId))) {
        throw problem('forbidden', `Request-log entry ${id} belongs to an account you are not a member of.`);
      }
      return row;
    };

    consoleRoute(router, {
      method: 'get',
      path: '/request-log',
      roles: ALL_ROLES,
      summary: 'Search the request log (paged, sorted and filtered on the server)',
      request: { query: RequestLogQuerySchema },
      response: RequestLogPageSchema,
      handler: async ({ query, user }) => {
        checkRange(query);
        const scope = queryScope(user, query.accountId);
        const page = await queryRequestLog(
          deps.store,
          {
            ...filterInput(query),
            page: query.page,
            pageSize: query.pageSize,
            sort: query.sort,
            order: query.order,
          },
          scope,
        );
        return { ...page, items: page.items.map(item) };
      },
    });

    // Declared before /request-log/:id so "export.csv" is not read as an id.
    consoleRoute(router, {
      method: 'get',
      path: '/request-log/export.csv',
      roles: ALL_ROLES,
      summary: `Export the filtered request log as CSV (at most ${CSV_ROW_CAP} rows)`,
      request: { query: ExportQuerySchema },
      response: z.string().meta({ description: 'text/csv (RFC 4180), one header row' }),
      responseContentType: 'text/csv',
      handler: async ({ query, user, res }) => {
        checkRange(query);
        const scope = queryScope(user, query.accountId);
        const filter = filterInput(query);
        const total = await countRequestLog(deps.store, filter, scope);
        const rows = await listRequestLog(
          deps.store,
          { ...filter, sort: query.sort, order: query.order },
          scope,
          CSV_ROW_CAP,
        );
        sendCsv(
          res,
          'request-log.csv',
          REQUEST_LOG_CSV_COLUMNS,
          rows as unknown as Record<string, unknown>[],
          {
            total,
            cap: CSV_ROW_CAP,
          },
        );
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/request-log/:id',
      roles: ALL_ROLES,
      summary: 'One request with its redacted bodies and timings',
      request: { params: RequestLogIdParamsSchema },
      response: RequestLogDetailSchema,
      handler: async ({ params, user }) => {
        const row = await visibleEntry(params.id, user);
        const account = row.accountId === null ? undefined : await getAccount(deps.store, row.accountId);
        return {
          ...item(row),
          engineVersion: row.engineVersion,
          bodiesRetained:
            row.requestBody !== null || row.responseBody !== null || (account?.retainRequestBodies ?? false),
          requestBody: row.requestBody,
          responseBody: row.responseBody,
          timings: {
            receivedAt: new Date(row.at.getTime() - row.latencyMs).toISOString(),
            completedAt: row.at.toISOString(),
            latencyMs: row.latencyMs,
          },
        };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/request-log/:id/replay',
      roles: ALL_ROLES,
      summary:
        'Run a logged calculation again on today’s engine: both results, the differences and the changed model sources (metered to the entry’s account)',
      request: { params: RequestLogIdParamsSchema },
      response: ReplayResultSchema,
      handler: async ({ params, user }) => {
        const row = await visibleEntry(params.id, user);
        return replayEntry(deps, row, `/console-api/request-log/${params.id}/replay`);
      },
    });
  },
};
