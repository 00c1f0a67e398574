/**
 * Console routes for API keys: GET /keys?accountId=, POST /keys, POST /keys/:id/revoke,
 * POST /keys/:id/rotate. Admins manage every account's keys; developers only those of accounts
 * they are members of (403 otherwise); billing users may list them.
 *
 * The secret is returned once, and only after the key's row is committed (createKey and rotateKey
 * resolve after their write, outside any longer transaction), so a secret the caller sees always works. The account's
 * billing e-mail, if set, is told about every new and revoked key (never the secret).
 */
import { desc, eq, inArray } from 'drizzle-orm';
import {
  KeyCreateSchema,
  KeyIdParamsSchema,
  KeyListQuerySchema,
  KeyListSchema,
  KeyResponseSchema,
  KeyRotateSchema,
  KeyWithSecretSchema,
  type ConsoleKey,
} from '../../shared/console/keys.js';
import type { Account } from '../accounts/accounts.js';
import { createKey, getKey, revokeKey, rotateKey, type ApiKeyView } from '../accounts/keys.js';
import { isScope } from '../accounts/operations.js';
import type { AppDeps } from '../deps.js';
import { problem } from '../http/problem.js';
import { sendMail } from '../mail/send.js';
import { assertAccountInScope, queryScope, requireAccount } from './accounts.js';
import { recordAudit } from '../accounts/audit.js';
import { ALL_ROLES, consoleRoute, type ConsoleRouteModule, type ConsoleUser } from './route.js';

export function keyState(key: Pick<ApiKeyView, 'revokedAt' | 'expiresAt'>, now: Date): ConsoleKey['state'] {
  if (key.revokedAt && key.revokedAt <= now) return 'revoked';
  if (key.expiresAt && key.expiresAt <= now) return 'expired';
  if (key.expiresAt) return 'expiring';
  return 'active';
}

export function keyView(key: ApiKeyView, accountName: string, now: Date): ConsoleKey {
  return {
    id: key.id,
    publicId: key.publicId,
    accountId: key.accountId,
    accountName,
    name: key.name,
    prefix: key.prefix,
    scopes: key.scopes,
    rateLimitPerMinute: key.rateLimitPerMinute,
    createdAt: key.createdAt.toISOString(),
    expiresAt: key.expiresAt?.toISOString() ?? null,
    revokedAt: key.revokedAt?.toISOString() ?? null,
    lastUsedAt: key.lastUsedAt?.toISOString() ?? null,
    rotatedFromId: key.rotatedFromId,
    state: keyState(key, now),
  };
}

/** The key, after checking it exists (404) and the user may manage its account (403). */
async function requireKey(
  deps: AppDeps,
  user: ConsoleUser,
  keyId: number,
): Promise<{ key: ApiKeyView; account: Account }> {
  const key = await getKey(deps.store, keyId);
  if (!key) throw problem('not-found', `There is no API key ${keyId}.`);
  assertAccountInScope(user, key.accountId);
  return { key, account: await requireAccount(deps.store, key.accountId) };
}

/** Tells the account's billing contact; a mail failure is logged (mail_log) but never fails the call. */
async function notify(
  deps: AppDeps,
  account: Account,
  kind: 'key-created' | 'key-revoked',
  subject: string,
  text: string,
): Promise<void> {
  if (!account.billingEmail) return;
  try {
    await sendMail(deps, { kind, to: account.billingEmail, subject, text });
  } catch (err) {
    console.error(`[mail] ${kind} to account ${account.id} failed:`, err);
  }
}

function describeKey(key: ApiKeyView): string {
  return `"${key.name}" (${key.prefix}…, scopes ${key.scopes.join(', ')}, ${key.rateLimitPerMinute} requests per minute)`;
}

export const keyRoutes: ConsoleRouteModule = {
  register(router, deps) {
    consoleRoute(router, {
      method: 'get',
      path: '/keys',
      roles: ALL_ROLES,
      summary: 'List API keys (a developer sees only the keys of their accounts)',
      request: { query: KeyListQuerySchema },
      response: KeyListSchema,
      handler: async ({ query, user }) => {
        const scope = queryScope(user, query.accountId);
        if (scope !== null && scope.length === 0) return { items: [] };
        const { accounts, apiKeys } = deps.store.t;
        const rows = await deps.store.db
          .select({ key: apiKeys, accountName: accounts.name })
          .from(apiKeys)
          .innerJoin(accounts, eq(accounts.id, apiKeys.accountId))
          .where(scope === null ? undefined : inArray(apiKeys.accountId, [...scope]))
          .orderBy(desc(apiKeys.id));
        const now = deps.clock();
        return {
          items: rows.map(({ key, accountName }) => {
            const { keyHash: _hash, ...rest } = key;
            return keyView({ ...rest, scopes: rest.scopes.filter(isScope) }, accountName, now);
          }),
        };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/keys',
      roles: ['admin', 'developer'],
      summary: 'Create an API key; the secret is in this response only',
      request: { body: KeyCreateSchema },
      response: KeyWithSecretSchema,
      status: 201,
      handler: async ({ req, res, body, user }) => {
        assertAccountInScope(user, body.accountId);
        const account = await requireAccount(deps.store, body.accountId);
        const now = deps.clock();
        const expiresAt = body.expiresAt ? new Date(body.expiresAt) : null;
        if (expiresAt && expiresAt <= now) {
          throw problem('validation-failed', 'The expiry must lie in the future.', {
            errors: [{ field: 'expiresAt', message: 'must be after now', value: body.expiresAt }],
          });
        }
        // Committed before anything is sent: the secret shown below already works.
        const { key, token } = await createKey(deps.store, deps.config.secret, {
          accountId: account.id,
          name: body.name,
          scopes: body.scopes,
          rateLimitPerMinute: body.rateLimitPerMinute,
          expiresAt,
          now,
        });
        await recordAudit(deps, req, res, {
          action: 'key.create',
          targetType: 'api-key',
          targetId: key.id,
          detail: { accountId: account.id, name: key.name, prefix: key.prefix, scopes: key.scopes },
        });
        await notify(
          deps,
          account,
          'key-created',
          `Ebullio: new API key for ${account.name}`,
          `A new API key ${describeKey(key)} was created for the account "${account.name}" by ${user.email}.\n` +
            'If you did not expect this, revoke it in the Ebullio console.',
        );
        res.location(`/console-api/keys/${key.id}`);
        return { key: keyView(key, account.name, now), secret: token };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/keys/:id/revoke',
      roles: ['admin', 'developer'],
      summary: 'Revoke an API key at once (idempotent)',
      request: { params: KeyIdParamsSchema },
      response: KeyResponseSchema,
      handler: async ({ req, res, params, user }) => {
        const { key: before, account } = await requireKey(deps, user, params.id);
        const now = deps.clock();
        const key = (await revokeKey(deps.store, params.id, now))!;
        if (!before.revokedAt) {
          await recordAudit(deps, req, res, {
            action: 'key.revoke',
            targetType: 'api-key',
            targetId: key.id,
            detail: { accountId: account.id, prefix: key.prefix },
          });
          await notify(
            deps,
            account,
            'key-revoked',
            `Ebullio: API key revoked for ${account.name}`,
            `The API key ${describeKey(key)} of the account "${account.name}" was revoked by ${user.email}. ` +
              'Requests with it are refused from now on.',
          );
        }
        return { key: keyView(key, account.name, now) };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/keys/:id/rotate',
      roles: ['admin', 'developer'],
      summary: 'Rotate an API key: a successor now, the old key valid for an overlap window',
      request: { params: KeyIdParamsSchema, body: KeyRotateSchema },
      response: KeyWithSecretSchema,
      status: 201,
      handler: async ({ req, res, params, body, user }) => {
        const { key: old, account } = await requireKey(deps, user, params.id);
        const now = deps.clock();
        const state = keyState(old, now);
        if (state === 'revoked' || state === 'expired') {
          throw problem('conflict', `API key ${old.id} is ${state}; only a valid key can be rotated.`);
        }
        const { key, token, previous } = await rotateKey(deps.store, deps.config.secret, old.id, {
          now,
          overlapSeconds: body.overlapSeconds,
        });
        await recordAudit(deps, req, res, {
          action: 'key.rotate',
          targetType: 'api-key',
          targetId: old.id,
          detail: {
            accountId: account.id,
            successorId: key.id,
            overlapSeconds: body.overlapSeconds,
            previousExpiresAt: previous.expiresAt?.toISOString() ?? null,
          },
        });
        await notify(
          deps,
          account,
          'key-created',
          `Ebullio: API key rotated for ${account.name}`,
          `The API key "${old.name}" (${old.prefix}…) of the account "${account.name}" was rotated by ${user.email}. ` +
            `The new key is ${describeKey(key)}; the old one stops working at ${previous.expiresAt?.toISOString() ?? 'once'}.`,
        );
        res.location(`/console-api/keys/${key.id}`);
        return {
          key: keyView(key, account.name, now),
          secret: token,
          previous: keyView(previous, account.name, now),
        };
      },
    });
  },
};
