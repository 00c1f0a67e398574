/**
 * Console API contracts for billing: price plans, monthly statements, their line items and the
 * provider invoice they become when finalized.
 *
 * Shared by the server and the console (zod only, no server imports). Money is always an integer
 * in the currency's minor unit (cents for EUR); months are calendar months in UTC, 'YYYY-MM'.
 *
 * The statement rule (server/billing/statement.ts implements it):
 *   overageUnits = max(0, units − includedUnits)
 *   overageBlocks = ceil(overageUnits / 1000)      — every started block of 1000 units is billed
 *   amountMinor = monthlyFeeMinor + overageBlocks × pricePer1000UnitsMinor
 *
 * Roles: admin and billing may use every route here; developer may use none (403).
 */
import { z } from 'zod';

/** 'YYYY-MM', a calendar month in UTC. */
export const BillingMonth = z
  .string()
  .regex(/^\d{4}-(0[1-9]|1[0-2])$/, { error: 'Expected a month as YYYY-MM (UTC), e.g. 2031-03.' })
  .meta({ id: 'BillingMonth', description: 'Calendar month in UTC, YYYY-MM.', example: '2031-03' });
export type BillingMonth = z.infer<typeof BillingMonth>;

/** Integer amount of money in the currency's minor unit (e.g. cents). */
const MinorAmount = z
  .int()
  .min(0)
  .meta({ description: "Integer amount in the currency's minor unit (cents)." });

/** ISO 4217 currency code, lower case as the payment provider writes it. */
const Currency = z
  .string()
  .regex(/^[a-z]{3}$/)
  .meta({ description: 'ISO 4217 currency code, lower case (e.g. "eur").' });

const IsoTime = z.string().meta({ description: 'ISO 8601 time, UTC.', example: '2031-04-01T00:00:00.000Z' });

// ---------------------------------------------------------------------------------------------
// Plans

export const Plan = z
  .object({
    name: z.string().meta({ description: 'Plan key stored on the account (accounts.plan).' }),
    displayName: z.string(),
    includedUnits: z.int().min(0).meta({ description: 'Units included in the monthly fee.' }),
    monthlyFeeMinor: MinorAmount,
    pricePer1000UnitsMinor: MinorAmount.meta({
      description: 'Price of each started block of 1000 units beyond the included units (minor unit).',
    }),
    currency: Currency,
  })
  .meta({ id: 'ConsolePlan', description: 'A price plan.' });
export type Plan = z.infer<typeof Plan>;

/** GET /console-api/plans */
export const PlansResponse = z.object({ items: z.array(Plan) }).meta({ id: 'ConsolePlansResponse' });
export type PlansResponse = z.infer<typeof PlansResponse>;

// ---------------------------------------------------------------------------------------------
// Statements

export const StatementStatus = z.enum(['draft', 'finalized', 'paid', 'void']).meta({
  id: 'StatementStatus',
  description:
    'draft: recomputed by each generate run; finalized: frozen, a provider invoice exists; paid: the provider reported payment; void: cancelled.',
});
export type StatementStatus = z.infer<typeof StatementStatus>;

export const Statement = z
  .object({
    id: z.int(),
    accountId: z.int(),
    accountName: z.string(),
    month: BillingMonth,
    planName: z.string(),
    planDisplayName: z.string().nullable().meta({ description: 'Null if the plan no longer exists.' }),
    units: z.int().min(0).meta({ description: 'Units metered in the month (usage roll-up).' }),
    includedUnits: z.int().min(0),
    overageUnits: z.int().min(0).meta({ description: 'max(0, units − includedUnits)' }),
    overageBlocks: z.int().min(0).meta({ description: 'ceil(overageUnits / 1000): started blocks billed' }),
    amountMinor: MinorAmount,
    currency: Currency,
    status: StatementStatus,
    providerInvoiceId: z.string().nullable(),
    createdAt: IsoTime,
    finalizedAt: IsoTime.nullable(),
    paidAt: IsoTime.nullable(),
  })
  .meta({ id: 'ConsoleStatement', description: "One account's statement for one month." });
export type Statement = z.infer<typeof Statement>;

export const StatementLineItem = z
  .object({
    code: z.enum(['monthly-fee', 'overage']),
    description: z.string(),
    quantity: z.int().min(0),
    unitAmountMinor: MinorAmount,
    amountMinor: MinorAmount,
  })
  .meta({ id: 'ConsoleStatementLineItem' });
export type StatementLineItem = z.infer<typeof StatementLineItem>;

export const StatementDetail = Statement.extend({
  billingEmail: z.string().nullable(),
  monthlyFeeMinor: MinorAmount,
  pricePer1000UnitsMinor: MinorAmount,
  lineItems: z.array(StatementLineItem).meta({
    description:
      'The fee line (if the plan has a fee) and the overage line (if any); they sum to amountMinor.',
  }),
}).meta({ id: 'ConsoleStatementDetail' });
export type StatementDetail = z.infer<typeof StatementDetail>;

/** GET /console-api/statements?month&accountId&status */
export const StatementsQuery = z.object({
  month: BillingMonth.optional(),
  accountId: z.coerce.number().int().positive().optional(),
  status: StatementStatus.optional(),
});
export type StatementsQuery = z.infer<typeof StatementsQuery>;

export const StatementsResponse = z
  .object({ items: z.array(Statement) })
  .meta({ id: 'ConsoleStatementsResponse' });
export type StatementsResponse = z.infer<typeof StatementsResponse>;

export const StatementIdParams = z.object({ id: z.coerce.number().int().positive() });

/** POST /console-api/statements/generate */
export const GenerateStatementsRequest = z
  .object({ month: BillingMonth })
  .strict()
  .meta({ id: 'ConsoleGenerateStatementsRequest' });
export type GenerateStatementsRequest = z.infer<typeof GenerateStatementsRequest>;

export const GenerateStatementsResponse = z
  .object({
    month: BillingMonth,
    monthComplete: z.boolean().meta({
      description: 'False while the month is still running: the drafts will change with further usage.',
    }),
    created: z.int().min(0),
    refreshed: z.int().min(0).meta({ description: 'Existing drafts recomputed.' }),
    frozen: z.int().min(0).meta({ description: 'Finalized, paid or void statements left unchanged.' }),
    skipped: z
      .array(z.object({ accountId: z.int(), accountName: z.string(), reason: z.string() }))
      .meta({ description: 'Accounts without a statement, e.g. whose plan does not exist.' }),
    items: z.array(Statement),
  })
  .meta({ id: 'ConsoleGenerateStatementsResponse' });
export type GenerateStatementsResponse = z.infer<typeof GenerateStatementsResponse>;

/** POST /console-api/statements/:id/finalize → the finalized statement and where its mail went. */
export const FinalizeStatementResponse = z
  .object({
    statement: StatementDetail,
    mailedTo: z.string().nullable().meta({
      description:
        'Where the statement-ready e-mail went; null if the account has no billing e-mail or the mail failed (see the mail log).',
    }),
  })
  .meta({ id: 'ConsoleFinalizeStatementResponse' });
export type FinalizeStatementResponse = z.infer<typeof FinalizeStatementResponse>;

/** Columns of GET /console-api/statements/:id/export.csv (one row per line item), in order. */
export const statementCsvColumns = [
  'statement_id',
  'account_id',
  'account_name',
  'month',
  'status',
  'line',
  'description',
  'quantity',
  'unit_amount_minor',
  'amount_minor',
  'currency',
] as const;
