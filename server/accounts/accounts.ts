/**
 * Accounts, users and memberships: the service functions the console API builds on.
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { accountMembers, accounts, users } from '../db/schema.js';
import { hashPassword, verifyPassword } from './passwords.js';

export type Account = typeof accounts.$inferSelect;
export type User = Omit<typeof users.$inferSelect, 'passwordHash'>;
export type Role = (typeof users.$inferSelect)['role'];

export interface CreateAccountInput {
  name: string;
  plan?: string;
  monthlyUnitQuota?: number;
  billingEmail?: string | null;
  retainRequestBodies?: boolean;
  now: Date;
}

export function createAccount(db: Db, input: CreateAccountInput): Account {
  return db
    .insert(accounts)
    .values({
      name: input.name,
      plan: input.plan ?? 'starter',
      monthlyUnitQuota: input.monthlyUnitQuota ?? 10_000,
      billingEmail: input.billingEmail ?? null,
      retainRequestBodies: input.retainRequestBodies ?? false,
      createdAt: input.now,
    })
    .returning()
    .get();
}

export function getAccount(db: Db, id: number): Account | undefined {
  return db.select().from(accounts).where(eq(accounts.id, id)).get();
}

export function listAccounts(db: Db): Account[] {
  return db.select().from(accounts).orderBy(accounts.id).all();
}

export function updateAccount(
  db: Db,
  id: number,
  patch: Partial<
    Pick<Account, 'name' | 'plan' | 'monthlyUnitQuota' | 'billingEmail' | 'retainRequestBodies'>
  >,
): Account | undefined {
  return db.update(accounts).set(patch).where(eq(accounts.id, id)).returning().get();
}

function publicUser(row: typeof users.$inferSelect): User {
  const { passwordHash: _hash, ...rest } = row;
  return rest;
}

/** Hashes the password (off the event loop, see passwords.ts) and inserts the user. */
export async function createUser(
  db: Db,
  input: { email: string; password: string; role: Role; now: Date },
): Promise<User> {
  const passwordHash = await hashPassword(input.password);
  return insertUser(db, { email: input.email, passwordHash, role: input.role, now: input.now });
}

/** Inserts a user with an already computed hash (synchronous, so it fits inside a transaction). */
export function insertUser(
  db: Db,
  input: { email: string; passwordHash: string; role: Role; now: Date },
): User {
  const row = db
    .insert(users)
    .values({
      email: input.email.trim().toLowerCase(),
      passwordHash: input.passwordHash,
      role: input.role,
      createdAt: input.now,
    })
    .returning()
    .get();
  return publicUser(row);
}

export function findUserByEmail(db: Db, email: string): User | undefined {
  const row = db.select().from(users).where(eq(users.email, email.trim().toLowerCase())).get();
  return row ? publicUser(row) : undefined;
}

/** Returns the user if the e-mail and password match an active user; undefined otherwise. */
export async function verifyUserPassword(db: Db, email: string, password: string): Promise<User | undefined> {
  const row = db.select().from(users).where(eq(users.email, email.trim().toLowerCase())).get();
  if (!row || !row.active) return undefined;
  return (await verifyPassword(password, row.passwordHash)) ? publicUser(row) : undefined;
}

export function addMember(db: Db, userId: number, accountId: number): void {
  db.insert(accountMembers).values({ userId, accountId }).onConflictDoNothing().run();
}

export function isMember(db: Db, userId: number, accountId: number): boolean {
  return (
    db
      .select()
      .from(accountMembers)
      .where(and(eq(accountMembers.userId, userId), eq(accountMembers.accountId, accountId)))
      .get() !== undefined
  );
}

export function accountsOfUser(db: Db, userId: number): Account[] {
  return db
    .select({ account: accounts })
    .from(accountMembers)
    .innerJoin(accounts, eq(accountMembers.accountId, accounts.id))
    .where(eq(accountMembers.userId, userId))
    .all()
    .map((r) => r.account);
}

/** The ids of the accounts a user is a member of, ascending. */
export function accountIdsOf(db: Db, userId: number): number[] {
  return db
    .select({ id: accountMembers.accountId })
    .from(accountMembers)
    .where(eq(accountMembers.userId, userId))
    .orderBy(accountMembers.accountId)
    .all()
    .map((r) => r.id);
}
