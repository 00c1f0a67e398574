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
import { openPostgresStore, type Store } from '../../server/db/store.js';
import { ALL_SCOPES } from '../http/helpers.js';
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
    expect(await authenticateToken(store, SECRET, `${token.slice(0, -1)}Z`, NOW)).toEqual({
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
