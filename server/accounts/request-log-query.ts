/**
 * Request-log queries for the console: filters, sort and paging in SQL (never in memory), and the
 * bounded rows of the CSV export.
 *
 * request_log has no operation column; the operation and the units come from the usage_events row
 * written in the same metering transaction (same request id, account and instant), joined here.
 *
 * `scope` limits the rows to some accounts (a developer's memberships); null means all accounts.
 */
import { sql, type SQL } from 'drizzle-orm';
import { readInstant, type Store } from '../db/store.js';

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
  /** The answer was replayed from an idempotency record (Idempotency-Key retry, 0 units). */
  idempotentReplay: boolean;
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

const FROM = sql.raw(`FROM request_log rl
  LEFT JOIN usage_events ue
    ON ue.request_id = rl.request_id AND ue.account_id = rl.account_id AND ue.at = rl.at`);

// Aliases quoted: PostgreSQL folds unquoted names to lower case.
const COLUMNS = sql.raw(`rl.id AS id, rl.request_id AS "requestId", rl.at AS at, rl.account_id AS "accountId",
  rl.key_id AS "keyId", rl.method AS method, rl.path AS path, ue.operation AS operation,
  rl.status AS status, rl.latency_ms AS "latencyMs", ue.units AS units,
  rl.idempotent_replay AS "idempotentReplay",
  (SELECT a.name FROM accounts a WHERE a.id = rl.account_id) AS "accountName",
  (SELECT k.name FROM api_keys k WHERE k.id = rl.key_id) AS "keyName"`);

/** As the driver returns it: a time as epoch ms or a Date, a bigint id as a string (PostgreSQL). */
type RawRow = Omit<RequestLogRow, 'at' | 'id' | 'idempotentReplay'> & {
  at: unknown;
  id: number | string;
  idempotentReplay: unknown;
};

function toRow<T extends RawRow>(
  raw: T,
): Omit<T, 'at' | 'id' | 'idempotentReplay'> & { at: Date; id: number; idempotentReplay: boolean } {
  // SQLite keeps the flag as 0/1, PostgreSQL as a boolean.
  return {
    ...raw,
    id: Number(raw.id),
    at: readInstant(raw.at),
    idempotentReplay: Boolean(raw.idempotentReplay),
  };
}

/** The conditions of a filter and scope. An empty scope matches nothing. */
function requestLogConditions(
  store: Store,
  filter: RequestLogFilterInput,
  scope: readonly number[] | null,
): SQL[] {
  const clauses: SQL[] = [];
  if (scope !== null) {
    if (scope.length === 0) return [sql`1 = 0`];
    clauses.push(
      sql`rl.account_id IN (${sql.join(
        scope.map((id) => sql`${id}`),
        sql`, `,
      )})`,
    );
  }
  if (filter.accountId !== undefined) clauses.push(sql`rl.account_id = ${filter.accountId}`);
  if (filter.keyId !== undefined) clauses.push(sql`rl.key_id = ${filter.keyId}`);
  if (filter.operation !== undefined) clauses.push(sql`ue.operation = ${filter.operation}`);
  if (filter.status !== undefined) {
    const cls = /^([1-5])xx$/.exec(filter.status);
    if (cls) {
      const base = Number(cls[1]) * 100;
      clauses.push(sql`rl.status >= ${base} AND rl.status < ${base + 100}`);
    } else {
      clauses.push(sql`rl.status = ${Number(filter.status)}`);
    }
  }
  if (filter.from !== undefined) clauses.push(sql`rl.at >= ${store.instant(filter.from)}`);
  if (filter.to !== undefined) clauses.push(sql`rl.at < ${store.instant(filter.to)}`);
  if (filter.requestId !== undefined) clauses.push(sql`rl.request_id = ${filter.requestId}`);
  return clauses;
}

function whereOf(clauses: SQL[]): SQL {
  return clauses.length > 0 ? sql`WHERE ${sql.join(clauses, sql` AND `)}` : sql``;
}

/** The WHERE clause (empty when nothing filters). An empty scope matches nothing. */
export function requestLogWhere(
  store: Store,
  filter: RequestLogFilterInput,
  scope: readonly number[] | null,
): SQL {
  return whereOf(requestLogConditions(store, filter, scope));
}

function orderBy(sort: RequestLogSort, order: 'asc' | 'desc'): SQL {
  const dir = order === 'asc' ? 'ASC' : 'DESC';
  return sql.raw(`ORDER BY ${SORT_COLUMN[sort]} ${dir}, rl.id ${dir}`);
}

export interface RequestLogPageInput extends RequestLogFilterInput {
  page: number;
  pageSize: number;
  sort: RequestLogSort;
  order: 'asc' | 'desc';
}

/** One page of matching rows and the total count. Ties in the sort key are broken by id. */
export async function queryRequestLog(
  store: Store,
  input: RequestLogPageInput,
  scope: readonly number[] | null,
): Promise<{ items: RequestLogRow[]; total: number; page: number; pageSize: number }> {
  const where = requestLogWhere(store, input, scope);
  const total = await countWhere(store, where);
  const rows = await store.rows<RawRow>(
    sql`SELECT ${COLUMNS} ${FROM} ${where} ${orderBy(input.sort, input.order)}
        LIMIT ${input.pageSize} OFFSET ${(input.page - 1) * input.pageSize}`,
  );
  return { items: rows.map(toRow), total, page: input.page, pageSize: input.pageSize };
}

/** One row with its bodies, if it is inside the scope. */
export async function getRequestLogEntry(
  store: Store,
  id: number,
  scope: readonly number[] | null,
): Promise<RequestLogDetailRow | undefined> {
  const where = whereOf([...requestLogConditions(store, {}, scope), sql`rl.id = ${id}`]);
  const [raw] = await store.rows<RawRow & Omit<RequestLogDetailRow, keyof RequestLogRow>>(
    sql`SELECT ${COLUMNS}, rl.engine_version AS "engineVersion", rl.request_body AS "requestBody",
          rl.response_body AS "responseBody" ${FROM} ${where}`,
  );
  return raw ? toRow(raw) : undefined;
}

/** Matching rows in the given order, at most `cap` of them (the CSV export). */
export async function listRequestLog(
  store: Store,
  input: RequestLogFilterInput & { sort: RequestLogSort; order: 'asc' | 'desc' },
  scope: readonly number[] | null,
  cap: number,
): Promise<RequestLogRow[]> {
  const where = requestLogWhere(store, input, scope);
  const rows = await store.rows<RawRow>(
    sql`SELECT ${COLUMNS} ${FROM} ${where} ${orderBy(input.sort, input.order)} LIMIT ${cap}`,
  );
  return rows.map(toRow);
}

async function countWhere(store: Store, where: SQL): Promise<number> {
  const [row] = await store.rows<{ n: number | string }>(sql`SELECT COUNT(*) AS n ${FROM} ${where}`);
  return Number(row?.n ?? 0);
}

/** Number of matching rows (to tell an export that it was capped). */
export async function countRequestLog(
  store: Store,
  filter: RequestLogFilterInput,
  scope: readonly number[] | null,
): Promise<number> {
  return countWhere(store, requestLogWhere(store, filter, scope));
}
