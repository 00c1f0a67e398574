/**
 * Console auth routes: CSRF token, sign-in (rate-limited per IP, account lock-out after N
 * consecutive failures, one answer for unknown e-mail, wrong password, inactive or locked
 * account), refresh (rotation with replay detection), sign-out, me, password reset and
 * invitation acceptance.
 *
 * Password hashing is the expensive part of these public routes, so: every route that hashes
 * (sign-in, password-reset confirmation, invitation acceptance) is rate-limited per client
 * address; the single-use tokens are checked before any hashing; and hashing itself runs in
 * worker threads behind a small queue (server/accounts/passwords.ts) whose overflow is a 503.
 */
import { eq } from 'drizzle-orm';
import type { RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import {
  AcceptedSchema,
  CsrfResponseSchema,
  InvitationAcceptSchema,
  InvitationInfoSchema,
  InvitationTokenParamsSchema,
  PasswordResetConfirmSchema,
  PasswordResetRequestSchema,
  SessionResponseSchema,
  SignInRequestSchema,
} from '../../../shared/console/auth.js';
import { CSRF_COOKIE, OkSchema } from '../../../shared/console/common.js';
import { HashingBusyError, hashPassword, needsRehash, verifyPassword } from '../../accounts/passwords.js';
import { consoleSettings } from '../../config.js';
import { accountMembers, accounts, consoleSessions, users, userTokens } from '../../db/schema.js';
import type { AppDeps } from '../../deps.js';
import { problem } from '../../http/problem.js';
import { sendMail } from '../../mail/send.js';
import { recordAudit } from '../../accounts/audit.js';
import { consoleRoute, type ConsoleRouteModule } from '../route.js';
import { loadUserSummary } from '../users.js';
import { issueCsrfCookie, isValidCsrfToken, presentedCsrfCookie } from './csrf.js';
import {
  clearSessionCookies,
  issueSession,
  presentedSessionId,
  refreshSession,
  revokeSession,
  revokeUserSessions,
  type IssuedSession,
} from './session.js';
import { consumeToken, createUserToken, findValidToken, supersedeTokens } from './user-tokens.js';

/** The one answer to every failed sign-in (no user enumeration: OWASP Authentication Cheat Sheet). */
export const SIGN_IN_FAILED_DETAIL =
  'The e-mail or password is wrong, or the account is temporarily locked after repeated failed sign-ins.';

/**
 * A bcrypt hash (cost 11) of 32 random hex digits nobody kept, verified when the e-mail is
 * unknown so both paths cost one bcrypt computation. It matches no user, so it need not be secret.
 */
const TIMING_DUMMY_HASH = '$2b$11$fTGMu1IW23CyznE1oxtNzOfx3yTuFamNdTBo.wMlc1CSc4ZMKm6WO';

/** Window of the per-address limit of each route that hashes a password (and of reset requests). */
const HASHING_ROUTE_WINDOW_MS = 15 * 60_000;

/**
 * Per-address limit of one public route (the limit is `consoleSettings.signInLimit` per 15
 * minutes, each route counted on its own). One client flooding a hashing route is stopped here,
 * long before it can fill the shared hashing queue for everybody.
 */
function signInLimiter(deps: AppDeps, what: string): RequestHandler {
  const settings = consoleSettings(deps.config);
  return rateLimit({
    windowMs: HASHING_ROUTE_WINDOW_MS,
    limit: settings.signInLimit,
    standardHeaders: 'draft-7', // as the API (server/http/middleware/rate-limit.ts)
    legacyHeaders: false,
    keyGenerator: (req) => ipKeyGenerator(req.ip ?? '0.0.0.0'),
    validate: { trustProxy: false, xForwardedForHeader: false },
    handler: (req, _res, next, options) => {
      const resetTime = (req as { rateLimit?: { resetTime?: Date } }).rateLimit?.resetTime;
      const seconds = resetTime
        ? Math.max(1, Math.ceil((resetTime.getTime() - Date.now()) / 1000))
        : Math.ceil(options.windowMs / 1000);
      next(
        problem('rate-limited', `Too many ${what} attempts from this address; try again later.`, {
          headers: { 'Retry-After': String(seconds) },
        }),
      );
    },
  });
}

/** Runs a password computation; a full hashing queue becomes a 503 'busy' with Retry-After. */
async function hashing<T>(work: Promise<T>): Promise<T> {
  try {
    return await work;
  } catch (err) {
    if (err instanceof HashingBusyError) {
      throw problem('busy', 'Too many password checks are in progress; try again in a moment.', {
        headers: { 'Retry-After': String(err.retryAfterSeconds) },
      });
    }
    throw err;
  }
}

function tokenRefused(detail: string) {
  return problem('validation-failed', detail, {
    errors: [{ field: 'token', message: 'unknown, used or expired' }],
  });
}

function sessionBody(deps: AppDeps, userId: number, session: IssuedSession | undefined) {
  const user = loadUserSummary(deps, userId);
  if (!user) throw problem('unauthorized', 'The user no longer exists.');
  return {
    user,
    accessExpiresAt: session ? session.accessExpiresAt.toISOString() : null,
    sessionExpiresAt: session ? session.sessionExpiresAt.toISOString() : null,
  };
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

export const authRouteModule: ConsoleRouteModule = {
  register(router, deps) {
    const settings = consoleSettings(deps.config);
    const signInLimit = signInLimiter(deps, 'sign-in');
    const resetLimit = signInLimiter(deps, 'password-reset');
    const resetConfirmLimit = signInLimiter(deps, 'password-reset confirmation');
    const acceptLimit = signInLimiter(deps, 'invitation acceptance');

    consoleRoute(router, {
      method: 'get',
      path: '/auth/csrf',
      roles: 'public',
      summary: `Get the CSRF token (sets the readable ${CSRF_COOKIE} cookie); send it as X-CSRF-Token`,
      response: CsrfResponseSchema,
      handler: ({ deps, req, res }) => {
        // Bound to the session the request names (none before sign-in); kept while it still fits.
        const sessionId = presentedSessionId(req, res) ?? '';
        const existing = presentedCsrfCookie(req);
        if (existing && isValidCsrfToken(deps, existing, sessionId)) {
          res.cookie(CSRF_COOKIE, existing, {
            httpOnly: false,
            sameSite: 'strict',
            secure: req.secure,
            path: '/',
          });
          return { csrfToken: existing };
        }
        return { csrfToken: issueCsrfCookie(deps, req, res, sessionId) };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/sign-in',
      roles: 'public',
      summary: 'Sign in with e-mail and password (sets the session cookies)',
      description:
        `Rate-limited per address (${settings.signInLimit} per 15 minutes). After ${settings.lockoutThreshold} consecutive ` +
        `failures the account is locked for ${settings.lockoutMs / 60_000} minutes. Every failure gets the same 401 answer.`,
      request: { body: SignInRequestSchema },
      response: SessionResponseSchema,
      middleware: [signInLimit],
      handler: async ({ deps, req, res, body }) => {
        const email = body.email.trim().toLowerCase();
        const row = deps.db.select().from(users).where(eq(users.email, email)).get();
        const now = deps.clock();
        const lockActive = row?.lockedUntil != null && row.lockedUntil.getTime() > now.getTime();
        const passwordOk = await hashing(
          verifyPassword(body.password, row?.passwordHash ?? TIMING_DUMMY_HASH),
        );
        if (row && row.active && !lockActive && passwordOk) {
          // An older hash scheme is replaced by the current one now that the password is known;
          // when the hashing queue is full that waits for a later sign-in.
          const rehash = needsRehash(row.passwordHash)
            ? await hashPassword(body.password).catch((err: unknown) => {
                if (err instanceof HashingBusyError) return undefined;
                throw err;
              })
            : undefined;
          deps.db
            .update(users)
            .set({
              failedSignIns: 0,
              lockedUntil: null,
              ...(rehash ? { passwordHash: rehash } : {}),
            })
            .where(eq(users.id, row.id))
            .run();
          const session = await issueSession(deps, req, res, row);
          // The token minted before sign-in is replaced by one bound to the new session.
          issueCsrfCookie(deps, req, res, session.sessionId);
          recordAudit(deps, req, res, {
            action: 'auth.sign-in',
            targetType: 'user',
            targetId: row.id,
            actor: { id: row.id, email: row.email },
          });
          return sessionBody(deps, row.id, session);
        }
        let reason = !row
          ? 'unknown-email'
          : lockActive
            ? 'locked'
            : !passwordOk
              ? 'wrong-password'
              : 'inactive';
        if (row && !lockActive && !passwordOk) {
          const lockExpired = row.lockedUntil != null;
          const failures = (lockExpired ? 0 : row.failedSignIns) + 1;
          const locks = failures >= settings.lockoutThreshold;
          deps.db
            .update(users)
            .set({
              failedSignIns: failures,
              lockedUntil: locks ? new Date(now.getTime() + settings.lockoutMs) : null,
            })
            .where(eq(users.id, row.id))
            .run();
          if (locks) {
            reason = 'wrong-password-locked';
            recordAudit(deps, req, res, {
              action: 'auth.lock-out',
              targetType: 'user',
              targetId: row.id,
              actor: { id: null, email },
              detail: { failures, minutes: settings.lockoutMs / 60_000 },
            });
          }
        }
        recordAudit(deps, req, res, {
          action: 'auth.sign-in-failed',
          targetType: row ? 'user' : undefined,
          targetId: row?.id,
          actor: { id: null, email },
          detail: { reason },
        });
        throw problem('unauthorized', SIGN_IN_FAILED_DETAIL);
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/refresh',
      roles: 'public',
      summary: 'Rotate the refresh token and get a new access cookie',
      description:
        'The refresh cookie is replaced on every call; presenting an old one again revokes the whole session (replay).',
      response: SessionResponseSchema,
      handler: async ({ deps, req, res }) => {
        const outcome = await refreshSession(deps, req, res);
        if (!outcome.ok) {
          clearSessionCookies(req, res);
          if (outcome.reason === 'replayed') {
            const victim = outcome.userId ? loadUserSummary(deps, outcome.userId) : undefined;
            recordAudit(deps, req, res, {
              action: 'auth.refresh-replay',
              targetType: 'user',
              targetId: outcome.userId,
              actor: { id: null, email: victim?.email ?? '(unknown)' },
              detail: { sessionRevoked: true },
            });
          }
          throw problem(
            'unauthorized',
            outcome.reason === 'replayed'
              ? 'This refresh token was already used; the session has been revoked. Sign in again.'
              : `No usable console session (${outcome.reason}); sign in again.`,
          );
        }
        return sessionBody(deps, outcome.userId, outcome.session);
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/sign-out',
      roles: 'public',
      summary: 'Sign out: revoke this session and clear its cookies',
      response: OkSchema,
      handler: ({ deps, req, res }) => {
        const sid = presentedSessionId(req, res);
        if (sid) {
          const row = deps.db.select().from(consoleSessions).where(eq(consoleSessions.id, sid)).get();
          revokeSession(deps, sid);
          if (row) {
            const who = loadUserSummary(deps, row.userId);
            recordAudit(deps, req, res, {
              action: 'auth.sign-out',
              targetType: 'user',
              targetId: row.userId,
              actor: { id: row.userId, email: who?.email ?? '(unknown)' },
            });
          }
        }
        clearSessionCookies(req, res);
        issueCsrfCookie(deps, req, res);
        return { ok: true as const };
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/auth/me',
      roles: 'signed-in',
      summary: 'The signed-in user',
      response: SessionResponseSchema,
      handler: ({ deps, res, user }) => {
        const row = deps.db
          .select({ expiresAt: consoleSessions.expiresAt })
          .from(consoleSessions)
          .where(eq(consoleSessions.id, res.locals.consoleSessionId ?? ''))
          .get();
        const body = sessionBody(deps, user.id, undefined);
        return { ...body, sessionExpiresAt: row ? row.expiresAt.toISOString() : null };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/password-reset/request',
      roles: 'public',
      summary: 'Ask for a password-reset e-mail (always 202, whether or not the e-mail is known)',
      request: { body: PasswordResetRequestSchema },
      response: AcceptedSchema,
      status: 202,
      middleware: [resetLimit],
      handler: ({ deps, req, res, body }) => {
        const email = body.email.trim().toLowerCase();
        const row = deps.db.select().from(users).where(eq(users.email, email)).get();
        if (row && row.active) {
          supersedeTokens(deps, 'password-reset', email);
          const { token, row: tokenRow } = createUserToken(deps, {
            purpose: 'password-reset',
            email,
            userId: row.id,
            ttlMs: settings.resetTtlMs,
          });
          const link = `${settings.publicUrl}/console/reset-password?token=${encodeURIComponent(token)}`;
          // Not awaited: the answer must not take longer for a known address than for an unknown one.
          void sendMail(deps, {
            kind: 'password-reset',
            to: email,
            subject: 'Reset your Ebullio console password',
            text: resetText(link, tokenRow.expiresAt),
          });
        }
        recordAudit(deps, req, res, {
          action: 'auth.password-reset-request',
          targetType: row ? 'user' : undefined,
          targetId: row?.id,
          actor: { id: null, email },
          detail: { mailed: Boolean(row && row.active) },
        });
        return {
          accepted: true as const,
          detail:
            'If this address belongs to an active console user, a reset link is on its way (valid 1 hour).',
        };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/password-reset/confirm',
      roles: 'public',
      summary: 'Set a new password with the token from the reset e-mail (single use; signs out all sessions)',
      request: { body: PasswordResetConfirmSchema },
      response: OkSchema,
      middleware: [resetConfirmLimit],
      handler: async ({ deps, req, res, body }) => {
        const refused = 'The reset link is unknown, used or expired; ask for a new one.';
        // The token is checked before the password is hashed: a bogus token costs no hashing.
        const pending = findValidToken(deps, 'password-reset', body.token);
        const pendingUser = pending?.userId
          ? deps.db.select().from(users).where(eq(users.id, pending.userId)).get()
          : undefined;
        if (!pending || !pendingUser || !pendingUser.active) throw tokenRefused(refused);
        const passwordHash = await hashing(hashPassword(body.password));
        // Used only now, after hashing, so a busy answer leaves the link usable; the consuming
        // UPDATE still lets only one of two concurrent confirmations through.
        const row = deps.db.transaction((tx) => {
          const token = consumeToken(
            { ...deps, db: tx as unknown as AppDeps['db'] },
            'password-reset',
            body.token,
          );
          if (!token || token.userId !== pendingUser.id) return undefined;
          tx.update(users)
            .set({ passwordHash, failedSignIns: 0, lockedUntil: null })
            .where(eq(users.id, pendingUser.id))
            .run();
          return pendingUser;
        });
        if (!row) throw tokenRefused(refused);
        supersedeTokens(deps, 'password-reset', row.email);
        const revoked = revokeUserSessions(deps, row.id);
        clearSessionCookies(req, res);
        recordAudit(deps, req, res, {
          action: 'auth.password-reset',
          targetType: 'user',
          targetId: row.id,
          actor: { id: row.id, email: row.email },
          detail: { sessionsRevoked: revoked },
        });
        return { ok: true as const };
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/auth/invitations/:token',
      roles: 'public',
      summary: 'What an invitation link offers (404 when unknown, used or expired)',
      request: { params: InvitationTokenParamsSchema },
      response: InvitationInfoSchema,
      handler: ({ deps, params }) => {
        const row = findValidToken(deps, 'invitation', params.token);
        if (!row) throw problem('not-found', 'This invitation link is unknown, used or expired.');
        return { email: row.email, role: row.role ?? 'developer', expiresAt: row.expiresAt.toISOString() };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/invitations/accept',
      roles: 'public',
      summary: 'Accept an invitation: choose name and password; creates the user and signs in',
      request: { body: InvitationAcceptSchema },
      response: SessionResponseSchema,
      status: 201,
      middleware: [acceptLimit],
      handler: async ({ deps, req, res, body }) => {
        const refused = 'The invitation link is unknown, used or expired.';
        // The token is checked before the password is hashed: a bogus token costs no hashing.
        const pending = findValidToken(deps, 'invitation', body.token);
        if (!pending) throw tokenRefused(refused);
        if (deps.db.select({ id: users.id }).from(users).where(eq(users.email, pending.email)).get()) {
          throw problem('conflict', `A console user with the e-mail ${pending.email} exists already.`);
        }
        const passwordHash = await hashing(hashPassword(body.password));
        const created = deps.db.transaction((tx) => {
          const now = deps.clock();
          const token = consumeToken(
            { ...deps, db: tx as unknown as AppDeps['db'] },
            'invitation',
            body.token,
          );
          if (!token) return undefined;
          const user = tx
            .insert(users)
            .values({
              email: token.email,
              passwordHash,
              role: token.role ?? 'developer',
              name: body.name,
              createdAt: now,
            })
            .returning()
            .get();
          for (const accountId of new Set(token.accountIds ?? [])) {
            if (tx.select({ id: accounts.id }).from(accounts).where(eq(accounts.id, accountId)).get()) {
              tx.insert(accountMembers).values({ userId: user.id, accountId }).onConflictDoNothing().run();
            }
          }
          tx.update(userTokens).set({ userId: user.id }).where(eq(userTokens.id, token.id)).run();
          return { user, tokenId: token.id };
        });
        if (!created) throw tokenRefused(refused);
        const { user } = created;
        recordAudit(deps, req, res, {
          action: 'user.invitation-accept',
          targetType: 'user',
          targetId: user.id,
          actor: { id: user.id, email: user.email },
          detail: { invitationId: created.tokenId, role: user.role },
        });
        const session = await issueSession(deps, req, res, user);
        issueCsrfCookie(deps, req, res, session.sessionId);
        return sessionBody(deps, user.id, session);
      },
    });
  },
};
