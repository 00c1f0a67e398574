// The identity repositories (accounts, API keys, key authentication, console users and sessions)
// on a throw-away PostgreSQL server through the async store: the same functions the app calls on
// SQLite, here on the dialect where key lookup takes its portable path (no prepared statements,
// no TEMP triggers) and trusts remembered keys only while the shared auth_revision row is unchanged.
import { sql } from 'drizzle-orm';
import { setImmediate as nextTurn } from 'node:timers/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  addMember,
  accountIdsOf,
  createAccount,
  getAccount,
  isMember,
} from '../../server/accounts/accounts.js';
import {
  authenticateToken,
  createKey,
  forgetKnownKeys,
  keyExists,
  knownKeyCount,
  listKeys,
  revokeKey,
  rotateKey,
} from '../../server/accounts/keys.js';
import { recordAudit } from '../../server/accounts/audit.js';
import { checkSignIn } from '../../server/accounts/credentials.js';
import { createSession, revokeUserSessions, sessionOfAccessToken } from '../../server/accounts/sessions.js';
import { createUserToken } from '../../server/accounts/user-tokens.js';
import { acceptInvitation, listUsers, updateUser } from '../../server/accounts/users.js';
import { accountView } from '../../server/console/accounts.js';
import { listAudit } from '../../server/console/audit.js';
import type { AppDeps } from '../../server/deps.js';
import { openPostgresStore, type Store } from '../../server/db/store.js';
import { ALL_SCOPES, testConfig } from '../http/helpers.js';
import { startPostgres, type PostgresServer } from '../support/postgres-server.js';

const SECRET = Buffer.from('x'.repeat(32));
const NOW = new Date('2031-03-14T10:00:00Z');

let server: PostgresServer;
/** The node under test. */
let store: Store;
/** Another node on the same database (its own pool). */
let other: Store;

beforeAll(async () => {
  server = await startPostgres();
  store = openPostgresStore(server.url, { max: 3 });
  other = openPostgresStore(server.url, { max: 2 });
  await store.migrate();
}, 120_000);

afterAll(async () => {
  await store?.close();
  await other?.close();
  await server?.stop();
});

async function accountWithKey(name: string, opts: { expiresAt?: Date } = {}) {
  const account = await createAccount(store, {
    name,
    monthlyUnitQuota: 700,
    retainRequestBodies: true,
    now: NOW,
  });
  const created = await createKey(store, SECRET, {
    accountId: account.id,
    name: `${name} key`,
    scopes: ALL_SCOPES,
    rateLimitPerMinute: 90,
    now: NOW,
    ...(opts.expiresAt ? { expiresAt: opts.expiresAt } : {}),
  });
  return { account, ...created };
}

describe('accounts and keys on PostgreSQL', () => {
  it('creates, reads and lists accounts, memberships and keys with the app types', async () => {
    const { account, key, token } = await accountWithKey('Invented Pg Works');
    expect(await getAccount(store, account.id)).toMatchObject({
      name: 'Invented Pg Works',
      retainRequestBodies: true,
      createdAt: NOW,
    });
    expect(key.prefix).toBe(`ebk1.${key.publicId}`);
    expect(await keyExists(store, SECRET, token)).toBe(true);
    expect(await keyExists(store, SECRET, `${token}x`)).toBe(false);
    expect((await listKeys(store, account.id)).map((k) => k.id)).toEqual([key.id]);
    const [user] = await store.rows<{ id: number }>(
      sql`INSERT INTO users (email, password_hash, role, created_at) VALUES ('pg@example.invalid', 'x', 'developer', ${store.instant(NOW)}) RETURNING id`,
    );
    await addMember(store, user!.id, account.id);
    await addMember(store, user!.id, account.id); // idempotent
    expect(await isMember(store, user!.id, account.id)).toBe(true);
    expect(await accountIdsOf(store, user!.id)).toEqual([account.id]);
  });

  it('rotates a key in one transaction: the old key answers "rotated" once its overlap has ended', async () => {
    const { key, token } = await accountWithKey('Invented Rotation Works');
    const rotated = await rotateKey(store, SECRET, key.id, { now: NOW, overlapSeconds: 60 });
    expect(rotated.previous.expiresAt).toEqual(new Date(NOW.getTime() + 60_000));
    expect(rotated.key.rotatedFromId).toBe(key.id);
    expect(await authenticateToken(store, SECRET, token, NOW)).toMatchObject({ ok: true });
    const later = new Date(NOW.getTime() + 61_000);
    expect(await authenticateToken(store, SECRET, token, later)).toMatchObject({
      ok: false,
      reason: 'rotated',
    });
    expect(await authenticateToken(store, SECRET, rotated.token, later)).toMatchObject({ ok: true });
  });
});

describe('key authentication on PostgreSQL (the portable path)', () => {
  it('answers with the key and its account settings, and refuses malformed and unknown tokens', async () => {
    const { account, key, token } = await accountWithKey('Invented Lookup Works');
    const result = await authenticateToken(store, SECRET, token, NOW);
    expect(result).toEqual({
      ok: true,
      key: {
        id: key.id,
        accountId: account.id,
        publicId: key.publicId,
        scopes: ALL_SCOPES,
        rateLimitPerMinute: 90,
        account: { monthlyUnitQuota: 700, retainRequestBodies: true },
      },
    });
    expect(await authenticateToken(store, SECRET, 'short', NOW)).toEqual({ ok: false, reason: 'malformed' });
    // The last character changed (to one it is not: a random secret ends in Z one time in 62).
    const altered = `${token.slice(0, -1)}${token.endsWith('Z') ? 'Y' : 'Z'}`;
    expect(await authenticateToken(store, SECRET, altered, NOW)).toEqual({
      ok: false,
      reason: 'unknown',
    });
  });

  it('refuses a key revoked by another node from the next turn of the event loop on', async () => {
    const { key, token } = await accountWithKey('Invented Revocation Works');
    expect((await authenticateToken(store, SECRET, token, NOW)).ok).toBe(true);
    expect(knownKeyCount(store)).toBeGreaterThan(0); // remembered
    await revokeKey(other, key.id, new Date(NOW.getTime() - 1));
    await nextTurn();
    expect(await authenticateToken(store, SECRET, token, NOW)).toMatchObject({
      ok: false,
      reason: 'revoked',
    });
  });

  it('sees a lowered quota and a scope taken away by a hand-run statement on the next turn', async () => {
    const { account, key, token } = await accountWithKey('Invented Settings Works');
    expect((await authenticateToken(store, SECRET, token, NOW)).ok).toBe(true);
    await other.execute(sql`UPDATE accounts SET monthly_unit_quota = 5 WHERE id = ${account.id}`);
    await other.execute(sql`UPDATE api_keys SET scopes = '["steam"]'::json WHERE id = ${key.id}`);
    await nextTurn();
    const result = await authenticateToken(store, SECRET, token, NOW);
    expect(result).toMatchObject({ ok: true, key: { scopes: ['steam'], account: { monthlyUnitQuota: 5 } } });
  });

  it('forgets a deleted key, and forgetKnownKeys empties the memory', async () => {
    const { key, token } = await accountWithKey('Invented Deletion Works');
    expect((await authenticateToken(store, SECRET, token, NOW)).ok).toBe(true);
    forgetKnownKeys(store);
    expect(knownKeyCount(store)).toBe(0);
    expect((await authenticateToken(store, SECRET, token, NOW)).ok).toBe(true);
    await other.execute(sql`DELETE FROM api_keys WHERE id = ${key.id}`);
    await nextTurn();
    expect(await authenticateToken(store, SECRET, token, NOW)).toEqual({ ok: false, reason: 'unknown' });
  });

  it('answers "expired" for an expired key without a successor', async () => {
    const { token } = await accountWithKey('Invented Expiry Works', {
      expiresAt: new Date(NOW.getTime() + 1000),
    });
    expect((await authenticateToken(store, SECRET, token, NOW)).ok).toBe(true);
    expect(await authenticateToken(store, SECRET, token, new Date(NOW.getTime() + 1000))).toMatchObject({
      ok: false,
      reason: 'expired',
    });
  });
});

describe('console users, sessions, audit and account figures on PostgreSQL', () => {
  /** The services read only the store, the config and the clock of their deps. */
  const deps = () =>
    ({ store, config: testConfig(), clock: () => NOW, engineVersion: 'test-engine' }) as unknown as AppDeps;

  it('accepts an invitation in one transaction, signs the user in, and deactivation ends the session', async () => {
    const d = deps();
    const { account } = await accountWithKey('Invented Invitation Works');
    const { token } = await createUserToken(d, {
      purpose: 'invitation',
      email: 'invited@example.invalid',
      ttlMs: 3_600_000,
      role: 'developer',
      accountIds: [account.id, 999_999], // an account that does not exist is left out
    });
    const { user } = await acceptInvitation(d, {
      token,
      name: 'Invented Person',
      password: 'a long password 1',
    });
    await expect(
      acceptInvitation(d, { token, name: 'Twice', password: 'a long password 1' }),
    ).rejects.toMatchObject({ kind: 'validation-failed' });
    const listed = (await listUsers(d)).items.find((u) => u.id === user.id);
    expect(listed).toMatchObject({
      email: 'invited@example.invalid',
      role: 'developer',
      accountIds: [account.id],
    });

    const signIn = await checkSignIn(d, 'Invited@Example.invalid', 'a long password 1');
    expect(signIn.ok).toBe(true);
    const session = await createSession(d, { id: user.id, role: 'developer' }, { ip: '192.0.2.7' });
    expect((await sessionOfAccessToken(d, session.accessJwt))?.user).toMatchObject({
      id: user.id,
      accountIds: [account.id],
    });
    const change = await updateUser(d, user.id, { active: false });
    expect(change).toMatchObject({ deactivated: true, sessionsRevoked: 1 });
    expect(await sessionOfAccessToken(d, session.accessJwt)).toBeUndefined();
    expect(await revokeUserSessions(d, user.id)).toBe(0);
  });

  it('counts failed sign-ins and locks the user at the threshold', async () => {
    const d = deps();
    const { token } = await createUserToken(d, {
      purpose: 'invitation',
      email: 'locked@example.invalid',
      ttlMs: 60_000,
    });
    await acceptInvitation(d, { token, name: 'Invented Locked', password: 'the right password' });
    let last;
    for (let i = 0; i < 5; i++) last = await checkSignIn(d, 'locked@example.invalid', 'a wrong password');
    expect(last).toMatchObject({ ok: false, reason: 'wrong-password-locked', lockOut: { failures: 5 } });
    expect(await checkSignIn(d, 'locked@example.invalid', 'the right password')).toMatchObject({
      ok: false,
      reason: 'locked',
    });
  });

  it('pages and counts the audit log, and shows an account’s units this month and live keys', async () => {
    const d = deps();
    const { account } = await accountWithKey('Invented Figures Works');
    await createKey(store, SECRET, {
      accountId: account.id,
      name: 'revoked',
      scopes: ['steam'],
      now: NOW,
    }).then(({ key }) => revokeKey(store, key.id, NOW));
    await store.execute(
      sql`INSERT INTO usage_daily (account_id, day, operation, requests, units, errors)
          VALUES (${account.id}, '2031-03-02', 'steam.state', 3, 7, 0), (${account.id}, '2031-03-14', 'steam.state', 2, 5, 0),
                 (${account.id}, '2031-02-27', 'steam.state', 9, 90, 0)`,
    );
    expect(await accountView(d, account)).toMatchObject({ unitsThisMonth: 12, keyCount: 1 });

    for (const n of [1, 2, 3]) {
      await recordAudit(
        d,
        { ip: '192.0.2.1' },
        { locals: {} },
        { action: 'pg.test', targetId: n, detail: { n } },
      );
    }
    const page = await listAudit(d, { action: 'pg.test' }, 1, 2);
    expect(page.total).toBe(3);
    expect(page.items.map((r) => r.targetId)).toEqual(['3', '2']);
    expect(page.items[0]).toMatchObject({
      actorEmail: '(anonymous)',
      ip: '192.0.2.1',
      detail: { n: 3 },
      at: NOW,
    });
  });
});
