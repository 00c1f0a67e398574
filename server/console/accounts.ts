/**
 * Console routes for customer accounts: GET/POST /accounts, GET/PATCH /accounts/:id.
 * Admins create and edit; billing users read. Every mutation is audited.
 *
 * Also the scope helpers the other data routes share: a developer sees only the accounts they
 * are a member of (res.locals.user.accountIds); admins and billing users see all of them.
 */
import { eq, sql } from 'drizzle-orm';
import {
  AccountCreateSchema,
  AccountIdParamsSchema,
  AccountListSchema,
  AccountPatchSchema,
  AccountSchema,
  SigningSecretSchema,
  type ConsoleAccount,
} from '../../shared/console/accounts.js';
import {
  createAccount,
  getAccount,
  listAccounts,
  updateAccount,
  type Account,
} from '../accounts/accounts.js';
import { monthStartUtc, nextMonthStartUtc, utcDay } from '../accounts/usage.js';
import { quotaPercent } from '../accounts/usage-report.js';
import type { Store } from '../db/store.js';
import type { AppDeps } from '../deps.js';
import { problem } from '../http/problem.js';
import { recordAudit } from '../accounts/audit.js';
import { rotateSigningSecret } from '../accounts/signing-secrets.js';
import { consoleRoute, type ConsoleRouteModule, type ConsoleUser } from './route.js';

/** The accounts a user may see: null = all (admin, billing), else the memberships (developer). */
export function scopeOf(user: ConsoleUser): readonly number[] | null {
  return user.role === 'developer' ? user.accountIds : null;
}

/** 403 unless the user may see this account. */
export function assertAccountInScope(user: ConsoleUser, accountId: number): void {
  const scope = scopeOf(user);
  if (scope !== null && !scope.includes(accountId)) {
    throw problem('forbidden', `You are not a member of account ${accountId}.`);
  }
}

/**
 * The scope of a query with an optional accountId filter: just that account (after checking
 * the user may see it), or everything the user may see.
 */
export function queryScope(user: ConsoleUser, accountId: number | undefined): readonly number[] | null {
  if (accountId === undefined) return scopeOf(user);
  assertAccountInScope(user, accountId);
  return [accountId];
}

/** 404 unless the account exists. */
export async function requireAccount(store: Store, accountId: number): Promise<Account> {
  const account = await getAccount(store, accountId);
  if (!account) throw problem('not-found', `There is no account ${accountId}.`);
  return account;
}

interface AccountStats {
  id: number;
  units: number;
  keys: number;
}

async function stats(
  store: Store,
  now: Date,
  ids: readonly number[] | null,
): Promise<Map<number, AccountStats>> {
  if (ids !== null && ids.length === 0) return new Map();
  const where =
    ids === null
      ? sql``
      : sql`WHERE a.id IN (${sql.join(
          ids.map((id) => sql`${id}`),
          sql`, `,
        )})`;
  // count and sum are bigint on PostgreSQL (strings through node-postgres): read with Number.
  const rows = await store.rows<{ id: number | string; units: number | string; keys: number | string }>(
    sql`SELECT a.id AS id,
         COALESCE((SELECT SUM(units) FROM usage_daily d WHERE d.account_id = a.id
            AND d.day >= ${utcDay(monthStartUtc(now))} AND d.day < ${utcDay(nextMonthStartUtc(now))}), 0) AS units,
         (SELECT COUNT(*) FROM api_keys k WHERE k.account_id = a.id AND k.revoked_at IS NULL
            AND (k.expires_at IS NULL OR k.expires_at > ${store.instant(now)})) AS keys
       FROM accounts a ${where}`,
  );
  return new Map(
    rows.map((r) => [Number(r.id), { id: Number(r.id), units: Number(r.units), keys: Number(r.keys) }]),
  );
}

function toView(account: Account, s: AccountStats | undefined): ConsoleAccount {
  const units = s?.units ?? 0;
  return {
    id: account.id,
    name: account.name,
    plan: account.plan,
    monthlyUnitQuota: account.monthlyUnitQuota,
    billingEmail: account.billingEmail,
    retainRequestBodies: account.retainRequestBodies,
    createdAt: account.createdAt.toISOString(),
    unitsThisMonth: units,
    quotaUsedPercent: quotaPercent(units, account.monthlyUnitQuota),
    keyCount: s?.keys ?? 0,
  };
}

export async function accountView(deps: AppDeps, account: Account): Promise<ConsoleAccount> {
  return toView(account, (await stats(deps.store, deps.clock(), [account.id])).get(account.id));
}

/** 422 unless `plan` names a row of the plans table (the billing module owns that table). */
async function assertPlanExists(store: Store, plan: string): Promise<void> {
  const { plans } = store.t;
  const [found] = await store.db
    .select({ name: plans.name })
    .from(plans)
    .where(eq(plans.name, plan))
    .limit(1);
  if (found) return;
  const known = (await store.db.select({ name: plans.name }).from(plans).orderBy(plans.name)).map(
    (p) => p.name,
  );
  throw problem('validation-failed', `There is no plan "${plan}".`, {
    errors: [
      {
        field: 'plan',
        message: known.length > 0 ? `must be one of: ${known.join(', ')}` : 'no plans are defined yet',
        value: plan,
      },
    ],
  });
}

export const accountRoutes: ConsoleRouteModule = {
  register(router, deps) {
    consoleRoute(router, {
      method: 'get',
      path: '/accounts',
      roles: ['admin', 'billing'],
      summary: 'List the customer accounts with this month’s units and active key count',
      response: AccountListSchema,
      handler: async () => {
        const rows = await listAccounts(deps.store);
        const s = await stats(deps.store, deps.clock(), null);
        return { items: rows.map((a) => toView(a, s.get(a.id))) };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/accounts',
      roles: ['admin'],
      summary: 'Create a customer account',
      request: { body: AccountCreateSchema },
      response: AccountSchema,
      status: 201,
      handler: async ({ req, res, body }) => {
        await assertPlanExists(deps.store, body.plan);
        const account = await createAccount(deps.store, {
          name: body.name,
          plan: body.plan,
          monthlyUnitQuota: body.monthlyUnitQuota,
          billingEmail: body.billingEmail ?? null,
          retainRequestBodies: body.retainRequestBodies ?? false,
          now: deps.clock(),
        });
        await recordAudit(deps, req, res, {
          action: 'account.create',
          targetType: 'account',
          targetId: account.id,
          detail: { ...body },
        });
        res.location(`/console-api/accounts/${account.id}`);
        return await accountView(deps, account);
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/accounts/:id',
      roles: ['admin', 'billing'],
      summary: 'One customer account',
      request: { params: AccountIdParamsSchema },
      response: AccountSchema,
      handler: async ({ params }) => accountView(deps, await requireAccount(deps.store, params.id)),
    });

    consoleRoute(router, {
      method: 'patch',
      path: '/accounts/:id',
      roles: ['admin'],
      summary: 'Change an account’s name, plan, quota, billing e-mail or body retention',
      request: { params: AccountIdParamsSchema, body: AccountPatchSchema },
      response: AccountSchema,
      handler: async ({ req, res, params, body }) => {
        const before = await requireAccount(deps.store, params.id);
        if (body.plan !== undefined) await assertPlanExists(deps.store, body.plan);
        const after = (await updateAccount(deps.store, params.id, body))!;
        const changes: Record<string, { from: unknown; to: unknown }> = {};
        for (const key of Object.keys(body) as (keyof typeof body)[]) {
          if (before[key] !== after[key]) changes[key] = { from: before[key], to: after[key] };
        }
        await recordAudit(deps, req, res, {
          action: 'account.update',
          targetType: 'account',
          targetId: params.id,
          detail: { changes },
        });
        return await accountView(deps, after);
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/accounts/:id/signing-secret',
      roles: ['admin', 'developer'],
      summary:
        'Create or rotate the account’s job-callback signing secret (shown once; the previous one stops signing)',
      request: { params: AccountIdParamsSchema },
      response: SigningSecretSchema,
      status: 201,
      handler: async ({ req, res, params, user }) => {
        assertAccountInScope(user, params.id);
        await requireAccount(deps.store, params.id);
        const made = await rotateSigningSecret(deps.store, deps.config.secret, params.id, deps.clock());
        await recordAudit(deps, req, res, {
          action: 'account.signing-secret.rotate',
          targetType: 'account',
          targetId: params.id,
        });
        return { accountId: params.id, secret: made.secret, createdAt: made.createdAt.toISOString() };
      },
    });
  },
};
