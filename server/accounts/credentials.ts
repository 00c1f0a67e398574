/**
 * Console credentials: checking a sign-in (with lock-out after N consecutive failures), and the
 * password-reset flow (request a single-use link by e-mail, confirm it with a new password).
 *
 * Password hashing is the expensive part, so the single-use tokens are checked before any
 * hashing, and hashing itself runs in worker threads behind a small queue (passwords.ts) whose
 * overflow is HashingBusyError. Refusals are {@link AccountsError}s.
 */
import { eq } from 'drizzle-orm';
import { consoleSettings } from '../config.js';
import type { AppDeps } from '../deps.js';
import { sendMail } from '../mail/send.js';
import { HashingBusyError, hashPassword, needsRehash, verifyPassword } from './passwords.js';
import { revokeUserSessions } from './sessions.js';
import { consumeToken, createUserToken, findValidToken, supersedeTokens } from './user-tokens.js';
import { findUserRow, findUserRowByEmail, normaliseEmail, tokenRefused, type UserRow } from './users.js';

/**
 * A bcrypt hash (cost 11) of 32 random hex digits nobody kept, verified when the e-mail is
 * unknown so both paths cost one bcrypt computation. It matches no user, so it need not be secret.
 */
const TIMING_DUMMY_HASH = '$2b$11$fTGMu1IW23CyznE1oxtNzOfx3yTuFamNdTBo.wMlc1CSc4ZMKm6WO';

export type SignInFailure =
  'unknown-email' | 'locked' | 'wrong-password' | 'inactive' | 'wrong-password-locked';

export type SignInCheck =
  | { ok: true; user: UserRow }
  | {
      ok: false;
      reason: SignInFailure;
      /** The e-mail as tried, normalised. */
      email: string;
      user: UserRow | undefined;
      /** Set when this failure locked the account. */
      lockOut?: { failures: number; minutes: number };
    };

/**
 * Checks an e-mail and password. Success clears the failure count (and replaces an older hash
 * scheme with the current one when the hashing queue has room). A wrong password of an unlocked
 * user counts a failure, and the Nth consecutive one locks the account for a while. Unknown
 * e-mails cost one bcrypt computation too, so timing does not tell them apart.
 */
export async function checkSignIn(deps: AppDeps, emailInput: string, password: string): Promise<SignInCheck> {
  const settings = consoleSettings(deps.config);
  const email = normaliseEmail(emailInput);
  const row = await findUserRowByEmail(deps, email);
  const now = deps.clock();
  const { users } = deps.store.t;
  const lockActive = row?.lockedUntil != null && row.lockedUntil.getTime() > now.getTime();
  const passwordOk = await verifyPassword(password, row?.passwordHash ?? TIMING_DUMMY_HASH);
  if (row && row.active && !lockActive && passwordOk) {
    // An older hash scheme is replaced by the current one now that the password is known;
    // when the hashing queue is full that waits for a later sign-in.
    const rehash = needsRehash(row.passwordHash)
      ? await hashPassword(password).catch((err: unknown) => {
          if (err instanceof HashingBusyError) return undefined;
          throw err;
        })
      : undefined;
    await deps.store.db
      .update(users)
      .set({
        failedSignIns: 0,
        lockedUntil: null,
        ...(rehash ? { passwordHash: rehash } : {}),
      })
      .where(eq(users.id, row.id));
    return { ok: true, user: row };
  }
  let reason: SignInFailure = !row
    ? 'unknown-email'
    : lockActive
      ? 'locked'
      : !passwordOk
        ? 'wrong-password'
        : 'inactive';
  let lockOut: { failures: number; minutes: number } | undefined;
  if (row && !lockActive && !passwordOk) {
    const lockExpired = row.lockedUntil != null;
    const failures = (lockExpired ? 0 : row.failedSignIns) + 1;
    const locks = failures >= settings.lockoutThreshold;
    await deps.store.db
      .update(users)
      .set({
        failedSignIns: failures,
        lockedUntil: locks ? new Date(now.getTime() + settings.lockoutMs) : null,
      })
      .where(eq(users.id, row.id));
    if (locks) {
      reason = 'wrong-password-locked';
      lockOut = { failures, minutes: settings.lockoutMs / 60_000 };
    }
  }
  return { ok: false, reason, email, user: row, ...(lockOut ? { lockOut } : {}) };
}

function resetText(link: string, expiresAt: Date): string {
  return [
    'Hello,',
    '',
    'someone (hopefully you) asked to reset the password of your Ebullio console account.',
    'Choose a new password here:',
    '',
    link,
    '',
    `The link works once and expires at ${expiresAt.toISOString()} (UTC). Using it signs out every session of the account.`,
    'If you did not ask for this, ignore this message; your password stays as it is.',
  ].join('\n');
}

/**
 * Mails a reset link when the e-mail belongs to an active user (superseding earlier links), and
 * does nothing otherwise. The mail is not awaited: the answer must not take longer for a known
 * address than for an unknown one.
 */
export async function requestPasswordReset(
  deps: AppDeps,
  emailInput: string,
): Promise<{ email: string; user: UserRow | undefined; mailed: boolean }> {
  const settings = consoleSettings(deps.config);
  const email = normaliseEmail(emailInput);
  const row = await findUserRowByEmail(deps, email);
  const mailed = Boolean(row && row.active);
  if (row && row.active) {
    await supersedeTokens(deps, 'password-reset', email);
    const { token, row: tokenRow } = await createUserToken(deps, {
      purpose: 'password-reset',
      email,
      userId: row.id,
      ttlMs: settings.resetTtlMs,
    });
    const link = `${settings.publicUrl}/console/reset-password?token=${encodeURIComponent(token)}`;
    void sendMail(deps, {
      kind: 'password-reset',
      to: email,
      subject: 'Reset your Ebullio console password',
      text: resetText(link, tokenRow.expiresAt),
    });
  }
  return { email, user: row, mailed };
}

/**
 * Sets a new password with a reset token (single use), clears the lock-out, and revokes every
 * session of the user. Refuses an unknown, used or expired token, or one of an inactive user.
 */
export async function confirmPasswordReset(
  deps: AppDeps,
  input: { token: string; password: string },
): Promise<{ user: UserRow; sessionsRevoked: number }> {
  const refused = 'The reset link is unknown, used or expired; ask for a new one.';
  // The token is checked before the password is hashed: a bogus token costs no hashing.
  const pending = await findValidToken(deps, 'password-reset', input.token);
  const pendingUser = pending?.userId ? await findUserRow(deps, pending.userId) : undefined;
  if (!pending || !pendingUser || !pendingUser.active) throw tokenRefused(refused);
  const passwordHash = await hashPassword(input.password);
  // Used only now, after hashing, so a busy answer leaves the link usable; the consuming
  // UPDATE still lets only one of two concurrent confirmations through.
  // (The transaction below awaits only the store: the hash is computed above.)
  const row = await deps.store.transaction(async (tx) => {
    const token = await consumeToken({ ...deps, store: tx }, 'password-reset', input.token);
    if (!token || token.userId !== pendingUser.id) return undefined;
    await tx.db
      .update(tx.t.users)
      .set({ passwordHash, failedSignIns: 0, lockedUntil: null })
      .where(eq(tx.t.users.id, pendingUser.id));
    return pendingUser;
  });
  if (!row) throw tokenRefused(refused);
  await supersedeTokens(deps, 'password-reset', row.email);
  const sessionsRevoked = await revokeUserSessions(deps, row.id);
  return { user: row, sessionsRevoked };
}
