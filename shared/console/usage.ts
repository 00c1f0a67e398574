/**
 * Console contracts: usage from the daily roll-up (GET /console-api/usage, /usage/export.csv).
 * Days are UTC calendar days; `to` is inclusive.
 */
import { z } from 'zod';
import { IdNumberSchema } from './accounts.js';

export const DaySchema = z.iso.date().meta({ description: 'UTC calendar day, YYYY-MM-DD' });

/** Longest range one usage query may cover. */
export const MAX_USAGE_DAYS = 400;

export const UsageQuerySchema = z.object({
  accountId: IdNumberSchema.optional(),
  from: DaySchema.optional().meta({ description: 'First day (default: first day of this month)' }),
  to: DaySchema.optional().meta({ description: 'Last day, inclusive (default: today)' }),
  groupBy: z.enum(['day', 'operation', 'account']).default('day'),
});
export type UsageQuery = z.infer<typeof UsageQuerySchema>;

export const UsageFiguresSchema = z.object({ requests: z.int(), units: z.int(), errors: z.int() });
export type UsageFigures = z.infer<typeof UsageFiguresSchema>;

export const UsageRowSchema = UsageFiguresSchema.extend({
  group: z.string().meta({ description: 'The day, the operation id, or the account id (as text)' }),
  label: z.string().meta({ description: 'For display: the day, operation id, or account name' }),
}).meta({ id: 'ConsoleUsageRow' });
export type UsageRow = z.infer<typeof UsageRowSchema>;

export const UsageReportSchema = z
  .object({
    from: DaySchema,
    to: DaySchema,
    groupBy: z.enum(['day', 'operation', 'account']),
    accountIds: z.array(z.int()).nullable().meta({ description: 'Accounts included; null = all' }),
    totals: UsageFiguresSchema,
    rows: z.array(UsageRowSchema),
  })
  .meta({ id: 'ConsoleUsageReport' });
export type UsageReport = z.infer<typeof UsageReportSchema>;

/** Columns of GET /usage/export.csv: one row per account, day and operation. */
export const USAGE_CSV_COLUMNS = [
  'day',
  'accountId',
  'accountName',
  'operation',
  'requests',
  'units',
  'errors',
] as const;
