/**
 * Console contracts: API keys (GET /console-api/keys?accountId=, POST /keys, POST /keys/:id/revoke,
 * POST /keys/:id/rotate). The secret appears only in the create and rotate responses, once.
 */
import { z } from 'zod';
import { KEY_SCOPES } from '../access.js';
import { IdNumberSchema, InstantSchema } from './accounts.js';

/** The scopes an API key can hold (the list itself is shared/access.ts KEY_SCOPES). */
export { KEY_SCOPES };
export const KeyScopeSchema = z.enum(KEY_SCOPES);

export const KeyIdParamsSchema = z.object({ id: IdNumberSchema });

export const KeyListQuerySchema = z.object({
  accountId: IdNumberSchema.optional().meta({ description: 'Only this account’s keys' }),
});

export const KeyStateSchema = z
  .enum(['active', 'expiring', 'expired', 'revoked'])
  .meta({ description: 'expiring: still valid but has an expiry (e.g. inside a rotation overlap window)' });

export const KeySchema = z
  .object({
    id: z.int(),
    publicId: z.string(),
    accountId: z.int(),
    accountName: z.string(),
    name: z.string(),
    prefix: z.string().meta({
      description:
        'Non-secret identifier of the key: for an issued key its format marker and public id (ebk1.<publicId>; a key of the first format, ebl_<kind>_ and the start of its public id); for a registered key of another format, its public id',
    }),
    scopes: z.array(KeyScopeSchema),
    rateLimitPerMinute: z.int(),
    createdAt: InstantSchema,
    expiresAt: InstantSchema.nullable(),
    revokedAt: InstantSchema.nullable(),
    lastUsedAt: InstantSchema.nullable().meta({ description: 'Granularity one minute' }),
    rotatedFromId: z.int().nullable(),
    state: KeyStateSchema,
  })
  .meta({ id: 'ConsoleKey' });
export type ConsoleKey = z.infer<typeof KeySchema>;

export const KeyListSchema = z.object({ items: z.array(KeySchema) }).meta({ id: 'ConsoleKeyList' });
export type ConsoleKeyList = z.infer<typeof KeyListSchema>;

export const KeyCreateSchema = z
  .object({
    accountId: z.int().min(1),
    name: z.string().trim().min(1).max(120),
    scopes: z.array(KeyScopeSchema).min(1).max(KEY_SCOPES.length),
    rateLimitPerMinute: z.int().min(1).max(100_000),
    expiresAt: InstantSchema.nullable().optional(),
  })
  .strict()
  .meta({ id: 'ConsoleKeyCreate' });
export type ConsoleKeyCreate = z.infer<typeof KeyCreateSchema>;

/** Longest rotation overlap: 30 days (as server/accounts/keys.ts rotateKey). */
export const MAX_OVERLAP_SECONDS = 30 * 86_400;

export const KeyRotateSchema = z
  .object({ overlapSeconds: z.int().min(0).max(MAX_OVERLAP_SECONDS) })
  .strict()
  .meta({ id: 'ConsoleKeyRotate' });
export type ConsoleKeyRotate = z.infer<typeof KeyRotateSchema>;

export const KeyWithSecretSchema = z
  .object({
    key: KeySchema,
    secret: z.string().meta({ description: 'The whole API key. Shown this once; it is not stored.' }),
    previous: KeySchema.optional().meta({ description: 'Rotate only: the old key with its new expiry' }),
  })
  .meta({ id: 'ConsoleKeyWithSecret' });
export type ConsoleKeyWithSecret = z.infer<typeof KeyWithSecretSchema>;

export const KeyResponseSchema = z.object({ key: KeySchema }).meta({ id: 'ConsoleKeyResponse' });
export type ConsoleKeyResponse = z.infer<typeof KeyResponseSchema>;
