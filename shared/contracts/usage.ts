/**
 * GET /v1/usage: the calling account's metered usage in the current calendar month (UTC) and
 * its quota. Units are Ebullio's billing units (each operation's cost is documented with it).
 */
import { z } from 'zod';

const countsSchema = z.object({
  requests: z.int().min(0).meta({ description: 'Authenticated requests metered' }),
  units: z.int().min(0).meta({ description: 'Billing units charged (requests answered below 400)' }),
  errors: z.int().min(0).meta({ description: 'Requests answered with a status of 400 or more' }),
});

export const UsageResponseSchema = z
  .object({
    month: z.string().meta({ description: 'Calendar month (UTC), YYYY-MM', example: '2026-12' }),
    quota: z.object({
      limit: z.int().min(0).meta({ description: 'Monthly unit quota of the account' }),
      used: z.int().min(0).meta({ description: 'Units used this month' }),
      remaining: z.int().min(0).meta({ description: 'Units left this month' }),
      resetsAt: z.string().meta({ description: 'When the quota resets (ISO 8601, UTC)' }),
    }),
    totals: countsSchema,
    byOperation: z.array(countsSchema.extend({ operation: z.string() })),
    byDay: z.array(countsSchema.extend({ day: z.string().meta({ description: 'UTC day, YYYY-MM-DD' }) })),
  })
  .meta({ id: 'UsageResponse' });
export type UsageResponse = z.infer<typeof UsageResponseSchema>;
