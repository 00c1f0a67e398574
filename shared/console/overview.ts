/**
 * Console contract: the overview (GET /console-api/overview). Developers see only the accounts
 * they are members of; admins and billing users see all (or one, with accountId).
 */
import { z } from 'zod';
import { IdNumberSchema, InstantSchema } from './accounts.js';
import { DaySchema, UsageFiguresSchema } from './usage.js';

export const OverviewQuerySchema = z.object({ accountId: IdNumberSchema.optional() });

/** Accounts at or above this share of their monthly quota are listed as near quota. */
export const NEAR_QUOTA_PERCENT = 80;

export const OverviewSchema = z
  .object({
    generatedAt: InstantSchema,
    month: z.string().meta({ description: 'YYYY-MM (UTC)' }),
    today: UsageFiguresSchema,
    thisMonth: UsageFiguresSchema,
    errorRate: z
      .number()
      .nullable()
      .meta({ description: 'Share of this month’s requests with status ≥ 400 (0–1); null without requests' }),
    p95LatencyMs: z.number().nullable().meta({
      description: '95th percentile latency this month, nearest-rank method; null without requests',
    }),
    topOperations: z.array(UsageFiguresSchema.extend({ operation: z.string() })),
    nearQuota: z.array(
      z.object({
        accountId: z.int(),
        accountName: z.string(),
        unitsUsed: z.int(),
        monthlyUnitQuota: z.int(),
        percent: z.number(),
      }),
    ),
    daily: z
      .array(UsageFiguresSchema.extend({ day: DaySchema }))
      .meta({ description: 'The last 30 UTC days including today, oldest first, zero-filled' }),
  })
  .meta({ id: 'ConsoleOverview' });
export type ConsoleOverview = z.infer<typeof OverviewSchema>;
