/**
 * Console users (admin only): list users and pending invitations, invite a user by e-mail (a
 * single-use link valid 72 h), change a user's role, deactivate or reactivate (deactivation
 * revokes every session at once), and set account memberships (the scope of a developer).
 * At least one active admin always remains (409 otherwise).
 */
import { and, eq, gt, inArray, isNull } from 'drizzle-orm';
import { IdParamsSchema, type UserSummary } from '../../shared/console/common.js';
import {
  InvitationCreatedSchema,
  InvitationCreateSchema,
  InvitationSummarySchema,
  UserListSchema,
  UserPatchSchema,
  type InvitationSummary,
} from '../../shared/console/users.js';
import { UserSummarySchema } from '../../shared/console/common.js';
import { consoleSettings } from '../config.js';
import { accountMembers, accounts, users, userTokens } from '../db/schema.js';
import type { AppDeps } from '../deps.js';
import { problem } from '../http/problem.js';
import { sendMail } from '../mail/send.js';
import { recordAudit } from '../accounts/audit.js';
import { accountIdsOf, revokeUserSessions } from './auth/session.js';
import { createUserToken, supersedeTokens } from './auth/user-tokens.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

type UserRow = typeof users.$inferSelect;

export function userSummary(row: UserRow, accountIds: number[]): UserSummary {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    active: row.active,
    accountIds,
    createdAt: row.createdAt.toISOString(),
    lockedUntil: row.lockedUntil ? row.lockedUntil.toISOString() : null,
  };
}

export function loadUserSummary(deps: AppDeps, userId: number): UserSummary | undefined {
  const row = deps.db.select().from(users).where(eq(users.id, userId)).get();
  return row ? userSummary(row, accountIdsOf(deps, row.id)) : undefined;
}

/** 422 naming each account id that does not exist. */
function checkAccountsExist(deps: AppDeps, ids: readonly number[], field: string): void {
  if (ids.length === 0) return;
  const found = new Set(
    deps.db
      .select({ id: accounts.id })
      .from(accounts)
      .where(inArray(accounts.id, [...ids]))
      .all()
      .map((r) => r.id),
  );
  const errors = ids.flatMap((id, i) =>
    found.has(id) ? [] : [{ field: `${field}[${i}]`, message: `no account with id ${id}`, value: id }],
  );
  if (errors.length > 0) throw problem('validation-failed', errors[0]!.message, { errors });
}

function activeAdminCount(deps: AppDeps): number {
  return deps.db
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.role, 'admin'), eq(users.active, true)))
    .all().length;
}

function invitationSummary(row: typeof userTokens.$inferSelect, invitedBy: string | null): InvitationSummary {
  return {
    id: row.id,
    email: row.email,
    role: row.role ?? 'developer',
    accountIds: row.accountIds ?? [],
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
    invitedBy,
  };
}

export function invitationText(link: string, role: string, expiresAt: Date): string {
  return [
    'Hello,',
    '',
    `you have been invited to the Ebullio console with the role "${role}".`,
    'Choose your name and password here:',
    '',
    link,
    '',
    `The link works once and expires at ${expiresAt.toISOString()} (UTC).`,
    'If you did not expect this invitation, ignore this message.',
  ].join('\n');
}

export const usersRouteModule: ConsoleRouteModule = {
  register(router) {
    consoleRoute(router, {
      method: 'get',
      path: '/users',
      roles: ['admin'],
      summary: 'Console users and pending invitations',
      response: UserListSchema,
      handler: ({ deps }) => {
        const rows = deps.db.select().from(users).orderBy(users.id).all();
        const members = deps.db.select().from(accountMembers).all();
        const items = rows.map((row) =>
          userSummary(
            row,
            members
              .filter((m) => m.userId === row.id)
              .map((m) => m.accountId)
              .sort((a, b) => a - b),
          ),
        );
        const emailById = new Map(rows.map((r) => [r.id, r.email]));
        const invitations = deps.db
          .select()
          .from(userTokens)
          .where(
            and(
              eq(userTokens.purpose, 'invitation'),
              isNull(userTokens.usedAt),
              gt(userTokens.expiresAt, deps.clock()),
            ),
          )
          .orderBy(userTokens.id)
          .all()
          .map((t) =>
            invitationSummary(t, t.createdByUserId ? (emailById.get(t.createdByUserId) ?? null) : null),
          );
        return { items, invitations };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/users/invitations',
      roles: ['admin'],
      summary: 'Invite a user by e-mail (single-use link, valid 72 hours)',
      request: { body: InvitationCreateSchema },
      response: InvitationCreatedSchema,
      status: 201,
      handler: async ({ deps, req, res, body, user }) => {
        const email = body.email.trim().toLowerCase();
        if (deps.db.select({ id: users.id }).from(users).where(eq(users.email, email)).get()) {
          throw problem('conflict', `A console user with the e-mail ${email} exists already.`);
        }
        checkAccountsExist(deps, body.accountIds, 'accountIds');
        const settings = consoleSettings(deps.config);
        supersedeTokens(deps, 'invitation', email);
        const { token, row } = createUserToken(deps, {
          purpose: 'invitation',
          email,
          ttlMs: settings.invitationTtlMs,
          role: body.role,
          accountIds: body.accountIds,
          createdByUserId: user.id,
        });
        const link = `${settings.publicUrl}/console/accept-invitation?token=${encodeURIComponent(token)}`;
        const mail = await sendMail(deps, {
          kind: 'invitation',
          to: email,
          subject: 'Your invitation to the Ebullio console',
          text: invitationText(link, body.role, row.expiresAt),
        });
        recordAudit(deps, req, res, {
          action: 'user.invite',
          targetType: 'invitation',
          targetId: row.id,
          detail: { email, role: body.role, accountIds: body.accountIds, mailStatus: mail.status },
        });
        return { invitation: invitationSummary(row, user.email), mailStatus: mail.status };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/users/invitations/:id/withdraw',
      roles: ['admin'],
      summary: 'Withdraw a pending invitation: its link stops working at once',
      request: { params: IdParamsSchema },
      response: InvitationSummarySchema,
      handler: ({ deps, req, res, params }) => {
        const now = deps.clock();
        const row = deps.db
          .select()
          .from(userTokens)
          .where(and(eq(userTokens.id, params.id), eq(userTokens.purpose, 'invitation')))
          .get();
        if (!row || row.usedAt !== null || row.expiresAt <= now) {
          throw problem('not-found', `No pending invitation with id ${params.id}.`);
        }
        // A used token is what the accept step refuses, so marking it used ends the link.
        deps.db.update(userTokens).set({ usedAt: now }).where(eq(userTokens.id, row.id)).run();
        const invitedBy = row.createdByUserId
          ? (deps.db.select({ email: users.email }).from(users).where(eq(users.id, row.createdByUserId)).get()
              ?.email ?? null)
          : null;
        recordAudit(deps, req, res, {
          action: 'user.invitation.withdraw',
          targetType: 'invitation',
          targetId: row.id,
          detail: { email: row.email, role: row.role },
        });
        return invitationSummary(row, invitedBy);
      },
    });

    consoleRoute(router, {
      method: 'patch',
      path: '/users/:id',
      roles: ['admin'],
      summary: "Change a user's role, activity or account memberships",
      description:
        'Deactivating a user revokes all of their console sessions at once. At least one active admin remains.',
      request: { params: IdParamsSchema, body: UserPatchSchema },
      response: UserSummarySchema,
      handler: ({ deps, req, res, params, body }) => {
        const row = deps.db.select().from(users).where(eq(users.id, params.id)).get();
        if (!row) throw problem('not-found', `No console user with id ${params.id}.`);
        const before = userSummary(row, accountIdsOf(deps, row.id));
        const losesAdmin =
          row.role === 'admin' &&
          row.active &&
          ((body.role !== undefined && body.role !== 'admin') || body.active === false);
        if (losesAdmin && activeAdminCount(deps) <= 1) {
          throw problem('conflict', 'This is the last active admin; make another user admin first.');
        }
        if (body.accountIds) checkAccountsExist(deps, body.accountIds, 'accountIds');
        deps.db.transaction((tx) => {
          const patch: Partial<UserRow> = {};
          if (body.role !== undefined) patch.role = body.role;
          if (body.active !== undefined) patch.active = body.active;
          if (Object.keys(patch).length > 0) tx.update(users).set(patch).where(eq(users.id, row.id)).run();
          if (body.accountIds) {
            tx.delete(accountMembers).where(eq(accountMembers.userId, row.id)).run();
            for (const accountId of new Set(body.accountIds)) {
              tx.insert(accountMembers).values({ userId: row.id, accountId }).run();
            }
          }
        });
        const revoked = body.active === false ? revokeUserSessions(deps, row.id) : 0;
        const after = loadUserSummary(deps, row.id)!;
        recordAudit(deps, req, res, {
          action: body.active === false && row.active ? 'user.deactivate' : 'user.update',
          targetType: 'user',
          targetId: row.id,
          detail: {
            email: row.email,
            before: { role: before.role, active: before.active, accountIds: before.accountIds },
            after: { role: after.role, active: after.active, accountIds: after.accountIds },
            sessionsRevoked: revoked,
          },
        });
        return after;
      },
    });
  },
};
