/**
 * Usage reports for the console: totals and groupings from the usage_daily roll-up, the overview
 * figures (today, this month, error rate, p95 latency, top operations, accounts near quota, a
 * 30-day series) and the rows of the usage CSV export. Calendar days and months are UTC.
 *
 * `scope` limits every figure to some accounts (a developer's memberships); null means all.
 */
import type { Sqlite } from '../db/client.js';
import { monthStartUtc, nextMonthStartUtc, utcDay } from './usage.js';

export interface UsageFigures {
  requests: number;
  units: number;
  errors: number;
}

export type UsageGroupBy = 'day' | 'operation' | 'account';

function scopeClause(column: string, scope: readonly number[] | null): { sql: string; params: number[] } {
  if (scope === null) return { sql: '1', params: [] };
  if (scope.length === 0) return { sql: '0', params: [] };
  return { sql: `${column} IN (${scope.map(() => '?').join(',')})`, params: [...scope] };
}

/** The day after a 'YYYY-MM-DD' day. */
export function nextDay(day: string): string {
  const d = new Date(`${day}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return utcDay(d);
}

/** Whole days from `from` to `to` inclusive (1 for the same day; ≤ 0 if `to` is before `from`). */
export function daysInclusive(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000) + 1;
}

/**
 * The p-th percentile by the nearest-rank method: the value at rank ⌈p/100 · N⌉ (1-based) of
 * the ascending sorted values; undefined for no values. Works in SQL (ORDER BY … LIMIT 1
 * OFFSET rank − 1) so no latency list is loaded.
 */
export function nearestRank(p: number, n: number): number {
  return Math.max(1, Math.ceil((p / 100) * n));
}

export function percentileLatencyMs(
  sqlite: Sqlite,
  p: number,
  fromMs: number,
  toMs: number,
  scope: readonly number[] | null,
): number | null {
  const s = scopeClause('account_id', scope);
  const where = `WHERE at >= ? AND at < ? AND ${s.sql}`;
  const n = (
    sqlite.prepare(`SELECT COUNT(*) AS n FROM usage_events ${where}`).get(fromMs, toMs, ...s.params) as {
      n: number;
    }
  ).n;
  if (n === 0) return null;
  const row = sqlite
    .prepare(`SELECT latency_ms AS v FROM usage_events ${where} ORDER BY latency_ms LIMIT 1 OFFSET ?`)
    .get(fromMs, toMs, ...s.params, nearestRank(p, n) - 1) as { v: number };
  return row.v;
}

function figures(
  sqlite: Sqlite,
  fromDay: string,
  toDayExclusive: string,
  scope: readonly number[] | null,
): UsageFigures {
  const s = scopeClause('account_id', scope);
  return sqlite
    .prepare(
      `SELECT COALESCE(SUM(requests),0) AS requests, COALESCE(SUM(units),0) AS units, COALESCE(SUM(errors),0) AS errors
       FROM usage_daily WHERE day >= ? AND day < ? AND ${s.sql}`,
    )
    .get(fromDay, toDayExclusive, ...s.params) as UsageFigures;
}

export interface UsageReportRow extends UsageFigures {
  group: string;
  label: string;
}

/** Usage between two days (inclusive), grouped by day, operation or account. */
export function usageReport(
  sqlite: Sqlite,
  input: { from: string; to: string; groupBy: UsageGroupBy },
  scope: readonly number[] | null,
): { totals: UsageFigures; rows: UsageReportRow[] } {
  const s = scopeClause('d.account_id', scope);
  const end = nextDay(input.to);
  const params = [input.from, end, ...s.params];
  const where = `WHERE d.day >= ? AND d.day < ? AND ${s.sql}`;
  const sums = 'SUM(d.requests) AS requests, SUM(d.units) AS units, SUM(d.errors) AS errors';
  let rows: UsageReportRow[];
  if (input.groupBy === 'account') {
    rows = sqlite
      .prepare(
        `SELECT CAST(d.account_id AS TEXT) AS "group", a.name AS label, ${sums}
         FROM usage_daily d JOIN accounts a ON a.id = d.account_id ${where}
         GROUP BY d.account_id ORDER BY d.account_id`,
      )
      .all(...params) as UsageReportRow[];
  } else {
    const col = input.groupBy === 'day' ? 'd.day' : 'd.operation';
    rows = sqlite
      .prepare(
        `SELECT ${col} AS "group", ${col} AS label, ${sums} FROM usage_daily d ${where}
         GROUP BY ${col} ORDER BY ${col}`,
      )
      .all(...params) as UsageReportRow[];
  }
  const totals = rows.reduce(
    (t, r) => ({ requests: t.requests + r.requests, units: t.units + r.units, errors: t.errors + r.errors }),
    { requests: 0, units: 0, errors: 0 },
  );
  return { totals, rows };
}

export interface UsageCsvRow extends UsageFigures {
  day: string;
  accountId: number;
  accountName: string;
  operation: string;
}

/** Every roll-up row between two days (inclusive), lazily, ordered by day, account, operation. */
export function* iterateUsageRows(
  sqlite: Sqlite,
  input: { from: string; to: string },
  scope: readonly number[] | null,
  cap: number,
): Generator<UsageCsvRow> {
  const s = scopeClause('d.account_id', scope);
  const stmt = sqlite.prepare(
    `SELECT d.day AS day, d.account_id AS accountId, a.name AS accountName, d.operation AS operation,
       d.requests AS requests, d.units AS units, d.errors AS errors
     FROM usage_daily d JOIN accounts a ON a.id = d.account_id
     WHERE d.day >= ? AND d.day < ? AND ${s.sql}
     ORDER BY d.day, d.account_id, d.operation LIMIT ?`,
  );
  yield* stmt.iterate(input.from, nextDay(input.to), ...s.params, cap) as IterableIterator<UsageCsvRow>;
}

export interface Overview {
  month: string;
  today: UsageFigures;
  thisMonth: UsageFigures;
  errorRate: number | null;
  p95LatencyMs: number | null;
  topOperations: (UsageFigures & { operation: string })[];
  nearQuota: {
    accountId: number;
    accountName: string;
    unitsUsed: number;
    monthlyUnitQuota: number;
    percent: number;
  }[];
  daily: (UsageFigures & { day: string })[];
}

/** Share of the quota used, percent. A zero quota counts as full. */
export function quotaPercent(units: number, quota: number): number {
  return quota > 0 ? (units / quota) * 100 : 100;
}

export function overview(
  sqlite: Sqlite,
  now: Date,
  scope: readonly number[] | null,
  opts: { nearQuotaPercent: number; days: number; topOperations: number },
): Overview {
  const today = utcDay(now);
  const monthStart = monthStartUtc(now);
  const monthEnd = nextMonthStartUtc(now);
  const monthFrom = utcDay(monthStart);
  const monthTo = utcDay(monthEnd);
  const thisMonth = figures(sqlite, monthFrom, monthTo, scope);

  const s = scopeClause('account_id', scope);
  const topOperations = sqlite
    .prepare(
      `SELECT operation, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
       FROM usage_daily WHERE day >= ? AND day < ? AND ${s.sql}
       GROUP BY operation ORDER BY requests DESC, operation LIMIT ?`,
    )
    .all(monthFrom, monthTo, ...s.params, opts.topOperations) as Overview['topOperations'];

  const sa = scopeClause('a.id', scope);
  const accountsUsage = sqlite
    .prepare(
      `SELECT a.id AS accountId, a.name AS accountName, a.monthly_unit_quota AS monthlyUnitQuota,
         COALESCE((SELECT SUM(units) FROM usage_daily d WHERE d.account_id = a.id AND d.day >= ? AND d.day < ?), 0) AS unitsUsed
       FROM accounts a WHERE ${sa.sql} ORDER BY a.id`,
    )
    .all(monthFrom, monthTo, ...sa.params) as Omit<Overview['nearQuota'][number], 'percent'>[];
  const nearQuota = accountsUsage
    .map((a) => ({ ...a, percent: quotaPercent(a.unitsUsed, a.monthlyUnitQuota) }))
    .filter((a) => a.percent >= opts.nearQuotaPercent)
    .sort((a, b) => b.percent - a.percent || a.accountId - b.accountId);

  const first = new Date(Date.parse(`${today}T00:00:00Z`) - (opts.days - 1) * 86_400_000);
  const byDay = new Map(
    (
      sqlite
        .prepare(
          `SELECT day, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
           FROM usage_daily WHERE day >= ? AND day <= ? AND ${s.sql} GROUP BY day`,
        )
        .all(utcDay(first), today, ...s.params) as (UsageFigures & { day: string })[]
    ).map((r) => [r.day, r]),
  );
  const daily: Overview['daily'] = [];
  for (let day = utcDay(first), i = 0; i < opts.days; i++, day = nextDay(day)) {
    daily.push(byDay.get(day) ?? { day, requests: 0, units: 0, errors: 0 });
  }

  return {
    month: monthFrom.slice(0, 7),
    today: figures(sqlite, today, nextDay(today), scope),
    thisMonth,
    errorRate: thisMonth.requests > 0 ? thisMonth.errors / thisMonth.requests : null,
    p95LatencyMs: percentileLatencyMs(sqlite, 95, monthStart.getTime(), monthEnd.getTime(), scope),
    topOperations,
    nearQuota,
    daily,
  };
}
