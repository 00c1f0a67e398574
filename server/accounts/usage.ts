/**
 * Monthly usage and quota, read from the usage_daily roll-up (one row per account, UTC day and
 * operation). Calendar months are UTC.
 */
import type { Statement } from 'better-sqlite3';
import type { Sqlite } from '../db/client.js';

const DAY_MS = 86_400_000; // a UTC day in JavaScript time, which has no leap seconds

/**
 * The UTC day last asked for, as strings. Metering asks for the day and month of every request
 * (two toISOString calls each, which showed in profiles of the metered route); while the times
 * fall in the same day the strings are reused.
 */
let lastDay = { start: 0, end: 0, day: '', month: '' };
function dayStrings(at: Date): { day: string; month: string } {
  const t = at.getTime();
  if (t >= lastDay.start && t < lastDay.end) return lastDay;
  const iso = at.toISOString(); // throws RangeError for an invalid date, as before
  const start = t - (((t % DAY_MS) + DAY_MS) % DAY_MS);
  lastDay = { start, end: start + DAY_MS, day: iso.slice(0, 10), month: iso.slice(0, 7) };
  return lastDay;
}

/** 'YYYY-MM-DD' of a time, UTC. */
export function utcDay(at: Date): string {
  return dayStrings(at).day;
}

/** 'YYYY-MM' of a time, UTC. */
export function utcMonth(at: Date): string {
  return dayStrings(at).month;
}

export function monthStartUtc(at: Date): Date {
  return new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth(), 1));
}

export function nextMonthStartUtc(at: Date): Date {
  return new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth() + 1, 1));
}

/** The month-sum statement, prepared once per connection (it runs on every charged request). */
const monthSums = new WeakMap<Sqlite, Statement<[number, string, string], { units: number }>>();

/** Units used by an account in the calendar month (UTC) containing `now`. */
export function unitsUsedThisMonth(sqlite: Sqlite, accountId: number, now: Date): number {
  let stmt = monthSums.get(sqlite);
  if (!stmt) {
    stmt = sqlite.prepare<[number, string, string], { units: number }>(
      'SELECT COALESCE(SUM(units), 0) AS units FROM usage_daily WHERE account_id = ? AND day >= ? AND day < ?',
    );
    monthSums.set(sqlite, stmt);
  }
  const row = stmt.get(accountId, utcDay(monthStartUtc(now)), utcDay(nextMonthStartUtc(now)));
  return row?.units ?? 0;
}

export interface MonthUsage {
  month: string;
  quota: { limit: number; used: number; remaining: number; resetsAt: string };
  totals: { requests: number; units: number; errors: number };
  byOperation: { operation: string; requests: number; units: number; errors: number }[];
  byDay: { day: string; requests: number; units: number; errors: number }[];
}

/** The usage summary of the calendar month (UTC) containing `now`. */
export function monthUsage(sqlite: Sqlite, accountId: number, now: Date): MonthUsage {
  const from = utcDay(monthStartUtc(now));
  const to = utcDay(nextMonthStartUtc(now));
  const account = sqlite
    .prepare('SELECT monthly_unit_quota AS quota FROM accounts WHERE id = ?')
    .get(accountId) as { quota: number } | undefined;
  if (!account) throw new Error(`account ${accountId} does not exist`);
  const byOperation = sqlite
    .prepare(
      `SELECT operation, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
       FROM usage_daily WHERE account_id = ? AND day >= ? AND day < ? GROUP BY operation ORDER BY operation`,
    )
    .all(accountId, from, to) as MonthUsage['byOperation'];
  const byDay = sqlite
    .prepare(
      `SELECT day, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
       FROM usage_daily WHERE account_id = ? AND day >= ? AND day < ? GROUP BY day ORDER BY day`,
    )
    .all(accountId, from, to) as MonthUsage['byDay'];
  const totals = byOperation.reduce(
    (t, r) => ({ requests: t.requests + r.requests, units: t.units + r.units, errors: t.errors + r.errors }),
    { requests: 0, units: 0, errors: 0 },
  );
  return {
    month: utcMonth(now),
    quota: {
      limit: account.quota,
      used: totals.units,
      remaining: Math.max(0, account.quota - totals.units),
      resetsAt: nextMonthStartUtc(now).toISOString(),
    },
    totals,
    byOperation,
    byDay,
  };
}

/** Quota-notice thresholds in per cent of the monthly unit quota. */
export const QUOTA_THRESHOLDS = [80, 100] as const;
export type QuotaThreshold = (typeof QUOTA_THRESHOLDS)[number];

/** Thresholds reached: used/quota ≥ t/100, compared in integers (used·100 ≥ t·quota). */
export function thresholdsReached(used: number, quota: number): QuotaThreshold[] {
  if (quota <= 0) return [];
  return QUOTA_THRESHOLDS.filter((t) => used * 100 >= t * quota);
}
