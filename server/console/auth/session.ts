/**
 * Console sessions, the HTTP side: the access JWT travels in the httpOnly cookie `ebullio_access`,
 * the refresh token `<sid>.<random>` in the httpOnly cookie `ebullio_refresh` scoped to
 * /console-api/auth. Both are SameSite=Strict and Secure when the request came over HTTPS
 * (req.secure, which honours TRUST_PROXY and X-Forwarded-Proto).
 *
 * Creating, rotating, revoking and looking sessions up is the session service's work
 * (server/accounts/sessions.ts); this module reads and writes the cookies around it.
 */
import type { CookieOptions, Request, RequestHandler, Response } from 'express';
import { ACCESS_COOKIE, REFRESH_COOKIE } from '../../../shared/console/common.js';
import {
  createSession,
  rotateSession,
  sessionOfAccessToken,
  type RefreshFailure,
  type SessionTokens,
} from '../../accounts/sessions.js';
import type { AppDeps } from '../../deps.js';
import type { Role } from '../route.js';

export const REFRESH_COOKIE_PATH = '/console-api/auth';

/** httpOnly, SameSite=Strict, Secure over HTTPS. */
export function cookieFlags(req: Request): CookieOptions {
  return { httpOnly: true, sameSite: 'strict', secure: req.secure };
}

export interface IssuedSession {
  sessionId: string;
  accessExpiresAt: Date;
  sessionExpiresAt: Date;
}

function cookiesOf(req: Request): Record<string, string> | undefined {
  return req.cookies as Record<string, string> | undefined;
}

/** Sets both cookies for fresh tokens and marks the request as belonging to their session. */
function handOver(req: Request, res: Response, tokens: SessionTokens): IssuedSession {
  const flags = cookieFlags(req);
  const now = tokens.issuedAt;
  res.cookie(ACCESS_COOKIE, tokens.accessJwt, {
    ...flags,
    path: '/',
    maxAge: tokens.accessExpiresAt.getTime() - now.getTime(),
  });
  res.cookie(REFRESH_COOKIE, tokens.refreshToken, {
    ...flags,
    path: REFRESH_COOKIE_PATH,
    maxAge: Math.max(0, tokens.sessionExpiresAt.getTime() - now.getTime()),
  });
  res.locals.consoleSessionId = tokens.sessionId;
  return {
    sessionId: tokens.sessionId,
    accessExpiresAt: tokens.accessExpiresAt,
    sessionExpiresAt: tokens.sessionExpiresAt,
  };
}

export function clearSessionCookies(req: Request, res: Response): void {
  const flags = cookieFlags(req);
  res.clearCookie(ACCESS_COOKIE, { ...flags, path: '/' });
  res.clearCookie(REFRESH_COOKIE, { ...flags, path: REFRESH_COOKIE_PATH });
}

/** Creates a session for the user (recording the request's address and agent) and sets both cookies. */
export async function issueSession(
  deps: AppDeps,
  req: Request,
  res: Response,
  user: { id: number; role: Role },
): Promise<IssuedSession> {
  const tokens = await createSession(deps, user, { ip: req.ip, userAgent: req.get('user-agent') });
  return handOver(req, res, tokens);
}

export type RefreshOutcome =
  | { ok: true; session: IssuedSession; userId: number }
  | { ok: false; reason: RefreshFailure; userId?: number };

/** Rotates the refresh token presented in the cookie and sets the new cookies. */
export async function refreshSession(deps: AppDeps, req: Request, res: Response): Promise<RefreshOutcome> {
  const outcome = await rotateSession(deps, cookiesOf(req)?.[REFRESH_COOKIE]);
  if (!outcome.ok) return outcome;
  return { ok: true, userId: outcome.userId, session: handOver(req, res, outcome.tokens) };
}

/** The session id a request names: from a valid access cookie, else from the refresh cookie. */
export function presentedSessionId(req: Request, res: Response): string | undefined {
  if (res.locals.consoleSessionId) return res.locals.consoleSessionId;
  const refresh = cookiesOf(req)?.[REFRESH_COOKIE];
  return typeof refresh === 'string' && refresh.includes('.') ? refresh.split('.')[0] : undefined;
}

/**
 * Reads the access cookie; when it is a valid, unexpired JWT of a live session of an active user,
 * sets res.locals.user and res.locals.consoleSessionId. Never refuses a request itself (the
 * access gate of each route does).
 */
export function sessionMiddleware(deps: AppDeps): RequestHandler {
  return async (req, res, next) => {
    const token = cookiesOf(req)?.[ACCESS_COOKIE];
    if (typeof token !== 'string' || token === '') return next();
    const found = await sessionOfAccessToken(deps, token);
    if (found) {
      res.locals.user = found.user;
      res.locals.consoleSessionId = found.sessionId;
    }
    next();
  };
}
