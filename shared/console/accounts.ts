/**
 * Console contracts: customer accounts (GET/POST /console-api/accounts, GET/PATCH /accounts/:id).
 * Admins create and edit; billing users read. Shared by server and console (zod only).
 */
import { z } from 'zod';

/** A positive integer id in a path or query string ("12" → 12). */
export const IdNumberSchema = z.coerce.number().int().min(1).max(Number.MAX_SAFE_INTEGER);

export const AccountIdParamsSchema = z.object({ id: IdNumberSchema });

/** ISO 8601 instant, UTC (e.g. "2031-03-14T10:00:00.000Z"). */
export const InstantSchema = z.iso.datetime({ offset: true });

export const AccountSchema = z
  .object({
    id: z.int(),
    name: z.string(),
    plan: z.string().meta({ description: 'Name of a price plan (plans table)' }),
    monthlyUnitQuota: z.int().meta({ description: 'Units per calendar month (UTC)' }),
    billingEmail: z.string().nullable(),
    retainRequestBodies: z
      .boolean()
      .meta({ description: 'Keep redacted, truncated request and response bodies in the request log' }),
    createdAt: InstantSchema,
    unitsThisMonth: z.int().meta({ description: 'Units used in the current calendar month (UTC)' }),
    quotaUsedPercent: z.number().meta({ description: 'unitsThisMonth / monthlyUnitQuota × 100' }),
    keyCount: z.int().meta({ description: 'API keys neither revoked nor expired' }),
  })
  .meta({ id: 'ConsoleAccount' });
export type ConsoleAccount = z.infer<typeof AccountSchema>;

export const AccountListSchema = z
  .object({ items: z.array(AccountSchema) })
  .meta({ id: 'ConsoleAccountList' });
export type ConsoleAccountList = z.infer<typeof AccountListSchema>;

const name = z.string().trim().min(1).max(120);
const plan = z.string().trim().min(1).max(64);
const quota = z.int().min(0).max(1_000_000_000);
const billingEmail = z.email().max(254).nullable();

export const AccountCreateSchema = z
  .object({
    name,
    plan,
    monthlyUnitQuota: quota,
    billingEmail: billingEmail.optional(),
    retainRequestBodies: z.boolean().optional(),
  })
  .strict()
  .meta({ id: 'ConsoleAccountCreate' });
export type ConsoleAccountCreate = z.infer<typeof AccountCreateSchema>;

export const AccountPatchSchema = z
  .object({
    name: name.optional(),
    plan: plan.optional(),
    monthlyUnitQuota: quota.optional(),
    billingEmail: billingEmail.optional(),
    retainRequestBodies: z.boolean().optional(),
  })
  .strict()
  .refine((p) => Object.keys(p).length > 0, { error: 'give at least one field to change' })
  .meta({ id: 'ConsoleAccountPatch' });
export type ConsoleAccountPatch = z.infer<typeof AccountPatchSchema>;

/** An account's callback signing secret, shown once when it is made (POST /accounts/:id/signing-secret). */
export const SigningSecretSchema = z
  .object({
    accountId: z.int(),
    secret: z.string().meta({
      description:
        'The key of the HMAC-SHA256 signatures of job callbacks; shown only now (a new one replaces it and the old one stops signing)',
    }),
    createdAt: InstantSchema,
  })
  .meta({ id: 'SigningSecret' });
export type SigningSecret = z.infer<typeof SigningSecretSchema>;
