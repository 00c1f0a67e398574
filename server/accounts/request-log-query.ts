/**
 * Request-log queries for the console: filters, sort and paging in SQL (never in memory), and a
 * bounded row iterator for the CSV export.
 *
 * request_log has no operation column; the operation and the units come from the usage_events row
 * written in the same metering transaction (same request id, account and instant), joined here.
 *
 * `scope` limits the rows to some accounts (a developer's memberships); null means all accounts.
 */
import type { Sqlite } from '../db/client.js';

export interface RequestLogFilterInput {
  accountId?: number | undefined;
  keyId?: number | undefined;
  operation?: string | undefined;
  /** "404" or "4xx". */
  status?: string | undefined;
  from?: Date | undefined;
  to?: Date | undefined;
  requestId?: string | undefined;
}

export type RequestLogSort = 'at' | 'latency' | 'status';

export interface RequestLogRow {
  id: number;
  requestId: string;
  at: Date;
  accountId: number | null;
  keyId: number | null;
  /** The account's and key's names now (a renamed key shows its new name). */
  accountName: string | null;
  keyName: string | null;
  method: string;
  path: string;
  operation: string | null;
  status: number;
  latencyMs: number;
  units: number | null;
}

export interface RequestLogDetailRow extends RequestLogRow {
  engineVersion: string;
  requestBody: string | null;
  responseBody: string | null;
}

const SORT_COLUMN: Record<RequestLogSort, string> = {
  at: 'rl.at',
  latency: 'rl.latency_ms',
  status: 'rl.status',
};

const FROM = `FROM request_log rl
  LEFT JOIN usage_events ue
    ON ue.request_id = rl.request_id AND ue.account_id = rl.account_id AND ue.at = rl.at`;

const COLUMNS = `rl.id AS id, rl.request_id AS requestId, rl.at AS at, rl.account_id AS accountId,
  rl.key_id AS keyId, rl.method AS method, rl.path AS path, ue.operation AS operation,
  rl.status AS status, rl.latency_ms AS latencyMs, ue.units AS units,
  (SELECT a.name FROM accounts a WHERE a.id = rl.account_id) AS accountName,
  (SELECT k.name FROM api_keys k WHERE k.id = rl.key_id) AS keyName`;

type RawRow = Omit<RequestLogRow, 'at'> & { at: number };

function toRow<T extends RawRow>(raw: T): Omit<T, 'at'> & { at: Date } {
  return { ...raw, at: new Date(raw.at) };
}

/** The WHERE clause and its parameters. An empty scope matches nothing. */
export function requestLogWhere(
  filter: RequestLogFilterInput,
  scope: readonly number[] | null,
): { sql: string; params: (string | number)[] } {
  const clauses: string[] = [];
  const params: (string | number)[] = [];
  if (scope !== null) {
    if (scope.length === 0) return { sql: 'WHERE 0', params: [] };
    clauses.push(`rl.account_id IN (${scope.map(() => '?').join(',')})`);
    params.push(...scope);
  }
  if (filter.accountId !== undefined) {
    clauses.push('rl.account_id = ?');
    params.push(filter.accountId);
  }
  if (filter.keyId !== undefined) {
    clauses.push('rl.key_id = ?');
    params.push(filter.keyId);
  }
  if (filter.operation !== undefined) {
    clauses.push('ue.operation = ?');
    params.push(filter.operation);
  }
  if (filter.status !== undefined) {
    const cls = /^([1-5])xx$/.exec(filter.status);
    if (cls) {
      const base = Number(cls[1]) * 100;
      clauses.push('rl.status >= ? AND rl.status < ?');
      params.push(base, base + 100);
    } else {
      clauses.push('rl.status = ?');
      params.push(Number(filter.status));
    }
  }
  if (filter.from !== undefined) {
    clauses.push('rl.at >= ?');
    params.push(filter.from.getTime());
  }
  if (filter.to !== undefined) {
    clauses.push('rl.at < ?');
    params.push(filter.to.getTime());
  }
  if (filter.requestId !== undefined) {
    clauses.push('rl.request_id = ?');
    params.push(filter.requestId);
  }
  return { sql: clauses.length > 0 ? `WHERE ${clauses.join(' AND ')}` : '', params };
}

export interface RequestLogPageInput extends RequestLogFilterInput {
  page: number;
  pageSize: number;
  sort: RequestLogSort;
  order: 'asc' | 'desc';
}

/** One page of matching rows and the total count. Ties in the sort key are broken by id. */
export function queryRequestLog(
  sqlite: Sqlite,
  input: RequestLogPageInput,
  scope: readonly number[] | null,
): { items: RequestLogRow[]; total: number; page: number; pageSize: number } {
  const where = requestLogWhere(input, scope);
  const total = (
    sqlite.prepare(`SELECT COUNT(*) AS n ${FROM} ${where.sql}`).get(...where.params) as { n: number }
  ).n;
  const dir = input.order === 'asc' ? 'ASC' : 'DESC';
  const rows = sqlite
    .prepare(
      `SELECT ${COLUMNS} ${FROM} ${where.sql}
       ORDER BY ${SORT_COLUMN[input.sort]} ${dir}, rl.id ${dir} LIMIT ? OFFSET ?`,
    )
    .all(...where.params, input.pageSize, (input.page - 1) * input.pageSize) as RawRow[];
  return { items: rows.map(toRow), total, page: input.page, pageSize: input.pageSize };
}

/** One row with its bodies, if it is inside the scope. */
export function getRequestLogEntry(
  sqlite: Sqlite,
  id: number,
  scope: readonly number[] | null,
): RequestLogDetailRow | undefined {
  const where = requestLogWhere({}, scope);
  const extra = where.sql === '' ? 'WHERE rl.id = ?' : `${where.sql} AND rl.id = ?`;
  const raw = sqlite
    .prepare(
      `SELECT ${COLUMNS}, rl.engine_version AS engineVersion, rl.request_body AS requestBody,
         rl.response_body AS responseBody ${FROM} ${extra}`,
    )
    .get(...where.params, id) as (RawRow & Omit<RequestLogDetailRow, keyof RequestLogRow>) | undefined;
  return raw ? toRow(raw) : undefined;
}

/**
 * Matching rows in the given order, at most `cap` of them, read lazily (better-sqlite3's
 * iterate), so an export never holds the whole table in memory.
 */
export function* iterateRequestLog(
  sqlite: Sqlite,
  input: RequestLogFilterInput & { sort: RequestLogSort; order: 'asc' | 'desc' },
  scope: readonly number[] | null,
  cap: number,
): Generator<RequestLogRow> {
  const where = requestLogWhere(input, scope);
  const dir = input.order === 'asc' ? 'ASC' : 'DESC';
  const stmt = sqlite.prepare(
    `SELECT ${COLUMNS} ${FROM} ${where.sql} ORDER BY ${SORT_COLUMN[input.sort]} ${dir}, rl.id ${dir} LIMIT ?`,
  );
  for (const raw of stmt.iterate(...where.params, cap) as IterableIterator<RawRow>) yield toRow(raw);
}

/** Number of matching rows (to tell an export that it was capped). */
export function countRequestLog(
  sqlite: Sqlite,
  filter: RequestLogFilterInput,
  scope: readonly number[] | null,
): number {
  const where = requestLogWhere(filter, scope);
  return (sqlite.prepare(`SELECT COUNT(*) AS n ${FROM} ${where.sql}`).get(...where.params) as { n: number })
    .n;
}
