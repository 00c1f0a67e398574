// Start-up: configuration, the generated server secret, the bootstrap variables, seeding, and a
// graceful shutdown of the real process (spawned with `node --import tsx server/main.ts`).
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { verifyUserPassword } from '../../server/accounts/accounts.js';
import { ConfigError, loadConfig } from '../../server/config.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { createApp } from '../../server/app.js';
import { bootstrap } from '../../server/seed/bootstrap.js';
import { DEMO_ACCOUNT_NAME } from '../../server/seed/demo.js';
import { startServerProcess } from '../support/server-process.js';
import { testConfig } from './helpers.js';

const BOOT_KEY = 'ebl_live_BootBootBoot_0123456789abcdefghijABCDEFGHIJKL';
const tempDir = () => fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-core-'));

describe('configuration', () => {
  it('rejects a BOOTSTRAP_API_KEY shorter than 32 characters with a clear start-up error', () => {
    const dir = tempDir();
    expect(() => loadConfig({ DB_FILE: path.join(dir, 'e.db'), BOOTSTRAP_API_KEY: 'too-short-key' })).toThrow(
      ConfigError,
    );
    expect(() => loadConfig({ DB_FILE: path.join(dir, 'e.db'), BOOTSTRAP_API_KEY: 'too-short-key' })).toThrow(
      /BOOTSTRAP_API_KEY must be 32 to 256 characters/,
    );
  });

  it('uses the documented defaults', () => {
    const config = loadConfig({ EBULLIO_SECRET: 's'.repeat(32) });
    expect(config.port).toBe(8080);
    expect(config.dbFile).toBe('./data/ebullio.db');
    expect(config.requestLogRetentionDays).toBe(30);
  });

  it('generates the server secret once, mode 0600, and reuses it on the next start', () => {
    const dir = tempDir();
    const env = { DB_FILE: path.join(dir, 'db', 'e.db') };
    const first = loadConfig(env);
    const file = path.join(dir, 'db', 'server-secret');
    expect(first.secretSource).toBe(file);
    expect(fs.statSync(file).mode & 0o777).toBe(0o600);
    expect(first.secret).toHaveLength(32); // 32 random bytes
    const second = loadConfig(env);
    expect(second.secret.equals(first.secret)).toBe(true);
  });
});

describe('seed and bootstrap variables', () => {
  it('seeds an empty database, registers the bootstrap key with all scopes on the demo account, and creates the admin once', async () => {
    const { sqlite, db } = openDatabase(':memory:');
    const store = sqliteStore(sqlite, db);
    runMigrations(db);
    const config = testConfig({
      bootstrapApiKey: BOOT_KEY,
      bootstrapAdminEmail: 'Admin@Example.invalid',
      bootstrapAdminPassword: 'correct horse battery staple',
    });
    const now = new Date('2031-03-14T10:00:00Z');
    expect(await bootstrap(store, config, now, 'test')).toMatchObject({
      seeded: true,
      apiKeyRegistered: true,
      adminCreated: true,
      demoCredentials: { operatorEmail: 'operator@ebullio.invalid' },
    });
    expect(await bootstrap(store, config, now, 'test')).toEqual({
      seeded: false,
      apiKeyRegistered: false,
      adminCreated: false,
    });
    const accounts = sqlite.prepare('SELECT name FROM accounts ORDER BY id').all();
    expect(accounts).toHaveLength(2);
    const demoUsage = sqlite.prepare('SELECT COUNT(*) AS n FROM usage_daily').get() as { n: number };
    expect(demoUsage.n).toBeGreaterThan(0);
    expect(
      (await verifyUserPassword(store, 'admin@example.invalid', 'correct horse battery staple'))?.role,
    ).toBe('admin');
    expect(await verifyUserPassword(store, 'admin@example.invalid', 'wrong password here')).toBeUndefined();

    const app = createApp({ store, config, clock: () => now, engineVersion: 'test' });
    const res = await request(app).get('/v1/usage').set('Authorization', `Bearer ${BOOT_KEY}`);
    expect(res.status).toBe(200);
    const key = sqlite
      .prepare(
        'SELECT a.name, k.scopes FROM api_keys k JOIN accounts a ON a.id = k.account_id WHERE k.public_id = ?',
      )
      .get('BootBootBoot') as {
      name: string;
      scopes: string;
    };
    expect(key.name).toBe(DEMO_ACCOUNT_NAME);
    expect(JSON.parse(key.scopes)).toEqual(['steam', 'liquors', 'evaporators', 'batch', 'usage']);
  });
});

describe('graceful shutdown', () => {
  it('finishes an in-flight request after SIGTERM, records it, then exits 0', async () => {
    const dir = tempDir();
    const dbFile = path.join(dir, 'e.db');
    const server = startServerProcess({ PORT: '0', DB_FILE: dbFile, BOOTSTRAP_API_KEY: BOOT_KEY });
    const port = await server.port;

    // An in-flight request: headers and half the body sent, the rest after SIGTERM.
    const body = JSON.stringify({ note: 'slow body' });
    const socket = net.connect(port, '127.0.0.1');
    await new Promise<void>((resolve) => socket.once('connect', () => resolve()));
    let response = '';
    socket.on('data', (d) => (response += d.toString()));
    const ended = new Promise<void>((resolve) => socket.on('close', () => resolve()));
    socket.write(
      `GET /v1/usage HTTP/1.1\r\nHost: localhost\r\nAuthorization: Bearer ${BOOT_KEY}\r\n` +
        `X-Request-Id: in-flight-1\r\nContent-Type: application/json\r\nContent-Length: ${body.length}\r\n\r\n` +
        body.slice(0, 5),
    );
    await new Promise((r) => setTimeout(r, 300));
    server.child.kill('SIGTERM');
    await new Promise((r) => setTimeout(r, 500));
    socket.write(body.slice(5));
    await ended;

    expect(response).toMatch(/^HTTP\/1\.1 200 /);
    expect(response).toMatch(/x-request-id: in-flight-1/i);
    expect((await server.exited).code).toBe(0);
    expect(server.output()).toContain('[shutdown] done');
    const check = new Database(dbFile, { readonly: true });
    const row = check.prepare("SELECT status FROM usage_events WHERE request_id = 'in-flight-1'").get();
    check.close();
    expect(row).toEqual({ status: 200 });
  }, 30_000);
});

describe('first start with no bootstrap variables', () => {
  it('shows the demo sign-in and demo key once, and both work; a second start shows nothing', async () => {
    const dir = tempDir();
    const dbFile = path.join(dir, 'first.db');
    const env = {
      PORT: '0',
      DB_FILE: dbFile,
      NODE_ENV: 'development',
      BOOTSTRAP_API_KEY: '',
      BOOTSTRAP_ADMIN_EMAIL: '',
      BOOTSTRAP_ADMIN_PASSWORD: '',
      MAIL_CAPTURE: '0',
      FAKE_PAYMENTS: '0',
    };
    const first = startServerProcess(env);
    const port = await first.port;
    const signIn = /demo console sign-in \(shown once\): (\S+) \/ (\S+)/.exec(first.output());
    const key = /demo API key \(shown once\): (\S+)/.exec(first.output());
    expect(signIn).not.toBeNull();
    expect(key).not.toBeNull();

    // The shown key was stored: the API accepts it (a usage read needs no calculation).
    const usage = await fetch(`http://127.0.0.1:${port}/v1/usage`, {
      headers: { authorization: `Bearer ${key![1]}` },
    });
    expect(usage.status).toBe(200);
    first.child.kill('SIGTERM');
    expect((await first.exited).code).toBe(0);

    // The shown password was stored: it verifies against the operator's stored hash.
    const { db, sqlite } = openDatabase(dbFile);
    const store = sqliteStore(sqlite, db);
    expect(await verifyUserPassword(store, signIn![1]!, signIn![2]!)).toBeDefined();
    sqlite.close();

    // Nothing secret is shown again on the next start.
    const second = startServerProcess(env);
    await second.port;
    expect(second.output()).not.toMatch(/shown once/);
    second.child.kill('SIGTERM');
    expect((await second.exited).code).toBe(0);
  }, 40_000);

  it('prints the demo console users and their shared password once when DEMO_CONSOLE_USERS=1, and the password signs in', async () => {
    const dbFile = path.join(tempDir(), 'demo-users.db');
    const env = {
      PORT: '0',
      DB_FILE: dbFile,
      NODE_ENV: 'development',
      DEMO_CONSOLE_USERS: '1',
      BOOTSTRAP_API_KEY: '',
      BOOTSTRAP_ADMIN_EMAIL: '',
      BOOTSTRAP_ADMIN_PASSWORD: '',
      MAIL_CAPTURE: '0',
      FAKE_PAYMENTS: '0',
    };
    const first = startServerProcess(env);
    await first.port;
    const users = [...first.output().matchAll(/demo console user (\S+) created/g)].map((m) => m[1]!);
    const password = /demo console users' shared password \(shown once\): (\S+)/.exec(first.output());
    expect(users).toHaveLength(2);
    expect(password).not.toBeNull();
    first.child.kill('SIGTERM');
    expect((await first.exited).code).toBe(0);

    // The printed password is the one stored for both users.
    const { db, sqlite } = openDatabase(dbFile);
    const store = sqliteStore(sqlite, db);
    for (const email of users) expect(await verifyUserPassword(store, email, password![1]!)).toBeDefined();
    sqlite.close();

    const second = startServerProcess(env);
    await second.port;
    expect(second.output()).not.toMatch(/shown once/);
    second.child.kill('SIGTERM');
    expect((await second.exited).code).toBe(0);
  }, 40_000);
});
