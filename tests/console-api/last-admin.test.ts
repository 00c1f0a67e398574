// The console never loses its last active admin: the count is taken inside the transaction that
// demotes or deactivates (on PostgreSQL with the admins' rows locked), so two admins removing each
// other at the same moment cannot both succeed. Runs on SQLite and on PostgreSQL (server-pg).
import { describe, expect, it } from 'vitest';
import { createUser } from '../../server/accounts/accounts.js';
import { updateUser } from '../../server/accounts/users.js';
import { makeConsoleHarness, PASSWORD } from './auth-harness.js';

describe('the last active admin', () => {
  it('cannot be demoted or deactivated', async () => {
    const h = await makeConsoleHarness();
    await expect(updateUser(h.deps, h.users.admin.id, { role: 'billing' })).rejects.toMatchObject({
      kind: 'conflict',
    });
    await expect(updateUser(h.deps, h.users.admin.id, { active: false })).rejects.toMatchObject({
      kind: 'conflict',
    });
  });

  it('survives two admins demoting each other at once: one change goes through, the other is refused', async () => {
    const h = await makeConsoleHarness();
    const second = await createUser(h.store, {
      email: 'second-admin@ebullio.invalid',
      password: PASSWORD,
      role: 'admin',
      now: h.clock.now,
    });
    const outcomes = await Promise.allSettled([
      updateUser(h.deps, h.users.admin.id, { role: 'developer' }),
      updateUser(h.deps, second.id, { active: false }),
    ]);
    expect(outcomes.filter((o) => o.status === 'fulfilled')).toHaveLength(1);
    const refused = outcomes.find((o) => o.status === 'rejected') as PromiseRejectedResult;
    expect(refused.reason).toMatchObject({ kind: 'conflict' });
    const { users } = h.store.t;
    const admins = (await h.store.db.select().from(users)).filter((u) => u.role === 'admin' && u.active);
    expect(admins).toHaveLength(1);
  });
});
