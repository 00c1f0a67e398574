/**
 * Console sessions, the data side: a short-lived access JWT (jose, HS256; claims sub, sid, role;
 * iss/aud "ebullio-console") and a refresh token `<sid>.<random>`. The console layer carries both
 * in cookies (server/console/auth/session.ts); this module never sees a request.
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
import { jwtVerify, SignJWT } from 'jose';
import { consoleSettings } from '../config.js';
import type { consoleSessions } from '../db/schema.js';
import type { AppDeps } from '../deps.js';
import { accountIdsOf, type Role } from './accounts.js';

export const JWT_ISSUER = 'ebullio-console';
export const JWT_AUDIENCE = 'ebullio-console';

export function sha256Hex(text: string): string {
  return crypto.createHash('sha256').update(text).digest('hex');
}

export function randomToken(bytes = 32): string {
  return crypto.randomBytes(bytes).toString('base64url');
}

/** Where a session was opened from, as plain values (recorded on the session row). */
export interface SessionClient {
  ip?: string | undefined;
  userAgent?: string | undefined;
}

/** What a new or refreshed session hands the client: the two tokens and their lifetimes. */
export interface SessionTokens {
  sessionId: string;
  accessJwt: string;
  refreshToken: string;
  accessExpiresAt: Date;
  sessionExpiresAt: Date;
  /** The clock reading the tokens were minted at (cookie lifetimes count from it). */
  issuedAt: Date;
}

/** The user of a live session, as every console request sees it. */
export interface SessionUser {
  id: number;
  email: string;
  name: string | null;
  role: Role;
  /** Accounts the user is a member of (account_members): the scope of a developer. */
  accountIds: number[];
}

export type ConsoleSession = typeof consoleSessions.$inferSelect;

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

/** Creates a session row for the user and mints its access and refresh tokens. */
export async function createSession(
  deps: AppDeps,
  user: { id: number; role: Role },
  client: SessionClient,
): Promise<SessionTokens> {
  const now = deps.clock();
  const settings = consoleSettings(deps.config);
  const sessionId = randomToken(18);
  const refreshToken = `${sessionId}.${randomToken(32)}`;
  const sessionExpiresAt = new Date(now.getTime() + settings.sessionTtlMs);
  const { consoleSessions } = deps.store.t;
  await deps.store.db.insert(consoleSessions).values({
    id: sessionId,
    userId: user.id,
    refreshHash: sha256Hex(refreshToken),
    createdAt: now,
    expiresAt: sessionExpiresAt,
    ip: client.ip ?? null,
    userAgent: client.userAgent?.slice(0, 300) ?? null,
  });
  const access = await signAccess(deps, user, sessionId, now);
  return {
    sessionId,
    accessJwt: access.jwt,
    refreshToken,
    accessExpiresAt: access.expiresAt,
    sessionExpiresAt,
    issuedAt: now,
  };
}

export type RefreshFailure = 'missing' | 'unknown' | 'expired' | 'revoked' | 'inactive' | 'replayed';

export type RotateOutcome =
  | { ok: true; tokens: SessionTokens; userId: number }
  | { ok: false; reason: RefreshFailure; userId?: number };

/** Rotates a presented refresh token; on replay (or an inactive user) revokes the session. */
export async function rotateSession(deps: AppDeps, presented: string | undefined): Promise<RotateOutcome> {
  const now = deps.clock();
  if (typeof presented !== 'string' || presented === '') return { ok: false, reason: 'missing' };
  const sid = presented.split('.')[0] ?? '';
  const { consoleSessions, users } = deps.store.t;
  const db = deps.store.db;
  const [row] = await db.select().from(consoleSessions).where(eq(consoleSessions.id, sid)).limit(1);
  if (!row) return { ok: false, reason: 'unknown' };
  if (row.revokedAt) return { ok: false, reason: 'revoked', userId: row.userId };
  if (row.expiresAt.getTime() <= now.getTime()) return { ok: false, reason: 'expired', userId: row.userId };
  const expected = Buffer.from(row.refreshHash, 'hex');
  const actual = Buffer.from(sha256Hex(presented), 'hex');
  if (expected.length !== actual.length || !crypto.timingSafeEqual(expected, actual)) {
    await db.update(consoleSessions).set({ revokedAt: now }).where(eq(consoleSessions.id, sid));
    return { ok: false, reason: 'replayed', userId: row.userId };
  }
  const [user] = await db.select().from(users).where(eq(users.id, row.userId)).limit(1);
  if (!user || !user.active) {
    await db.update(consoleSessions).set({ revokedAt: now }).where(eq(consoleSessions.id, sid));
    return { ok: false, reason: 'inactive', userId: row.userId };
  }
  const refreshToken = `${sid}.${randomToken(32)}`;
  await db
    .update(consoleSessions)
    .set({ refreshHash: sha256Hex(refreshToken), refreshedAt: now })
    .where(eq(consoleSessions.id, sid));
  const access = await signAccess(deps, user, sid, now);
  return {
    ok: true,
    userId: user.id,
    tokens: {
      sessionId: sid,
      accessJwt: access.jwt,
      refreshToken,
      accessExpiresAt: access.expiresAt,
      sessionExpiresAt: row.expiresAt,
      issuedAt: now,
    },
  };
}

/** The session row with this id, live or not. */
export async function findSession(deps: AppDeps, sessionId: string): Promise<ConsoleSession | undefined> {
  const { consoleSessions } = deps.store.t;
  const [row] = await deps.store.db
    .select()
    .from(consoleSessions)
    .where(eq(consoleSessions.id, sessionId))
    .limit(1);
  return row;
}

/** Revokes one session (sign-out). */
export async function revokeSession(deps: AppDeps, sessionId: string): Promise<void> {
  const { consoleSessions } = deps.store.t;
  await deps.store.db
    .update(consoleSessions)
    .set({ revokedAt: deps.clock() })
    .where(and(eq(consoleSessions.id, sessionId), isNull(consoleSessions.revokedAt)));
}

/** Revokes every live session of a user (deactivation, password reset). Returns how many. */
export async function revokeUserSessions(deps: AppDeps, userId: number): Promise<number> {
  const { consoleSessions } = deps.store.t;
  const revoked = await deps.store.db
    .update(consoleSessions)
    .set({ revokedAt: deps.clock() })
    .where(and(eq(consoleSessions.userId, userId), isNull(consoleSessions.revokedAt)))
    .returning({ id: consoleSessions.id });
  return revoked.length;
}

/**
 * The user and session id an access JWT stands for, when it is valid and unexpired and names a
 * live session of an active user; undefined otherwise.
 */
export async function sessionOfAccessToken(
  deps: AppDeps,
  accessJwt: string,
): Promise<{ user: SessionUser; sessionId: string } | undefined> {
  const now = deps.clock();
  let sub: number;
  let sid: string;
  try {
    const { payload } = await jwtVerify(accessJwt, consoleSettings(deps.config).jwtKey, {
      algorithms: ['HS256'],
      issuer: JWT_ISSUER,
      audience: JWT_AUDIENCE,
      currentDate: now,
    });
    sub = Number(payload.sub);
    sid = String(payload.sid ?? '');
  } catch {
    return undefined;
  }
  const { consoleSessions, users } = deps.store.t;
  const [row] = await deps.store.db
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
    .limit(1);
  if (!row || !row.user.active) return undefined;
  return {
    user: {
      id: row.user.id,
      email: row.user.email,
      name: row.user.name,
      role: row.user.role,
      accountIds: await accountIdsOf(deps.store, row.user.id),
    },
    sessionId: sid,
  };
}
