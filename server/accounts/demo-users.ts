/**
 * Demo console users for development and browser tests (names invented): one billing user and
 * one developer who is a member of the given accounts. Idempotent: an existing e-mail is left as
 * it is (its password is never overwritten). Call from the seed only outside production, e.g.
 *
 *   if (config.nodeEnv !== 'production') await seedDemoConsoleUsers(store, now, [demoAccountId]);
 *
 * The password is the same documented demo value for both, so do not run this on a public host.
 */
import { addMember, createUser, findUserByEmail } from './accounts.js';
import type { Store } from '../db/store.js';
import { eq } from 'drizzle-orm';

export const DEMO_CONSOLE_PASSWORD = 'ebullio-demo-console';
export const DEMO_BILLING_EMAIL = 'billing@ebullio.invalid';
export const DEMO_DEVELOPER_EMAIL = 'developer@ebullio.invalid';

export async function seedDemoConsoleUsers(
  store: Store,
  now: Date,
  developerAccountIds: readonly number[],
): Promise<string[]> {
  const created: string[] = [];
  const demo = [
    { email: DEMO_BILLING_EMAIL, role: 'billing' as const, name: 'Maren Oduya (demo billing)' },
    { email: DEMO_DEVELOPER_EMAIL, role: 'developer' as const, name: 'Tomasz Lindqvist (demo developer)' },
  ];
  for (const d of demo) {
    if (await findUserByEmail(store, d.email)) continue;
    const user = await createUser(store, {
      email: d.email,
      password: DEMO_CONSOLE_PASSWORD,
      role: d.role,
      now,
    });
    const { users } = store.t;
    await store.db.update(users).set({ name: d.name }).where(eq(users.id, user.id));
    if (d.role === 'developer') for (const id of developerAccountIds) await addMember(store, user.id, id);
    created.push(d.email);
  }
  return created;
}
