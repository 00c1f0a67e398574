// Authenticated keys are remembered in memory (server/accounts/keys.ts) only while the database's
// auth_revision is unchanged; triggers (drizzle/0003_auth_revision.sql) bump it with every change
// that authentication reads. These tests change keys and accounts behind the app's back, with raw
// SQL on the same file from a second connection, as an operator's script or a second process
// would, and expect the very next request to see the change ("immediate revocation", issue text).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { authenticateToken, createKey, revokeKey } from '../../server/accounts/keys.js';
import { scopes as ALL_SCOPES } from '../../server/accounts/operations.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { createApp } from '../../server/app.js';
import { testConfig } from './helpers.js';

const dirs: string[] = [];
afterEach(() => {
  for (const dir of dirs.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
});

/** The app on a file database, and a second connection to the same file. */
async function fileHarness(quota = 1000) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-auth-rev-'));
  dirs.push(dir);
  const file = path.join(dir, 'auth.db');
  const { sqlite, db } = openDatabase(file);
  const store = sqliteStore(sqlite, db);
  runMigrations(db);
  const config = testConfig();
  const now = new Date('2031-03-14T10:00:00Z');
  const account = await createAccount(store, {
    name: 'Invented Revision Works',
    monthlyUnitQuota: quota,
    now,
  });
  const { key, token } = await createKey(store, config.secret, {
    accountId: account.id,
    name: 'revision key',
    scopes: ALL_SCOPES,
    rateLimitPerMinute: 1000,
    now,
  });
  const app = createApp({ store, config, clock: () => now, engineVersion: 'test-engine' });
  const authenticate = () => authenticateToken(store, config.secret, token, now);
  const other = new Database(file);
  const revision = () =>
    other.prepare('SELECT revision FROM auth_revision WHERE id = 1').pluck().get() as number;
  const usage = () => request(app).get('/v1/usage').set('Authorization', `Bearer ${token}`);
  return {
    app,
    store,
    other,
    revision,
    usage,
    authenticate,
    token,
    keyId: key.id,
    accountId: account.id,
    now,
  };
}

describe('remembered keys follow the database at once', () => {
  it('refuses a key revoked by another connection on the next request', async () => {
    const h = await fileHarness();
    expect((await h.usage()).status).toBe(200); // now remembered
    h.other.prepare('UPDATE api_keys SET revoked_at = ? WHERE id = ?').run(h.now.getTime() - 1, h.keyId);
    const res = await h.usage();
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/revoked/);
    h.other.close();
  });

  it('sees a scope taken away by another connection on the next request', async () => {
    const h = await fileHarness();
    expect((await h.usage()).status).toBe(200);
    h.other.prepare(`UPDATE api_keys SET scopes = '["steam"]' WHERE id = ?`).run(h.keyId);
    const res = await h.usage();
    expect(res.status).toBe(403);
    expect(res.body.detail).toContain('"usage"');
    h.other.close();
  });

  it('sees a lowered quota on the next request', async () => {
    const h = await fileHarness(1000);
    expect((await h.usage()).body.quota.limit).toBe(1000);
    h.other.prepare('UPDATE accounts SET monthly_unit_quota = 0 WHERE id = ?').run(h.accountId);
    expect((await h.usage()).body.quota.limit).toBe(0);
    // A lookup costs 1 unit (shared/operations.ts): refused before any calculation.
    const res = await request(h.app)
      .get('/v1/steam/saturation?pressure=101.325')
      .set('Authorization', `Bearer ${h.token}`);
    expect(res.status).toBe(429);
    expect(res.body.type).toBe('/problems/quota-exceeded');
    h.other.close();
  });

  it('forgets a deleted key', async () => {
    const h = await fileHarness();
    expect((await h.usage()).status).toBe(200);
    h.other.pragma('foreign_keys = ON');
    h.other.prepare('DELETE FROM api_keys WHERE id = ?').run(h.keyId);
    expect((await h.usage()).status).toBe(401);
    h.other.close();
  });

  it('does not bump the revision for metering writes (last_used_at, usage rows)', async () => {
    const h = await fileHarness();
    const before = h.revision();
    for (let i = 0; i < 3; i++) expect((await h.usage()).status).toBe(200);
    h.other.prepare('UPDATE api_keys SET last_used_at = ? WHERE id = ?').run(h.now.getTime(), h.keyId);
    expect(h.revision()).toBe(before);
    h.other.close();
  });

  it('bumps the revision for a new key and for a renamed plan only when authentication reads it', async () => {
    const h = await fileHarness();
    const before = h.revision();
    h.other.prepare(`UPDATE accounts SET name = 'Renamed Works' WHERE id = ?`).run(h.accountId);
    expect(h.revision()).toBe(before); // the name is not read by authentication
    h.other.prepare('UPDATE accounts SET retain_request_bodies = 1 WHERE id = ?').run(h.accountId);
    expect(h.revision()).toBe(before + 1);
    h.other.prepare('UPDATE api_keys SET rate_limit_per_minute = 5 WHERE id = ?').run(h.keyId);
    expect(h.revision()).toBe(before + 2);
    h.other.close();
  });

  it('sees a revocation made through its own connection within the same turn of the event loop', async () => {
    const h = await fileHarness();
    expect((await h.authenticate()).ok).toBe(true); // remembered, revision checked for this turn
    await revokeKey(h.store, h.keyId, h.now); // the TEMP twin of the trigger clears the memory at once
    expect(await h.authenticate()).toMatchObject({ ok: false, reason: 'revoked' });
    h.other.close();
  });

  it('sees a revocation by another connection from the next turn of the event loop on', async () => {
    const h = await fileHarness();
    expect((await h.authenticate()).ok).toBe(true);
    h.other.prepare('UPDATE api_keys SET revoked_at = ? WHERE id = ?').run(h.now.getTime() - 1, h.keyId);
    await new Promise((resolve) => setImmediate(resolve));
    expect(await h.authenticate()).toMatchObject({ ok: false, reason: 'revoked' });
    h.other.close();
  });
});
