/**
 * Accounts, users and memberships: the service functions the console API builds on. Every one
 * goes through the async data store (server/db/store.ts).
 */
import { and, eq } from 'drizzle-orm';
import type { accounts, users } from '../db/schema.js';
import type { Store } from '../db/store.js';
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

export async function createAccount(store: Store, input: CreateAccountInput): Promise<Account> {
  const { accounts } = store.t;
  const [row] = await store.db
    .insert(accounts)
    .values({
      name: input.name,
      plan: input.plan ?? 'starter',
      monthlyUnitQuota: input.monthlyUnitQuota ?? 10_000,
      billingEmail: input.billingEmail ?? null,
      retainRequestBodies: input.retainRequestBodies ?? false,
      createdAt: input.now,
    })
    .returning();
  return row!;
}

export async function getAccount(store: Store, id: number): Promise<Account | undefined> {
  const { accounts } = store.t;
  const [row] = await store.db.select().from(accounts).where(eq(accounts.id, id)).limit(1);
  return row;
}

export async function listAccounts(store: Store): Promise<Account[]> {
  const { accounts } = store.t;
  return store.db.select().from(accounts).orderBy(accounts.id);
}

export async function updateAccount(
  store: Store,
  id: number,
  patch: Partial<
    Pick<Account, 'name' | 'plan' | 'monthlyUnitQuota' | 'billingEmail' | 'retainRequestBodies'>
  >,
): Promise<Account | undefined> {
  const { accounts } = store.t;
  const [row] = await store.db.update(accounts).set(patch).where(eq(accounts.id, id)).returning();
  return row;
}

function publicUser(row: typeof users.$inferSelect): User {
  const { passwordHash: _hash, ...rest } = row;
  return rest;
}

/** Hashes the password (off the event loop, see passwords.ts) and inserts the user. */
export async function createUser(
  store: Store,
  input: { email: string; password: string; role: Role; now: Date },
): Promise<User> {
  const passwordHash = await hashPassword(input.password);
  return insertUser(store, { email: input.email, passwordHash, role: input.role, now: input.now });
}

/** Inserts a user with an already computed hash (awaits only the store, so it fits inside a transaction). */
export async function insertUser(
  store: Store,
  input: { email: string; passwordHash: string; role: Role; now: Date },
): Promise<User> {
  const { users } = store.t;
  const [row] = await store.db
    .insert(users)
    .values({
      email: input.email.trim().toLowerCase(),
      passwordHash: input.passwordHash,
      role: input.role,
      createdAt: input.now,
    })
    .returning();
  return publicUser(row!);
}

export async function findUserByEmail(store: Store, email: string): Promise<User | undefined> {
  const { users } = store.t;
  const [row] = await store.db
    .select()
    .from(users)
    .where(eq(users.email, email.trim().toLowerCase()))
    .limit(1);
  return row ? publicUser(row) : undefined;
}

/** Returns the user if the e-mail and password match an active user; undefined otherwise. */
export async function verifyUserPassword(
  store: Store,
  email: string,
  password: string,
): Promise<User | undefined> {
  const { users } = store.t;
  const [row] = await store.db
    .select()
    .from(users)
    .where(eq(users.email, email.trim().toLowerCase()))
    .limit(1);
  if (!row || !row.active) return undefined;
  return (await verifyPassword(password, row.passwordHash)) ? publicUser(row) : undefined;
}

export async function addMember(store: Store, userId: number, accountId: number): Promise<void> {
  const { accountMembers } = store.t;
  await store.db.insert(accountMembers).values({ userId, accountId }).onConflictDoNothing();
}

export async function isMember(store: Store, userId: number, accountId: number): Promise<boolean> {
  const { accountMembers } = store.t;
  const [row] = await store.db
    .select({ userId: accountMembers.userId })
    .from(accountMembers)
    .where(and(eq(accountMembers.userId, userId), eq(accountMembers.accountId, accountId)))
    .limit(1);
  return row !== undefined;
}

export async function accountsOfUser(store: Store, userId: number): Promise<Account[]> {
  const { accountMembers, accounts } = store.t;
  const rows = await store.db
    .select({ account: accounts })
    .from(accountMembers)
    .innerJoin(accounts, eq(accountMembers.accountId, accounts.id))
    .where(eq(accountMembers.userId, userId));
  return rows.map((r) => r.account);
}

/** The ids of the accounts a user is a member of, ascending. */
export async function accountIdsOf(store: Store, userId: number): Promise<number[]> {
  const { accountMembers } = store.t;
  const rows = await store.db
    .select({ id: accountMembers.accountId })
    .from(accountMembers)
    .where(eq(accountMembers.userId, userId))
    .orderBy(accountMembers.accountId);
  return rows.map((r) => r.id);
}
