/**
 * Console users: list users and pending invitations, invite a user by e-mail (a single-use link),
 * withdraw an invitation, accept one (creates the user), and change a user's role, activity or
 * account memberships (deactivation revokes every session at once). At least one active admin
 * always remains.
 *
 * Refusals are {@link AccountsError}s; a full password-hashing queue is HashingBusyError.
 */
import { and, eq, gt, inArray, isNull, sql } from 'drizzle-orm';
import type { UserSummary } from '../../shared/console/common.js';
import type { InvitationSummary } from '../../shared/console/users.js';
import { consoleSettings } from '../config.js';
import type { users } from '../db/schema.js';
import type { Store } from '../db/store.js';
import type { AppDeps } from '../deps.js';
import { sendMail, type MailResult } from '../mail/send.js';
import { accountIdsOf, type Role } from './accounts.js';
import { AccountsError } from './errors.js';
import { hashPassword } from './passwords.js';
import { revokeUserSessions } from './sessions.js';
import {
  consumeToken,
  createUserToken,
  findValidToken,
  supersedeTokens,
  type UserToken,
} from './user-tokens.js';

export type UserRow = typeof users.$inferSelect;

/** Trimmed and lower-cased: the one form e-mails are stored and looked up in. */
export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

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

export async function loadUserSummary(deps: AppDeps, userId: number): Promise<UserSummary | undefined> {
  const row = await findUserRow(deps, userId);
  return row ? userSummary(row, await accountIdsOf(deps.store, row.id)) : undefined;
}

/** The user row with this id (password hash included: for the services only). */
export async function findUserRow(deps: AppDeps, userId: number): Promise<UserRow | undefined> {
  const { users } = deps.store.t;
  const [row] = await deps.store.db.select().from(users).where(eq(users.id, userId)).limit(1);
  return row;
}

/** The user row with this (normalised) e-mail. */
export async function findUserRowByEmail(deps: AppDeps, email: string): Promise<UserRow | undefined> {
  const { users } = deps.store.t;
  const [row] = await deps.store.db.select().from(users).where(eq(users.email, email)).limit(1);
  return row;
}

async function refuseExistingEmail(deps: AppDeps, email: string): Promise<void> {
  const { users } = deps.store.t;
  const [row] = await deps.store.db
    .select({ id: users.id })
    .from(users)
    .where(eq(users.email, email))
    .limit(1);
  if (row) {
    throw new AccountsError('conflict', `A console user with the e-mail ${email} exists already.`);
  }
}

/** Refuses (validation-failed) naming each account id that does not exist. */
async function checkAccountsExist(deps: AppDeps, ids: readonly number[], field: string): Promise<void> {
  if (ids.length === 0) return;
  const { accounts } = deps.store.t;
  const rows = await deps.store.db
    .select({ id: accounts.id })
    .from(accounts)
    .where(inArray(accounts.id, [...ids]));
  const found = new Set(rows.map((r) => r.id));
  const errors = ids.flatMap((id, i) =>
    found.has(id) ? [] : [{ field: `${field}[${i}]`, message: `no account with id ${id}`, value: id }],
  );
  if (errors.length > 0) throw new AccountsError('validation-failed', errors[0]!.message, errors);
}

/**
 * Active admins, counted inside the transaction that may remove one: on PostgreSQL their rows are
 * locked (FOR UPDATE), so two admins demoting each other at once are decided one after the other
 * and the second sees the first's change; SQLite's write transaction excludes every other anyway.
 */
async function activeAdminCount(tx: Store): Promise<number> {
  const rows = await tx.rows<{ id: number }>(
    sql`SELECT id FROM users WHERE role = 'admin' AND active = ${tx.flag(true)}${tx.dialect === 'postgres' ? sql` FOR UPDATE` : sql``}`,
  );
  return rows.length;
}

function invitationSummary(row: UserToken, invitedBy: string | null): InvitationSummary {
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

/** Every user (with their accounts) and every pending invitation, oldest first. */
export async function listUsers(
  deps: AppDeps,
): Promise<{ items: UserSummary[]; invitations: InvitationSummary[] }> {
  const { accountMembers, users, userTokens } = deps.store.t;
  const rows = await deps.store.db.select().from(users).orderBy(users.id);
  const members = await deps.store.db.select().from(accountMembers);
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
  const tokens = await deps.store.db
    .select()
    .from(userTokens)
    .where(
      and(
        eq(userTokens.purpose, 'invitation'),
        isNull(userTokens.usedAt),
        gt(userTokens.expiresAt, deps.clock()),
      ),
    )
    .orderBy(userTokens.id);
  const invitations = tokens.map((t) =>
    invitationSummary(t, t.createdByUserId ? (emailById.get(t.createdByUserId) ?? null) : null),
  );
  return { items, invitations };
}

/**
 * Invites a user: supersedes earlier invitations of the e-mail, stores a new single-use token and
 * mails its link. Refuses an e-mail that is a user already (conflict) and unknown account ids.
 */
export async function inviteUser(
  deps: AppDeps,
  input: { email: string; role: Role; accountIds: number[]; invitedBy: { id: number; email: string } },
): Promise<{ email: string; invitation: InvitationSummary; mailStatus: MailResult['status'] }> {
  const email = normaliseEmail(input.email);
  await refuseExistingEmail(deps, email);
  await checkAccountsExist(deps, input.accountIds, 'accountIds');
  const settings = consoleSettings(deps.config);
  await supersedeTokens(deps, 'invitation', email);
  const { token, row } = await createUserToken(deps, {
    purpose: 'invitation',
    email,
    ttlMs: settings.invitationTtlMs,
    role: input.role,
    accountIds: input.accountIds,
    createdByUserId: input.invitedBy.id,
  });
  const link = `${settings.publicUrl}/console/accept-invitation?token=${encodeURIComponent(token)}`;
  const mail = await sendMail(deps, {
    kind: 'invitation',
    to: email,
    subject: 'Your invitation to the Ebullio console',
    text: invitationText(link, input.role, row.expiresAt),
  });
  return { email, invitation: invitationSummary(row, input.invitedBy.email), mailStatus: mail.status };
}

/** Ends a pending invitation's link at once; not-found unless it is pending. */
export async function withdrawInvitation(
  deps: AppDeps,
  invitationId: number,
): Promise<{ invitation: InvitationSummary; token: UserToken }> {
  const now = deps.clock();
  const { users, userTokens } = deps.store.t;
  const [row] = await deps.store.db
    .select()
    .from(userTokens)
    .where(and(eq(userTokens.id, invitationId), eq(userTokens.purpose, 'invitation')))
    .limit(1);
  if (!row || row.usedAt !== null || row.expiresAt <= now) {
    throw new AccountsError('not-found', `No pending invitation with id ${invitationId}.`);
  }
  // A used token is what the accept step refuses, so marking it used ends the link.
  await deps.store.db.update(userTokens).set({ usedAt: now }).where(eq(userTokens.id, row.id));
  const [creator] = row.createdByUserId
    ? await deps.store.db
        .select({ email: users.email })
        .from(users)
        .where(eq(users.id, row.createdByUserId))
        .limit(1)
    : [];
  const invitedBy = creator?.email ?? null;
  return { invitation: invitationSummary(row, invitedBy), token: row };
}

/** What a pending invitation offers; not-found when the token is unknown, used or expired. */
export async function invitationOffer(
  deps: AppDeps,
  token: string,
): Promise<{ email: string; role: Role; expiresAt: Date }> {
  const row = await findValidToken(deps, 'invitation', token);
  if (!row) throw new AccountsError('not-found', 'This invitation link is unknown, used or expired.');
  return { email: row.email, role: row.role ?? 'developer', expiresAt: row.expiresAt };
}

/** The refusal of an unknown, used or expired single-use token, naming the `token` field. */
export function tokenRefused(detail: string): AccountsError {
  return new AccountsError('validation-failed', detail, [
    { field: 'token', message: 'unknown, used or expired' },
  ]);
}

/**
 * Accepts an invitation: creates the user with the invited role and accounts (those that still
 * exist) and the chosen name and password, and uses the token up. The token is checked before the
 * password is hashed, so a bogus token costs no hashing; it is used only after hashing, in the
 * transaction that creates the user, so a busy answer leaves the link usable and only one of two
 * concurrent acceptances gets through.
 */
export async function acceptInvitation(
  deps: AppDeps,
  input: { token: string; name: string; password: string },
): Promise<{ user: UserRow; invitationId: number }> {
  const refused = 'The invitation link is unknown, used or expired.';
  const pending = await findValidToken(deps, 'invitation', input.token);
  if (!pending) throw tokenRefused(refused);
  await refuseExistingEmail(deps, pending.email);
  // Hashed before the transaction: its body may await only the store (server/db/store.ts).
  const passwordHash = await hashPassword(input.password);
  const created = await deps.store.transaction(async (tx) => {
    const { accountMembers, accounts, users, userTokens } = tx.t;
    const now = deps.clock();
    const token = await consumeToken({ ...deps, store: tx }, 'invitation', input.token);
    if (!token) return undefined;
    const [user] = await tx.db
      .insert(users)
      .values({
        email: token.email,
        passwordHash,
        role: token.role ?? 'developer',
        name: input.name,
        createdAt: now,
      })
      .returning();
    for (const accountId of new Set(token.accountIds ?? [])) {
      const [account] = await tx.db
        .select({ id: accounts.id })
        .from(accounts)
        .where(eq(accounts.id, accountId))
        .limit(1);
      if (account) {
        await tx.db.insert(accountMembers).values({ userId: user!.id, accountId }).onConflictDoNothing();
      }
    }
    await tx.db.update(userTokens).set({ userId: user!.id }).where(eq(userTokens.id, token.id));
    return { user: user!, invitationId: token.id };
  });
  if (!created) throw tokenRefused(refused);
  return created;
}

export interface UserPatch {
  role?: Role | undefined;
  active?: boolean | undefined;
  accountIds?: number[] | undefined;
}

/**
 * Changes a user's role, activity or account memberships. Deactivating revokes all their
 * sessions. Refuses to leave no active admin (conflict), an unknown user (not-found) and unknown
 * account ids.
 */
export async function updateUser(
  deps: AppDeps,
  userId: number,
  patch: UserPatch,
): Promise<{
  before: UserSummary;
  after: UserSummary;
  /** True when this change deactivated an active user. */
  deactivated: boolean;
  sessionsRevoked: number;
}> {
  const row = await findUserRow(deps, userId);
  if (!row) throw new AccountsError('not-found', `No console user with id ${userId}.`);
  const before = userSummary(row, await accountIdsOf(deps.store, row.id));
  const losesAdmin =
    row.role === 'admin' &&
    row.active &&
    ((patch.role !== undefined && patch.role !== 'admin') || patch.active === false);
  if (patch.accountIds) await checkAccountsExist(deps, patch.accountIds, 'accountIds');
  await deps.store.transaction(async (tx) => {
    if (losesAdmin && (await activeAdminCount(tx)) <= 1) {
      throw new AccountsError('conflict', 'This is the last active admin; make another user admin first.');
    }
    const { accountMembers, users } = tx.t;
    const set: Partial<UserRow> = {};
    if (patch.role !== undefined) set.role = patch.role;
    if (patch.active !== undefined) set.active = patch.active;
    if (Object.keys(set).length > 0) await tx.db.update(users).set(set).where(eq(users.id, row.id));
    if (patch.accountIds) {
      await tx.db.delete(accountMembers).where(eq(accountMembers.userId, row.id));
      for (const accountId of new Set(patch.accountIds)) {
        await tx.db.insert(accountMembers).values({ userId: row.id, accountId });
      }
    }
  });
  const sessionsRevoked = patch.active === false ? await revokeUserSessions(deps, row.id) : 0;
  const after = (await loadUserSummary(deps, row.id))!;
  return { before, after, deactivated: patch.active === false && row.active, sessionsRevoked };
}
