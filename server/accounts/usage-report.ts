/**
 * Usage reports for the console: totals and groupings from the usage_daily roll-up, the overview
 * figures (today, this month, error rate, p95 latency, top operations, accounts near quota, a
 * 30-day series) and the rows of the usage CSV export. Calendar days and months are UTC.
 *
 * `scope` limits every figure to some accounts (a developer's memberships); null means all.
 */
import { sql, type SQL } from 'drizzle-orm';
import type { Store } from '../db/store.js';
import { bytewise, monthStartUtc, nextMonthStartUtc, utcDay } from './usage.js';

export interface UsageFigures {
  requests: number;
  units: number;
  errors: number;
}

export type UsageGroupBy = 'day' | 'operation' | 'account';

/** The condition limiting rows to the scope's accounts (`column` is a fixed name, never input). */
function scopeClause(column: string, scope: readonly number[] | null): SQL {
  if (scope === null) return sql`1 = 1`;
  if (scope.length === 0) return sql`1 = 0`;
  return sql`${sql.raw(column)} IN (${sql.join(
    scope.map((id) => sql`${id}`),
    sql`, `,
  )})`;
}

/** Sums are bigint (a string) on PostgreSQL, counts too: read as numbers. */
type Raw<T> = { [K in keyof T]: T[K] extends number ? number | string : T[K] };
function figuresOf<T extends Raw<UsageFigures>>(r: T): Omit<T, keyof UsageFigures> & UsageFigures {
  return { ...r, requests: Number(r.requests), units: Number(r.units), errors: Number(r.errors) };
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

export async function percentileLatencyMs(
  store: Store,
  p: number,
  fromMs: number,
  toMs: number,
  scope: readonly number[] | null,
): Promise<number | null> {
  const where = sql`WHERE at >= ${store.instant(new Date(fromMs))} AND at < ${store.instant(new Date(toMs))}
    AND ${scopeClause('account_id', scope)}`;
  const [count] = await store.rows<{ n: number | string }>(
    sql`SELECT COUNT(*) AS n FROM usage_events ${where}`,
  );
  const n = Number(count?.n ?? 0);
  if (n === 0) return null;
  const [row] = await store.rows<{ v: number }>(
    sql`SELECT latency_ms AS v FROM usage_events ${where} ORDER BY latency_ms LIMIT 1 OFFSET ${nearestRank(p, n) - 1}`,
  );
  return Number(row!.v);
}

async function figures(
  store: Store,
  fromDay: string,
  toDayExclusive: string,
  scope: readonly number[] | null,
): Promise<UsageFigures> {
  const [row] = await store.rows<Raw<UsageFigures>>(
    sql`SELECT COALESCE(SUM(requests),0) AS requests, COALESCE(SUM(units),0) AS units, COALESCE(SUM(errors),0) AS errors
        FROM usage_daily WHERE day >= ${fromDay} AND day < ${toDayExclusive} AND ${scopeClause('account_id', scope)}`,
  );
  return figuresOf(row!);
}

export interface UsageReportRow extends UsageFigures {
  group: string;
  label: string;
}

/** Usage between two days (inclusive), grouped by day, operation or account. */
export async function usageReport(
  store: Store,
  input: { from: string; to: string; groupBy: UsageGroupBy },
  scope: readonly number[] | null,
): Promise<{ totals: UsageFigures; rows: UsageReportRow[] }> {
  const where = sql`WHERE d.day >= ${input.from} AND d.day < ${nextDay(input.to)} AND ${scopeClause('d.account_id', scope)}`;
  const sums = sql`SUM(d.requests) AS requests, SUM(d.units) AS units, SUM(d.errors) AS errors`;
  let raw: Raw<UsageReportRow>[];
  if (input.groupBy === 'account') {
    raw = await store.rows(
      sql`SELECT CAST(d.account_id AS TEXT) AS "group", a.name AS label, ${sums}
          FROM usage_daily d JOIN accounts a ON a.id = d.account_id ${where}
          GROUP BY d.account_id, a.name ORDER BY d.account_id`,
    );
  } else {
    const col = sql.raw(input.groupBy === 'day' ? 'd.day' : 'd.operation');
    raw = await store.rows(
      sql`SELECT ${col} AS "group", ${col} AS label, ${sums} FROM usage_daily d ${where}
          GROUP BY ${col} ORDER BY ${col}${bytewise(store)}`,
    );
  }
  const rows = raw.map(figuresOf);
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

/** Roll-up rows between two days (inclusive), at most `cap`, ordered by day, account, operation. */
export async function listUsageRows(
  store: Store,
  input: { from: string; to: string },
  scope: readonly number[] | null,
  cap: number,
): Promise<UsageCsvRow[]> {
  const rows = await store.rows<Raw<UsageCsvRow>>(
    sql`SELECT d.day AS day, d.account_id AS "accountId", a.name AS "accountName", d.operation AS operation,
          d.requests AS requests, d.units AS units, d.errors AS errors
        FROM usage_daily d JOIN accounts a ON a.id = d.account_id
        WHERE d.day >= ${input.from} AND d.day < ${nextDay(input.to)} AND ${scopeClause('d.account_id', scope)}
        ORDER BY d.day, d.account_id, d.operation${bytewise(store)} LIMIT ${cap}`,
  );
  return rows.map((r) => ({ ...figuresOf(r), accountId: Number(r.accountId) }));
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

export async function overview(
  store: Store,
  now: Date,
  scope: readonly number[] | null,
  opts: { nearQuotaPercent: number; days: number; topOperations: number },
): Promise<Overview> {
  const today = utcDay(now);
  const monthStart = monthStartUtc(now);
  const monthEnd = nextMonthStartUtc(now);
  const monthFrom = utcDay(monthStart);
  const monthTo = utcDay(monthEnd);
  const thisMonth = await figures(store, monthFrom, monthTo, scope);

  const topOperations = (
    await store.rows<Raw<Overview['topOperations'][number]>>(
      sql`SELECT operation, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
          FROM usage_daily WHERE day >= ${monthFrom} AND day < ${monthTo} AND ${scopeClause('account_id', scope)}
          GROUP BY operation ORDER BY requests DESC, operation${bytewise(store)} LIMIT ${opts.topOperations}`,
    )
  ).map(figuresOf);

  const accountsUsage = await store.rows<{
    accountId: number;
    accountName: string;
    monthlyUnitQuota: number;
    unitsUsed: number | string;
  }>(
    sql`SELECT a.id AS "accountId", a.name AS "accountName", a.monthly_unit_quota AS "monthlyUnitQuota",
          COALESCE((SELECT SUM(units) FROM usage_daily d
                    WHERE d.account_id = a.id AND d.day >= ${monthFrom} AND d.day < ${monthTo}), 0) AS "unitsUsed"
        FROM accounts a WHERE ${scopeClause('a.id', scope)} ORDER BY a.id`,
  );
  const nearQuota = accountsUsage
    .map((a) => {
      const unitsUsed = Number(a.unitsUsed);
      return { ...a, unitsUsed, percent: quotaPercent(unitsUsed, a.monthlyUnitQuota) };
    })
    .filter((a) => a.percent >= opts.nearQuotaPercent)
    .sort((a, b) => b.percent - a.percent || a.accountId - b.accountId);

  const first = new Date(Date.parse(`${today}T00:00:00Z`) - (opts.days - 1) * 86_400_000);
  const byDay = new Map(
    (
      await store.rows<Raw<UsageFigures & { day: string }>>(
        sql`SELECT day, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
            FROM usage_daily WHERE day >= ${utcDay(first)} AND day <= ${today} AND ${scopeClause('account_id', scope)}
            GROUP BY day`,
      )
    ).map((r) => [r.day, figuresOf(r)]),
  );
  const daily: Overview['daily'] = [];
  for (let day = utcDay(first), i = 0; i < opts.days; i++, day = nextDay(day)) {
    daily.push(byDay.get(day) ?? { day, requests: 0, units: 0, errors: 0 });
  }

  return {
    month: monthFrom.slice(0, 7),
    today: await figures(store, today, nextDay(today), scope),
    thisMonth,
    errorRate: thisMonth.requests > 0 ? thisMonth.errors / thisMonth.requests : null,
    p95LatencyMs: await percentileLatencyMs(store, 95, monthStart.getTime(), monthEnd.getTime(), scope),
    topOperations,
    nearQuota,
    daily,
  };
}
