/**
 * Console auth routes: CSRF token, sign-in (rate-limited per IP, account lock-out after N
 * consecutive failures, one answer for unknown e-mail, wrong password, inactive or locked
 * account), refresh (rotation with replay detection), sign-out, me, password reset and
 * invitation acceptance.
 *
 * The credential, session and invitation work is the account services' (server/accounts:
 * credentials.ts, sessions.ts, users.ts); these routes add what is HTTP: rate limits, cookies,
 * CSRF tokens, the audit entry and the answer.
 *
 * Password hashing is the expensive part of these public routes, so: every route that hashes
 * (sign-in, password-reset confirmation, invitation acceptance) is rate-limited per client
 * address; the single-use tokens are checked before any hashing; and hashing itself runs in
 * worker threads behind a small queue (server/accounts/passwords.ts) whose overflow is a 503.
 */
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
import { recordAudit } from '../../accounts/audit.js';
import { checkSignIn, confirmPasswordReset, requestPasswordReset } from '../../accounts/credentials.js';
import { findSession, revokeSession } from '../../accounts/sessions.js';
import { acceptInvitation, invitationOffer, loadUserSummary } from '../../accounts/users.js';
import { consoleSettings } from '../../config.js';
import type { AppDeps } from '../../deps.js';
import { failClosed, limiterStore } from '../../http/middleware/rate-limit.js';
import { problem } from '../../http/problem.js';
import { consoleRoute, type ConsoleRouteModule } from '../route.js';
import { issueCsrfCookie, isValidCsrfToken, presentedCsrfCookie } from './csrf.js';
import {
  clearSessionCookies,
  issueSession,
  presentedSessionId,
  refreshSession,
  type IssuedSession,
} from './session.js';

/** The one answer to every failed sign-in (no user enumeration: OWASP Authentication Cheat Sheet). */
export const SIGN_IN_FAILED_DETAIL =
  'The e-mail or password is wrong, or the account is temporarily locked after repeated failed sign-ins.';

/** Window of the per-address limit of each route that hashes a password (and of reset requests). */
const HASHING_ROUTE_WINDOW_MS = 15 * 60_000;

/**
 * Per-address limit of one public route (the limit is `consoleSettings.signInLimit` per 15
 * minutes, each route counted on its own). One client flooding a hashing route is stopped here,
 * long before it can fill the shared hashing queue for everybody. With shared state (REDIS_URL)
 * each route's counts live in Redis under its own prefix (`name`), for all nodes; a Redis that
 * cannot be asked is a 503 (server/http/middleware/rate-limit.ts `failClosed`).
 */
function signInLimiter(deps: AppDeps, name: string, what: string): RequestHandler {
  const settings = consoleSettings(deps.config);
  const store = limiterStore(deps, name);
  const limiter = rateLimit({
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
    ...(store ? { store } : {}),
  });
  return store ? failClosed(limiter) : limiter;
}

async function sessionBody(deps: AppDeps, userId: number, session: IssuedSession | undefined) {
  const user = await loadUserSummary(deps, userId);
  if (!user) throw problem('unauthorized', 'The user no longer exists.');
  return {
    user,
    accessExpiresAt: session ? session.accessExpiresAt.toISOString() : null,
    sessionExpiresAt: session ? session.sessionExpiresAt.toISOString() : null,
  };
}

export const authRouteModule: ConsoleRouteModule = {
  register(router, deps) {
    const settings = consoleSettings(deps.config);
    const signInLimit = signInLimiter(deps, 'console-sign-in', 'sign-in');
    const resetLimit = signInLimiter(deps, 'console-reset', 'password-reset');
    const resetConfirmLimit = signInLimiter(deps, 'console-reset-confirm', 'password-reset confirmation');
    const acceptLimit = signInLimiter(deps, 'console-invitation-accept', 'invitation acceptance');

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
        const check = await checkSignIn(deps, body.email, body.password);
        if (check.ok) {
          const row = check.user;
          const session = await issueSession(deps, req, res, row);
          // The token minted before sign-in is replaced by one bound to the new session.
          issueCsrfCookie(deps, req, res, session.sessionId);
          await recordAudit(deps, req, res, {
            action: 'auth.sign-in',
            targetType: 'user',
            targetId: row.id,
            actor: { id: row.id, email: row.email },
          });
          return await sessionBody(deps, row.id, session);
        }
        const { email, user: row, lockOut } = check;
        if (row && lockOut) {
          await recordAudit(deps, req, res, {
            action: 'auth.lock-out',
            targetType: 'user',
            targetId: row.id,
            actor: { id: null, email },
            detail: lockOut,
          });
        }
        await recordAudit(deps, req, res, {
          action: 'auth.sign-in-failed',
          targetType: row ? 'user' : undefined,
          targetId: row?.id,
          actor: { id: null, email },
          detail: { reason: check.reason },
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
            const victim = outcome.userId ? await loadUserSummary(deps, outcome.userId) : undefined;
            await recordAudit(deps, req, res, {
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
        return await sessionBody(deps, outcome.userId, outcome.session);
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/auth/sign-out',
      roles: 'public',
      summary: 'Sign out: revoke this session and clear its cookies',
      response: OkSchema,
      handler: async ({ deps, req, res }) => {
        const sid = presentedSessionId(req, res);
        if (sid) {
          const row = await findSession(deps, sid);
          await revokeSession(deps, sid);
          if (row) {
            const who = await loadUserSummary(deps, row.userId);
            await recordAudit(deps, req, res, {
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
      handler: async ({ deps, res, user }) => {
        const row = await findSession(deps, res.locals.consoleSessionId ?? '');
        const body = await sessionBody(deps, user.id, undefined);
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
      handler: async ({ deps, req, res, body }) => {
        const { email, user: row, mailed } = await requestPasswordReset(deps, body.email);
        await recordAudit(deps, req, res, {
          action: 'auth.password-reset-request',
          targetType: row ? 'user' : undefined,
          targetId: row?.id,
          actor: { id: null, email },
          detail: { mailed },
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
        const { user: row, sessionsRevoked } = await confirmPasswordReset(deps, {
          token: body.token,
          password: body.password,
        });
        clearSessionCookies(req, res);
        await recordAudit(deps, req, res, {
          action: 'auth.password-reset',
          targetType: 'user',
          targetId: row.id,
          actor: { id: row.id, email: row.email },
          detail: { sessionsRevoked },
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
      handler: async ({ deps, params }) => {
        const offer = await invitationOffer(deps, params.token);
        return { email: offer.email, role: offer.role, expiresAt: offer.expiresAt.toISOString() };
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
        const { user, invitationId } = await acceptInvitation(deps, {
          token: body.token,
          name: body.name,
          password: body.password,
        });
        await recordAudit(deps, req, res, {
          action: 'user.invitation-accept',
          targetType: 'user',
          targetId: user.id,
          actor: { id: user.id, email: user.email },
          detail: { invitationId, role: user.role },
        });
        const session = await issueSession(deps, req, res, user);
        issueCsrfCookie(deps, req, res, session.sessionId);
        return await sessionBody(deps, user.id, session);
      },
    });
  },
};
