// Two nodes of the service (two createApp, each with its own database connection and in-process
// key cache, on the same database file) sharing one throw-away redis-server started here: limits
// count once for both, a key revoked through one node is refused by the other, a Redis outage is
// a 503 problem (never a 500, never an unlimited door), and closing the app closes its
// connections. Without REDIS_URL every limiter stays in memory (the other rate-limit tests).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createClient } from 'redis';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { authenticateToken, createKey, knownKeyCount } from '../../server/accounts/keys.js';
import { closeApp, createApp, type AppDeps } from '../../server/app.js';
import { ConfigError, loadConfig, type Config } from '../../server/config.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { KEY_FAILURE_LIMIT } from '../../server/http/middleware/auth.js';
import { csrf, Jar } from '../console-api/auth-harness.js';
import { startTestRedis, type TestRedis } from '../support/redis-server.js';
import { startServerProcess } from '../support/server-process.js';
import { ALL_SCOPES, testConfig } from './helpers.js';

let redis: TestRedis;
const admin = () => createClient({ url: redis.url });

beforeAll(async () => {
  redis = await startTestRedis();
});
afterAll(async () => {
  await redis?.close();
});

const dirs: string[] = [];
const opened: AppDeps[] = [];
beforeEach(async () => {
  const c = await admin().connect();
  await c.flushAll();
  await c.close();
});
afterEach(async () => {
  for (const deps of opened.splice(0)) {
    await closeApp(deps);
    deps.store.sqlite!.close();
  }
  for (const dir of dirs.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
});

const NOW = new Date('2031-03-14T10:00:00Z');

/** Two nodes on one database file and one Redis; a key allowing `rateLimit` requests a minute. */
async function twoNodes(opts: { rateLimit?: number; config?: Partial<Config>; redis?: boolean } = {}) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-shared-'));
  dirs.push(dir);
  const file = path.join(dir, 'shared.db');
  const config = testConfig({ redisUrl: opts.redis === false ? undefined : redis.url, ...opts.config });
  const node = () => {
    const { sqlite, db } = openDatabase(file);
    const store = sqliteStore(sqlite, db);
    runMigrations(db);
    const deps: AppDeps = { store, config, clock: () => NOW, engineVersion: 'test-engine' };
    opened.push(deps);
    return deps;
  };
  const a = node();
  const b = node();
  const account = await createAccount(a.store, {
    name: 'Invented Shared Works',
    monthlyUnitQuota: 10_000,
    now: NOW,
  });
  const { key, token } = await createKey(a.store, config.secret, {
    accountId: account.id,
    name: 'shared key',
    scopes: ALL_SCOPES,
    rateLimitPerMinute: opts.rateLimit ?? 1000,
    now: NOW,
  });
  const appA = createApp(a);
  const appB = createApp(b);
  if (opts.redis !== false) {
    expect(await a.shared!.ready(5_000)).toBe(true);
    expect(await b.shared!.ready(5_000)).toBe(true);
  }
  const usage = (app: typeof appA, bearer = token) =>
    request(app).get('/v1/usage').set('Authorization', `Bearer ${bearer}`);
  const authenticate = (deps: AppDeps) => authenticateToken(deps.store, config.secret, token, NOW);
  return { a, b, appA, appB, token, keyId: key.id, usage, authenticate };
}

async function until(what: string, check: () => boolean | Promise<boolean>, ms = 10_000): Promise<void> {
  const deadline = Date.now() + ms;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

describe('limits shared between nodes through Redis', () => {
  it("counts a key's per-minute limit once for both nodes", async () => {
    const n = await twoNodes({ rateLimit: 5 });
    const statuses: number[] = [];
    for (let i = 0; i < 7; i++) statuses.push((await n.usage(i % 2 === 0 ? n.appA : n.appB)).status);
    // 5 allowed in all, not 5 per node.
    expect(statuses).toEqual([200, 200, 200, 200, 200, 429, 429]);
    const last = await n.usage(n.appB);
    expect(last.body.type).toBe('/problems/rate-limited');
    expect(last.headers.ratelimit).toMatch(/limit=5, remaining=0/);
  });

  it('without REDIS_URL each node counts alone (the single-node behaviour)', async () => {
    const n = await twoNodes({ rateLimit: 3, redis: false });
    expect(n.a.shared).toBeUndefined();
    const statuses: number[] = [];
    for (let i = 0; i < 8; i++) statuses.push((await n.usage(i % 2 === 0 ? n.appA : n.appB)).status);
    expect(statuses).toEqual([200, 200, 200, 200, 200, 200, 429, 429]);
  });

  it('counts refused keys from one address once for both nodes', async () => {
    const n = await twoNodes();
    const wrong = `${n.token.slice(0, -4)}zzzz`;
    for (let i = 0; i < KEY_FAILURE_LIMIT; i++) {
      const res = await n.usage(i % 2 === 0 ? n.appA : n.appB, wrong);
      expect(res.status).toBe(401);
    }
    for (const app of [n.appA, n.appB]) {
      const res = await n.usage(app, wrong);
      expect(res.status).toBe(429);
      expect(res.body.detail).toMatch(/refused API keys/);
      // The address's window began at its first refusal, moments ago: most of the minute remains.
      expect(Number(res.headers['retry-after'])).toBeGreaterThanOrEqual(50);
      expect(Number(res.headers['retry-after'])).toBeLessThanOrEqual(60);
    }
  });

  it('counts console sign-in attempts from one address once for both nodes', async () => {
    const n = await twoNodes({ config: { consoleSignInLimit: 3 } });
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) {
      const app = i % 2 === 0 ? n.appA : n.appB;
      const jar = new Jar();
      const token = await csrf({ app } as Parameters<typeof csrf>[0], jar);
      const res = await request(app)
        .post('/console-api/auth/sign-in')
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', token)
        .send({ email: `nobody${i}@ebullio.invalid`, password: 'not the password' });
      statuses.push(res.status);
    }
    expect(statuses).toEqual([401, 401, 401, 429]);
  });
});

describe('key-cache invalidation between nodes', () => {
  it("refuses on node B a key revoked through node A, B's remembered copy dropped by the message", async () => {
    const n = await twoNodes();
    expect((await n.usage(n.appB)).status).toBe(200);
    expect(knownKeyCount(n.b.store)).toBe(1); // B remembers the key
    const before = n.b.shared!.invalidationsReceived;
    // A revocation written through A's own connection (as A's console would).
    n.a.store
      .sqlite!.prepare('UPDATE api_keys SET revoked_at = ? WHERE id = ?')
      .run(NOW.getTime() - 1, n.keyId);
    await until('the invalidation to reach B', () => n.b.shared!.invalidationsReceived > before);
    // Dropped by the message alone: B has served no request since the revocation.
    expect(knownKeyCount(n.b.store)).toBe(0);
    const res = await n.usage(n.appB);
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/revoked/);
  });

  it.each([
    ['a scope change', `UPDATE api_keys SET scopes = '["steam"]' WHERE id = ?`],
    ['an expiry change', 'UPDATE api_keys SET expires_at = 1 WHERE id = ?'],
    ['a rate-limit change', 'UPDATE api_keys SET rate_limit_per_minute = 9 WHERE id = ?'],
    [
      "an account's quota change",
      'UPDATE accounts SET monthly_unit_quota = 5 WHERE id = (SELECT account_id FROM api_keys WHERE id = ?)',
    ],
    ['a deleted key', 'DELETE FROM api_keys WHERE id = ?'],
  ])('announces %s made through node A to node B', async (_what, sql) => {
    const n = await twoNodes();
    expect((await n.authenticate(n.b)).ok).toBe(true);
    expect(knownKeyCount(n.b.store)).toBe(1);
    n.a.store.sqlite!.prepare(sql).run(n.keyId);
    await until('B to hear of it', () => n.b.shared!.invalidationsReceived === 1);
    expect(knownKeyCount(n.b.store)).toBe(0);
  });

  it('does not echo a node its own announcement', async () => {
    const n = await twoNodes();
    n.a.store.sqlite!.prepare('UPDATE api_keys SET rate_limit_per_minute = 7 WHERE id = ?').run(n.keyId);
    await until('B to hear of it', () => n.b.shared!.invalidationsReceived === 1);
    expect(n.a.shared!.invalidationsReceived).toBe(0);
  });
});

describe('a Redis outage', () => {
  it('answers limited requests with a 503 problem and Retry-After, and recovers when Redis is back', async () => {
    const n = await twoNodes();
    expect((await n.usage(n.appA)).status).toBe(200);
    await redis.stop();
    try {
      const res = await n.usage(n.appA);
      expect(res.status).toBe(503);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      expect(res.body.type).toBe('/problems/busy');
      expect(res.body.detail).toMatch(/limits cannot be checked/);
      expect(res.headers['retry-after']).toBe('5');

      const jar = new Jar();
      const token = await csrf({ app: n.appB } as Parameters<typeof csrf>[0], jar);
      const signIn = await request(n.appB)
        .post('/console-api/auth/sign-in')
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', token)
        .send({ email: 'nobody@ebullio.invalid', password: 'not the password' });
      expect(signIn.status).toBe(503);
      expect(signIn.body.type).toBe('/problems/busy');
      expect(signIn.headers['retry-after']).toBe('5');
    } finally {
      await redis.start();
    }
    await until('node A to answer again', async () => (await n.usage(n.appA)).status === 200);
    await until('node B to answer again', async () => (await n.usage(n.appB)).status === 200);
  });

  it('answers 503 when Redis is too slow to answer within a second, and serves again after', async () => {
    const n = await twoNodes();
    expect((await n.usage(n.appA)).status).toBe(200);
    const c = await admin().connect();
    try {
      await c.sendCommand(['CLIENT', 'PAUSE', '2500', 'ALL']); // every client's commands wait
      const started = Date.now();
      const res = await n.usage(n.appA);
      expect(res.status).toBe(503);
      expect(res.body.type).toBe('/problems/busy');
      expect(Date.now() - started).toBeLessThan(2_400); // the command timeout, not the pause
    } finally {
      await c.sendCommand(['CLIENT', 'UNPAUSE']);
      await c.close();
    }
    await until('node A to answer again', async () => (await n.usage(n.appA)).status === 200);
  });
});

describe('the key cache while Redis is down', () => {
  it('still drops a revoked key through auth_revision, without the message', async () => {
    const n = await twoNodes();
    expect((await n.authenticate(n.b)).ok).toBe(true); // B remembers the key
    await redis.stop();
    try {
      n.a.store
        .sqlite!.prepare('UPDATE api_keys SET revoked_at = ? WHERE id = ?')
        .run(NOW.getTime() - 1, n.keyId);
      await new Promise((r) => setImmediate(r)); // a later turn, as the next request would be
      expect(n.b.shared!.invalidationsReceived).toBe(0);
      expect(await n.authenticate(n.b)).toMatchObject({ ok: false, reason: 'revoked' });
    } finally {
      await redis.start();
    }
  });
});

describe('lifecycle', () => {
  it("closeApp closes the node's Redis connections", async () => {
    const n = await twoNodes();
    const c = await admin().connect();
    const ours = async () =>
      (await c.clientList()).filter((x) => x.name === 'ebullio' || x.name === 'ebullio-subscriber').length;
    try {
      expect(await ours()).toBe(4); // two nodes × (commands + subscriber)
      await closeApp(n.a);
      await until('node A to disconnect', async () => (await ours()) === 2);
      await closeApp(n.b);
      await until('node B to disconnect', async () => (await ours()) === 0);
      await closeApp(n.b); // idempotent
    } finally {
      await c.close();
    }
  });

  it('a server process connects at start and closes its connections after the drain on SIGTERM', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-shared-proc-'));
    dirs.push(dir);
    const proc = startServerProcess({
      PORT: '0',
      DB_FILE: path.join(dir, 'e.db'),
      EBULLIO_SECRET: 'p'.repeat(40),
      REDIS_URL: redis.url,
      SHUTDOWN_GRACE_MS: '0',
      MAIL_CAPTURE: '0',
      FAKE_PAYMENTS: '0',
    });
    const c = await admin().connect();
    try {
      await proc.port;
      expect(proc.output()).toContain('[start-up] shared state on Redis');
      const named = async () => (await c.clientList()).filter((x) => x.name.startsWith('ebullio')).length;
      expect(await named()).toBe(2);
      proc.child.kill('SIGTERM');
      const exit = await proc.exited;
      const out = proc.output();
      expect({ ...exit, out }).toMatchObject({ code: 0 });
      // Closed by the app, after the HTTP drain, before the database.
      expect(out.indexOf('[shutdown] Redis connections closed')).toBeGreaterThan(
        out.indexOf('[shutdown] SIGTERM'),
      );
      expect(out.indexOf('[shutdown] Redis connections closed')).toBeLessThan(out.indexOf('[shutdown] done'));
      await until('the connections to go', async () => (await named()) === 0);
    } finally {
      if (proc.child.exitCode === null) proc.child.kill('SIGKILL');
      await c.close();
    }
  }, 30_000);

  it('refuses a malformed REDIS_URL at start-up', () => {
    const env = { DB_FILE: ':memory:', EBULLIO_SECRET: 'x'.repeat(32) };
    expect(() => loadConfig({ ...env, REDIS_URL: 'localhost:6379' })).toThrow(ConfigError);
    expect(() => loadConfig({ ...env, REDIS_URL: 'http://localhost:6379' })).toThrow(/redis:\/\//);
    expect(() => loadConfig({ ...env, REDIS_URL: 'redis://h:6379/x' })).toThrow(/database number/);
    expect(loadConfig({ ...env, REDIS_URL: 'redis://127.0.0.1:6379/2' }).redisUrl).toBe(
      'redis://127.0.0.1:6379/2',
    );
    expect(loadConfig(env).redisUrl).toBeUndefined();
  });
});
