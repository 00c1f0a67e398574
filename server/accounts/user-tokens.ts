/**
 * Single-use, expiring tokens sent by e-mail (invitations, password resets). Only SHA-256 of the
 * token is stored (user_tokens.token_hash); using a token marks it used in the same UPDATE that
 * checks it is unused and unexpired, so two concurrent uses cannot both succeed.
 */
import { and, eq, gt, isNull } from 'drizzle-orm';
import type { userTokens } from '../db/schema.js';
import type { AppDeps } from '../deps.js';
import type { Role } from './accounts.js';
import { randomToken, sha256Hex } from './sessions.js';

export type UserToken = typeof userTokens.$inferSelect;
export type TokenPurpose = UserToken['purpose'];

export async function createUserToken(
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
): Promise<{ token: string; row: UserToken }> {
  const { userTokens } = deps.store.t;
  const now = deps.clock();
  const token = randomToken(32);
  const [row] = await deps.store.db
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
    .returning();
  return { token, row: row! };
}

/** The token's row if it exists, has this purpose, is unused and unexpired. */
export async function findValidToken(
  deps: AppDeps,
  purpose: TokenPurpose,
  token: string,
): Promise<UserToken | undefined> {
  const { userTokens } = deps.store.t;
  const [row] = await deps.store.db
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
    .limit(1);
  return row;
}

/** Marks a valid token used and returns its row; undefined if unknown, used or expired. */
export async function consumeToken(
  deps: AppDeps,
  purpose: TokenPurpose,
  token: string,
): Promise<UserToken | undefined> {
  const { userTokens } = deps.store.t;
  const now = deps.clock();
  const [row] = await deps.store.db
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
    .returning();
  return row;
}

/** Marks every unused token of this purpose for this e-mail used (a newer one supersedes them). */
export async function supersedeTokens(deps: AppDeps, purpose: TokenPurpose, email: string): Promise<void> {
  const { userTokens } = deps.store.t;
  await deps.store.db
    .update(userTokens)
    .set({ usedAt: deps.clock() })
    .where(and(eq(userTokens.purpose, purpose), eq(userTokens.email, email), isNull(userTokens.usedAt)));
}
