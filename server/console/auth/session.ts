/**
 * Console sessions: a short-lived access JWT (jose, HS256; claims sub, sid, role; iss/aud
 * "ebullio-console") in the httpOnly cookie `ebullio_access`, and a refresh token
 * `<sid>.<random>` in the httpOnly cookie `ebullio_refresh` scoped to /console-api/auth. Both are
 * SameSite=Strict and Secure when the request came over HTTPS (req.secure, which honours
 * TRUST_PROXY and X-Forwarded-Proto).
 *
 * The session row (console_sessions) keeps only SHA-256 of the current refresh token. Every
 * refresh rotates it; presenting an older token of a live session is taken as theft (replay) and
 * revokes the session (the refresh-token rotation and reuse-detection pattern of the OAuth 2.0
 * Security BCP, RFC 9700 §4.14.2). The access JWT's sid is checked against the row on every
 * request, so sign-out, deactivation and password resets take effect at once; the user's role is
 * read from the database, not trusted from the claim.
 */
import crypto from 'node:crypto';
import { and, eq, gt, isNull } from 'drizzle-orm';
import type { CookieOptions, Request, RequestHandler, Response } from 'express';
import { jwtVerify, SignJWT } from 'jose';
import { ACCESS_COOKIE, REFRESH_COOKIE } from '../../../shared/console/common.js';
import { consoleSettings } from '../../config.js';
import { accountMembers, consoleSessions, users } from '../../db/schema.js';
import type { AppDeps } from '../../deps.js';
import type { ConsoleUser, Role } from '../route.js';

export const JWT_ISSUER = 'ebullio-console';
export const JWT_AUDIENCE = 'ebullio-console';
export const REFRESH_COOKIE_PATH = '/console-api/auth';

export function sha256Hex(text: string): string {
  return crypto.createHash('sha256').update(text).digest('hex');
}

export function randomToken(bytes = 32): string {
  return crypto.randomBytes(bytes).toString('base64url');
}

/** httpOnly, SameSite=Strict, Secure over HTTPS. */
export function cookieFlags(req: Request): CookieOptions {
  return { httpOnly: true, sameSite: 'strict', secure: req.secure };
}

export function accountIdsOf(deps: AppDeps, userId: number): number[] {
  return deps.db
    .select({ id: accountMembers.accountId })
    .from(accountMembers)
    .where(eq(accountMembers.userId, userId))
    .orderBy(accountMembers.accountId)
    .all()
    .map((r) => r.id);
}

export interface IssuedSession {
  sessionId: string;
  accessExpiresAt: Date;
  sessionExpiresAt: Date;
}

async function signAccess(
  deps: AppDeps,
  user: { id: number; role: Role },
  sid: string,
  now: Date,
): Promise<{ jwt: string; expiresAt: Date }> {
  const settings = consoleSettings(deps.config);
  const iat = Math.floor(now.getTime() / 1000);
  const exp = iat + settings.accessTtlSeconds;
  const jwt = await new SignJWT({ sid, role: user.role })
    .setProtectedHeader({ alg: 'HS256', typ: 'JWT' })
    .setSubject(String(user.id))
    .setIssuer(JWT_ISSUER)
    .setAudience(JWT_AUDIENCE)
    .setIssuedAt(iat)
    .setExpirationTime(exp)
    .sign(settings.jwtKey);
  return { jwt, expiresAt: new Date(exp * 1000) };
}

function setCookies(
  req: Request,
  res: Response,
  access: { jwt: string; expiresAt: Date },
  refresh: string,
  sessionExpiresAt: Date,
  now: Date,
): void {
  const flags = cookieFlags(req);
  res.cookie(ACCESS_COOKIE, access.jwt, {
    ...flags,
    path: '/',
    maxAge: access.expiresAt.getTime() - now.getTime(),
  });
  res.cookie(REFRESH_COOKIE, refresh, {
    ...flags,
    path: REFRESH_COOKIE_PATH,
    maxAge: Math.max(0, sessionExpiresAt.getTime() - now.getTime()),
  });
}

export function clearSessionCookies(req: Request, res: Response): void {
  const flags = cookieFlags(req);
  res.clearCookie(ACCESS_COOKIE, { ...flags, path: '/' });
  res.clearCookie(REFRESH_COOKIE, { ...flags, path: REFRESH_COOKIE_PATH });
}

/** Creates a session row and sets both cookies. */
export async function issueSession(
  deps: AppDeps,
  req: Request,
  res: Response,
  user: { id: number; role: Role },
): Promise<IssuedSession> {
  const now = deps.clock();
  const settings = consoleSettings(deps.config);
  const sessionId = randomToken(18);
  const refresh = `${sessionId}.${randomToken(32)}`;
  const sessionExpiresAt = new Date(now.getTime() + settings.sessionTtlMs);
  deps.db
    .insert(consoleSessions)
    .values({
      id: sessionId,
      userId: user.id,
      refreshHash: sha256Hex(refresh),
      createdAt: now,
      expiresAt: sessionExpiresAt,
      ip: req.ip ?? null,
      userAgent: req.get('user-agent')?.slice(0, 300) ?? null,
    })
    .run();
  const access = await signAccess(deps, user, sessionId, now);
  setCookies(req, res, access, refresh, sessionExpiresAt, now);
  res.locals.consoleSessionId = sessionId;
  return { sessionId, accessExpiresAt: access.expiresAt, sessionExpiresAt };
}

export type RefreshOutcome =
  | { ok: true; session: IssuedSession; userId: number }
  | {
      ok: false;
      reason: 'missing' | 'unknown' | 'expired' | 'revoked' | 'inactive' | 'replayed';
      userId?: number;
    };

/** Rotates the refresh token presented in the cookie; on replay revokes the session. */
export async function refreshSession(deps: AppDeps, req: Request, res: Response): Promise<RefreshOutcome> {
  const now = deps.clock();
  const presented = (req.cookies as Record<string, string> | undefined)?.[REFRESH_COOKIE];
  if (typeof presented !== 'string' || presented === '') return { ok: false, reason: 'missing' };
  const sid = presented.split('.')[0] ?? '';
  const row = deps.db.select().from(consoleSessions).where(eq(consoleSessions.id, sid)).get();
  if (!row) return { ok: false, reason: 'unknown' };
  if (row.revokedAt) return { ok: false, reason: 'revoked', userId: row.userId };
  if (row.expiresAt.getTime() <= now.getTime()) return { ok: false, reason: 'expired', userId: row.userId };
  const expected = Buffer.from(row.refreshHash, 'hex');
  const actual = Buffer.from(sha256Hex(presented), 'hex');
  if (expected.length !== actual.length || !crypto.timingSafeEqual(expected, actual)) {
    deps.db.update(consoleSessions).set({ revokedAt: now }).where(eq(consoleSessions.id, sid)).run();
    return { ok: false, reason: 'replayed', userId: row.userId };
  }
  const user = deps.db.select().from(users).where(eq(users.id, row.userId)).get();
  if (!user || !user.active) {
    deps.db.update(consoleSessions).set({ revokedAt: now }).where(eq(consoleSessions.id, sid)).run();
    return { ok: false, reason: 'inactive', userId: row.userId };
  }
  const refresh = `${sid}.${randomToken(32)}`;
  deps.db
    .update(consoleSessions)
    .set({ refreshHash: sha256Hex(refresh), refreshedAt: now })
    .where(eq(consoleSessions.id, sid))
    .run();
  const access = await signAccess(deps, user, sid, now);
  setCookies(req, res, access, refresh, row.expiresAt, now);
  res.locals.consoleSessionId = sid;
  return {
    ok: true,
    userId: user.id,
    session: { sessionId: sid, accessExpiresAt: access.expiresAt, sessionExpiresAt: row.expiresAt },
  };
}

/** Revokes one session (sign-out). */
export function revokeSession(deps: AppDeps, sessionId: string): void {
  deps.db
    .update(consoleSessions)
    .set({ revokedAt: deps.clock() })
    .where(and(eq(consoleSessions.id, sessionId), isNull(consoleSessions.revokedAt)))
    .run();
}

/** Revokes every live session of a user (deactivation, password reset). Returns how many. */
export function revokeUserSessions(deps: AppDeps, userId: number): number {
  return deps.db
    .update(consoleSessions)
    .set({ revokedAt: deps.clock() })
    .where(and(eq(consoleSessions.userId, userId), isNull(consoleSessions.revokedAt)))
    .run().changes;
}

/** The session id a request names: from a valid access cookie, else from the refresh cookie. */
export function presentedSessionId(req: Request, res: Response): string | undefined {
  if (res.locals.consoleSessionId) return res.locals.consoleSessionId;
  const refresh = (req.cookies as Record<string, string> | undefined)?.[REFRESH_COOKIE];
  return typeof refresh === 'string' && refresh.includes('.') ? refresh.split('.')[0] : undefined;
}

/**
 * Reads the access cookie; when it is a valid, unexpired JWT of a live session of an active user,
 * sets res.locals.user and res.locals.consoleSessionId. Never refuses a request itself (the
 * access gate of each route does).
 */
export function sessionMiddleware(deps: AppDeps): RequestHandler {
  return async (req, res, next) => {
    const token = (req.cookies as Record<string, string> | undefined)?.[ACCESS_COOKIE];
    if (typeof token !== 'string' || token === '') return next();
    const now = deps.clock();
    let sub: number;
    let sid: string;
    try {
      const { payload } = await jwtVerify(token, consoleSettings(deps.config).jwtKey, {
        algorithms: ['HS256'],
        issuer: JWT_ISSUER,
        audience: JWT_AUDIENCE,
        currentDate: now,
      });
      sub = Number(payload.sub);
      sid = String(payload.sid ?? '');
    } catch {
      return next();
    }
    const row = deps.db
      .select({ user: users })
      .from(consoleSessions)
      .innerJoin(users, eq(consoleSessions.userId, users.id))
      .where(
        and(
          eq(consoleSessions.id, sid),
          eq(consoleSessions.userId, sub),
          isNull(consoleSessions.revokedAt),
          gt(consoleSessions.expiresAt, now),
        ),
      )
      .get();
    if (row && row.user.active) {
      const user: ConsoleUser = {
        id: row.user.id,
        email: row.user.email,
        name: row.user.name,
        role: row.user.role,
        accountIds: accountIdsOf(deps, row.user.id),
      };
      res.locals.user = user;
      res.locals.consoleSessionId = sid;
    }
    next();
  };
}
