// The committed PostgreSQL migrations (drizzle-pg/, from server/db/schema-pg.ts and the custom
// 0001_auth_revision.sql) applied to a throw-away PostgreSQL server with Drizzle's node-postgres
// migrator: every table and column is there, the auth-revision triggers behave as the SQLite ones
// (drizzle/0003_auth_revision.sql, exercised in tests/http/auth-revision.test.ts), and rows go in
// and come out through Drizzle with the app's types (Date, boolean, JSON, numeric ids).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { eq, is } from 'drizzle-orm';
import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { getTableConfig, PgTable } from 'drizzle-orm/pg-core';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as schema from '../../server/db/schema-pg.js';
import {
  findPostgresBinDir,
  startPostgres,
  testPool,
  type PostgresServer,
} from '../support/postgres-server.js';

const migrationsFolder = path.resolve(import.meta.dirname, '../../drizzle-pg');
const journal = JSON.parse(fs.readFileSync(path.join(migrationsFolder, 'meta', '_journal.json'), 'utf8')) as {
  entries: { tag: string }[];
};

let server: PostgresServer;
let pool: pg.Pool;
let db: NodePgDatabase<typeof schema>;

beforeAll(async () => {
  server = await startPostgres();
  pool = testPool(server.url, 3);
  db = drizzle({ client: pool, schema });
  await migrate(db, { migrationsFolder });
}, 120_000);

afterAll(async () => {
  await pool?.end();
  await server?.stop();
});

async function revision(): Promise<number> {
  const { rows } = await pool.query<{ revision: string }>('SELECT revision FROM auth_revision WHERE id = 1');
  return Number(rows[0]!.revision);
}

/** Every table that schema-pg.ts exports. */
function pgTables(): PgTable[] {
  return (Object.values(schema) as unknown[]).filter((v): v is PgTable => is(v, PgTable));
}

let keyCount = 0;
/** An account and one of its keys, inserted through Drizzle with the PostgreSQL schema. */
async function accountWithKey(name: string) {
  keyCount += 1;
  const [account] = await db.insert(schema.accounts).values({ name, monthlyUnitQuota: 500 }).returning();
  const [key] = await db
    .insert(schema.apiKeys)
    .values({
      publicId: `InventedPub${keyCount}`,
      accountId: account!.id,
      name: 'invented key',
      keyHash: `hash-${keyCount}`,
      scopes: ['steam', 'usage'],
      prefix: 'ebk1.Invented',
    })
    .returning();
  return { account: account!, key: key! };
}

describe('the throw-away server harness', () => {
  it('says what to install when the PostgreSQL binaries are missing, instead of skipping', () => {
    const empty = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-no-pg-'));
    try {
      fs.mkdirSync(path.join(empty, '15', 'bin'), { recursive: true }); // a version folder without binaries
      expect(() => findPostgresBinDir(empty, undefined)).toThrow(/apt-get install -y postgresql/);
    } finally {
      fs.rmSync(empty, { recursive: true, force: true });
    }
  });

  it('runs the cluster as an unprivileged system user, with the test role as its superuser', async () => {
    const { rows } = await pool.query<{ user: string; superuser: string }>(
      `SELECT current_user AS user, current_setting('is_superuser') AS superuser`,
    );
    expect(rows[0]).toEqual({ user: 'ebullio', superuser: 'on' });
    // initdb and postgres refuse root; as root the harness hands the cluster to `postgres`.
    expect(fs.statSync(path.join(server.dir, 'data')).uid).not.toBe(0);
  });
});

describe('PostgreSQL migrations', () => {
  it('records every committed migration once, and a second run applies none', async () => {
    const count = async () =>
      Number(
        (await pool.query<{ n: string }>('SELECT COUNT(*) AS n FROM drizzle.__drizzle_migrations')).rows[0]!
          .n,
      );
    expect(journal.entries.map((e) => e.tag)).toContain('0001_auth_revision');
    expect(await count()).toBe(journal.entries.length);
    await migrate(db, { migrationsFolder });
    expect(await count()).toBe(journal.entries.length);
  });

  it('seeds the single auth_revision row at 0 and refuses a second one', async () => {
    const { rows } = await pool.query('SELECT id, revision FROM auth_revision');
    expect(rows).toEqual([{ id: 1, revision: '0' }]);
    await expect(pool.query('INSERT INTO auth_revision (id, revision) VALUES (2, 0)')).rejects.toThrow(
      /check/i,
    );
  });

  it('creates every table of schema-pg.ts with its columns, nullability and types', async () => {
    const { rows } = await pool.query<{
      table_name: string;
      column_name: string;
      is_nullable: 'YES' | 'NO';
      data_type: string;
      identity_generation: string | null;
    }>(
      `SELECT table_name, column_name, is_nullable, data_type, identity_generation
         FROM information_schema.columns WHERE table_schema = 'public'`,
    );
    const actual = new Map<string, Map<string, (typeof rows)[number]>>();
    for (const row of rows) {
      if (!actual.has(row.table_name)) actual.set(row.table_name, new Map());
      actual.get(row.table_name)!.set(row.column_name, row);
    }
    const tables = pgTables();
    expect(tables.length).toBe(21);
    for (const table of tables) {
      const config = getTableConfig(table);
      const columns = actual.get(config.name);
      expect(columns, `table ${config.name}`).toBeDefined();
      expect([...columns!.keys()].sort()).toEqual(config.columns.map((c) => c.name).sort());
      for (const column of config.columns) {
        const found = columns!.get(column.name)!;
        expect(found.is_nullable, `${config.name}.${column.name}`).toBe(column.notNull ? 'NO' : 'YES');
        expect(found.data_type, `${config.name}.${column.name}`).toBe(column.getSQLType());
      }
    }
    // Rowid keys become identities that only the sequence fills.
    expect(actual.get('usage_events')!.get('id')).toMatchObject({
      data_type: 'bigint',
      identity_generation: 'ALWAYS',
    });
    expect(actual.get('accounts')!.get('id')).toMatchObject({
      data_type: 'integer',
      identity_generation: 'ALWAYS',
    });
    expect(actual.get('auth_revision')).toBeDefined();
  });

  it('creates the indexes and foreign keys of the schema', async () => {
    const { rows: indexes } = await pool.query<{ indexname: string }>(
      `SELECT indexname FROM pg_indexes WHERE schemaname = 'public'`,
    );
    const names = indexes.map((r) => r.indexname);
    for (const name of [
      'api_keys_account_idx',
      'usage_events_account_at_idx',
      'request_log_at_idx',
      'request_log_account_at_idx',
      'stored_liquors_account_slug_version_idx',
      'statements_account_month_idx',
      'audit_log_at_idx',
      'mail_log_at_idx',
      'console_sessions_user_idx',
    ]) {
      expect(names).toContain(name);
    }
    const { rows: fks } = await pool.query<{ n: string }>(
      `SELECT COUNT(*) AS n FROM information_schema.table_constraints
        WHERE table_schema = 'public' AND constraint_type = 'FOREIGN KEY'`,
    );
    // The foreign keys declared in schema-pg.ts (and schema.ts: the parity test compares them).
    const declared = pgTables().reduce((n, t) => n + getTableConfig(t).foreignKeys.length, 0);
    expect(Number(fks[0]!.n)).toBe(declared);
  });
});

describe('the auth revision on PostgreSQL follows the SQLite triggers', () => {
  it('bumps the revision for a new key and for a revocation of it', async () => {
    const before = await revision();
    const { key } = await accountWithKey('Invented Revoke Works');
    expect(await revision()).toBe(before + 1);
    await pool.query('UPDATE api_keys SET revoked_at = now() WHERE id = $1', [key.id]);
    expect(await revision()).toBe(before + 2);
  });

  it('leaves it alone for metering writes and for columns authentication does not read', async () => {
    const { account, key } = await accountWithKey('Invented Metering Works');
    const before = await revision();
    await pool.query('UPDATE api_keys SET last_used_at = now() WHERE id = $1', [key.id]);
    await pool.query(`UPDATE accounts SET name = 'Renamed Works' WHERE id = $1`, [account.id]);
    await db.insert(schema.usageEvents).values({
      at: new Date(),
      accountId: account.id,
      keyId: key.id,
      operation: 'usage',
      status: 200,
      units: 0,
      latencyMs: 1,
      requestId: 'req-metering',
      engineVersion: 'test-engine',
    });
    expect(await revision()).toBe(before);
  });

  it('bumps it for a lowered quota, body retention, a re-limited key and a deleted key or account', async () => {
    const { account, key } = await accountWithKey('Invented Quota Works');
    const before = await revision();
    await pool.query('UPDATE accounts SET monthly_unit_quota = 0 WHERE id = $1', [account.id]);
    expect(await revision()).toBe(before + 1);
    await pool.query('UPDATE accounts SET retain_request_bodies = true WHERE id = $1', [account.id]);
    expect(await revision()).toBe(before + 2);
    await pool.query('UPDATE api_keys SET rate_limit_per_minute = 5 WHERE id = $1', [key.id]);
    expect(await revision()).toBe(before + 3);
    await pool.query(`UPDATE api_keys SET scopes = '["steam"]' WHERE id = $1`, [key.id]);
    expect(await revision()).toBe(before + 4);
    await pool.query('DELETE FROM api_keys WHERE id = $1', [key.id]);
    expect(await revision()).toBe(before + 5);
    await pool.query('DELETE FROM accounts WHERE id = $1', [account.id]);
    expect(await revision()).toBe(before + 6);
  });

  it('keeps the revision when the revoking transaction rolls back', async () => {
    const { key } = await accountWithKey('Invented Rollback Works');
    const before = await revision();
    const client = await pool.connect();
    try {
      await client.query('BEGIN');
      await client.query('UPDATE api_keys SET revoked_at = now() WHERE id = $1', [key.id]);
      await client.query('ROLLBACK');
    } finally {
      client.release();
    }
    expect(await revision()).toBe(before);
  });

  it('tells listening connections the new revision when a revocation commits', async () => {
    const { key } = await accountWithKey('Invented Notice Works');
    const listener = new pg.Client({ connectionString: server.url });
    await listener.connect();
    try {
      await listener.query('LISTEN ebullio_auth_revision');
      const notice = new Promise<string | undefined>((resolve) =>
        listener.once('notification', (n) => resolve(n.payload)),
      );
      await pool.query('UPDATE api_keys SET revoked_at = now() WHERE id = $1', [key.id]);
      expect(await notice).toBe(String(await revision()));
    } finally {
      await listener.end();
    }
  });
});

describe('rows through Drizzle with the PostgreSQL schema', () => {
  it('stores an account with its defaults as the app reads them', async () => {
    const before = Date.now();
    const [account] = await db
      .insert(schema.accounts)
      .values({ name: 'Invented Defaults Works' })
      .returning();
    expect(account).toMatchObject({
      plan: 'starter',
      monthlyUnitQuota: 10_000,
      retainRequestBodies: false,
      billingEmail: null,
    });
    expect(typeof account!.id).toBe('number');
    expect(account!.createdAt).toBeInstanceOf(Date);
    // now() on the server, within a generous window of this process's clock.
    expect(Math.abs(account!.createdAt.getTime() - before)).toBeLessThan(60_000);
  });

  it('round-trips an API key: scopes as an array, times as Dates to the millisecond', async () => {
    const { account } = await accountWithKey('Invented Key Works');
    const expiresAt = new Date('2031-03-14T10:00:00.123Z');
    const values = {
      publicId: 'InventedKey1',
      accountId: account.id,
      name: 'round trip',
      keyHash: 'hash-round-trip',
      scopes: ['steam', 'evaporators', 'usage'],
      rateLimitPerMinute: 120,
      expiresAt,
      prefix: 'ebk1.InventedKey1',
    };
    const [inserted] = await db.insert(schema.apiKeys).values(values).returning();
    const [read] = await db.select().from(schema.apiKeys).where(eq(schema.apiKeys.id, inserted!.id));
    expect(read!.scopes).toEqual(['steam', 'evaporators', 'usage']);
    expect(read!.expiresAt!.getTime()).toBe(expiresAt.getTime());
    expect(read!.revokedAt).toBeNull();
    expect(read!.rateLimitPerMinute).toBe(120);
    // The key hash is unique, as on SQLite.
    await expect(db.insert(schema.apiKeys).values({ ...values, publicId: 'InventedKey2' })).rejects.toThrow();
  });

  it('stores usage events with growing numeric ids, and keeps them when their key is deleted', async () => {
    const { account, key } = await accountWithKey('Invented Usage Works');
    const at = new Date('2031-03-14T10:00:00.456Z');
    const event = (requestId: string) => ({
      at,
      accountId: account.id,
      keyId: key.id,
      operation: 'steam.saturation',
      status: 200,
      units: 1,
      latencyMs: 3,
      requestId,
      engineVersion: 'test-engine',
    });
    const rows = await db
      .insert(schema.usageEvents)
      .values([event('req-1'), event('req-2')])
      .returning();
    expect(typeof rows[0]!.id).toBe('number');
    expect(rows[1]!.id).toBeGreaterThan(rows[0]!.id);
    expect(rows[0]!.at.getTime()).toBe(at.getTime());
    // Ids come from the sequence only (generated always), as the SQLite rowid does.
    await expect(
      pool.query(
        `INSERT INTO usage_events (id, at, account_id, operation, status, units, latency_ms, request_id, engine_version)
         VALUES (1, now(), $1, 'usage', 200, 0, 1, 'req-x', 'test-engine')`,
        [account.id],
      ),
    ).rejects.toThrow(/generated always|cannot insert/i);
    // key_id is set null on the key's deletion (the usage stays billed to the account) ...
    await db.delete(schema.apiKeys).where(eq(schema.apiKeys.id, key.id));
    const kept = await db
      .select()
      .from(schema.usageEvents)
      .where(eq(schema.usageEvents.accountId, account.id));
    expect(kept.map((r) => r.keyId)).toEqual([null, null]);
    // ... and the events go with their account.
    await db.delete(schema.accounts).where(eq(schema.accounts.id, account.id));
    expect(
      await db.select().from(schema.usageEvents).where(eq(schema.usageEvents.accountId, account.id)),
    ).toEqual([]);
  });
});
