/**
 * Single-use, expiring tokens sent by e-mail (invitations, password resets). Only SHA-256 of the
 * token is stored (user_tokens.token_hash); using a token marks it used in the same UPDATE that
 * checks it is unused and unexpired, so two concurrent uses cannot both succeed.
 */
import { and, eq, gt, isNull } from 'drizzle-orm';
import { userTokens } from '../db/schema.js';
import type { AppDeps } from '../deps.js';
import type { Role } from './accounts.js';
import { randomToken, sha256Hex } from './sessions.js';

export type UserToken = typeof userTokens.$inferSelect;
export type TokenPurpose = UserToken['purpose'];

export function createUserToken(
  deps: AppDeps,
  input: {
    purpose: TokenPurpose;
    email: string;
    ttlMs: number;
    userId?: number;
    role?: Role;
    accountIds?: number[];
    createdByUserId?: number;
  },
): { token: string; row: UserToken } {
  const now = deps.clock();
  const token = randomToken(32);
  const row = deps.db
    .insert(userTokens)
    .values({
      purpose: input.purpose,
      tokenHash: sha256Hex(token),
      email: input.email,
      userId: input.userId ?? null,
      role: input.role ?? null,
      accountIds: input.accountIds ?? null,
      createdByUserId: input.createdByUserId ?? null,
      createdAt: now,
      expiresAt: new Date(now.getTime() + input.ttlMs),
    })
    .returning()
    .get();
  return { token, row };
}

/** The token's row if it exists, has this purpose, is unused and unexpired. */
export function findValidToken(deps: AppDeps, purpose: TokenPurpose, token: string): UserToken | undefined {
  return deps.db
    .select()
    .from(userTokens)
    .where(
      and(
        eq(userTokens.tokenHash, sha256Hex(token)),
        eq(userTokens.purpose, purpose),
        isNull(userTokens.usedAt),
        gt(userTokens.expiresAt, deps.clock()),
      ),
    )
    .get();
}

/** Marks a valid token used and returns its row; undefined if unknown, used or expired. */
export function consumeToken(deps: AppDeps, purpose: TokenPurpose, token: string): UserToken | undefined {
  const now = deps.clock();
  return deps.db
    .update(userTokens)
    .set({ usedAt: now })
    .where(
      and(
        eq(userTokens.tokenHash, sha256Hex(token)),
        eq(userTokens.purpose, purpose),
        isNull(userTokens.usedAt),
        gt(userTokens.expiresAt, now),
      ),
    )
    .returning()
    .get();
}

/** Marks every unused token of this purpose for this e-mail used (a newer one supersedes them). */
export function supersedeTokens(deps: AppDeps, purpose: TokenPurpose, email: string): void {
  deps.db
    .update(userTokens)
    .set({ usedAt: deps.clock() })
    .where(and(eq(userTokens.purpose, purpose), eq(userTokens.email, email), isNull(userTokens.usedAt)))
    .run();
}
