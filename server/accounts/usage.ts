/**
 * Monthly usage and quota, read from the usage_daily roll-up (one row per account, UTC day and
 * operation). Calendar months are UTC.
 */
import { sql, type SQL } from 'drizzle-orm';
import type { Store } from '../db/store.js';

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

/** Units used by an account in the calendar month (UTC) containing `now`. */
export async function unitsUsedThisMonth(store: Store, accountId: number, now: Date): Promise<number> {
  const [row] = await store.rows<{ units: number | string }>(
    sql`SELECT COALESCE(SUM(units), 0) AS units FROM usage_daily
        WHERE account_id = ${accountId} AND day >= ${utcDay(monthStartUtc(now))} AND day < ${utcDay(nextMonthStartUtc(now))}`,
  );
  return Number(row?.units ?? 0);
}

/**
 * Appended to an ORDER BY on a text column: byte order, as SQLite sorts. A PostgreSQL database
 * made with a language locale would otherwise sort operation ids by its collation (which skips
 * punctuation such as "-" and ".").
 */
export function bytewise(store: Store): SQL {
  return store.dialect === 'postgres' ? sql` COLLATE "C"` : sql``;
}

type FiguresRow = { requests: number | string; units: number | string; errors: number | string };

export interface MonthUsage {
  month: string;
  quota: { limit: number; used: number; remaining: number; resetsAt: string };
  totals: { requests: number; units: number; errors: number };
  byOperation: { operation: string; requests: number; units: number; errors: number }[];
  byDay: { day: string; requests: number; units: number; errors: number }[];
}

/** The usage summary of the calendar month (UTC) containing `now`. */
export async function monthUsage(store: Store, accountId: number, now: Date): Promise<MonthUsage> {
  const from = utcDay(monthStartUtc(now));
  const to = utcDay(nextMonthStartUtc(now));
  const [account] = await store.rows<{ quota: number }>(
    sql`SELECT monthly_unit_quota AS quota FROM accounts WHERE id = ${accountId}`,
  );
  if (!account) throw new Error(`account ${accountId} does not exist`);
  // Sums are bigint (a string) on PostgreSQL: read as numbers.
  const figures = (r: FiguresRow) => ({
    requests: Number(r.requests),
    units: Number(r.units),
    errors: Number(r.errors),
  });
  const byOperation = (
    await store.rows<FiguresRow & { operation: string }>(
      sql`SELECT operation, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
          FROM usage_daily WHERE account_id = ${accountId} AND day >= ${from} AND day < ${to}
          GROUP BY operation ORDER BY operation${bytewise(store)}`,
    )
  ).map((r) => ({ operation: r.operation, ...figures(r) }));
  const byDay = (
    await store.rows<FiguresRow & { day: string }>(
      sql`SELECT day, SUM(requests) AS requests, SUM(units) AS units, SUM(errors) AS errors
          FROM usage_daily WHERE account_id = ${accountId} AND day >= ${from} AND day < ${to}
          GROUP BY day ORDER BY day`,
    )
  ).map((r) => ({ day: r.day, ...figures(r) }));
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
