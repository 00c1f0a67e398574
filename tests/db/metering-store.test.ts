// Metering and the usage / request-log reads on both stores: the SQLite group commit (prepared
// statements, one better-sqlite3 transaction) and the PostgreSQL one (one transaction of
// multi-row inserts and a qualified roll-up upsert) write the same rows, and every report reads
// them back with the same numbers (PostgreSQL returns sums, counts and bigint ids as strings).
// PostgreSQL is a throw-away server (tests/support/postgres-server.ts); each test gets a fresh
// database on it.
import { sql } from 'drizzle-orm';
import express, { type ErrorRequestHandler } from 'express';
import pg from 'pg';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  committedUnitsThisMonth,
  meteringWriter,
  QuotaSpentElsewhere,
  recordRequest,
  type RequestRecord,
} from '../../server/accounts/metering.js';
import { pruneRequestLog } from '../../server/accounts/request-log.js';
import {
  countRequestLog,
  getRequestLogEntry,
  listRequestLog,
  queryRequestLog,
} from '../../server/accounts/request-log-query.js';
import { listUsageRows, overview, usageReport } from '../../server/accounts/usage-report.js';
import { monthUsage, unitsUsedThisMonth } from '../../server/accounts/usage.js';
import {
  openPostgresStore,
  openSqliteStore,
  readInstant,
  type Dialect,
  type Store,
} from '../../server/db/store.js';
import type { AppDeps } from '../../server/deps.js';
import { metering } from '../../server/http/middleware/metering.js';
import { chargeUnits, requireOperation } from '../../server/http/middleware/operation.js';
import { requestId } from '../../server/http/middleware/request-id.js';
import { ProblemError } from '../../server/http/problem.js';
import { startPostgres, testPool, type PostgresServer } from '../support/postgres-server.js';
import { testConfig } from '../http/helpers.js';

let server: PostgresServer;
let admin: pg.Pool;
const opened: Store[] = [];
let databases = 0;

beforeAll(async () => {
  server = await startPostgres();
  admin = testPool(server.url, 1);
}, 120_000);

afterAll(async () => {
  for (const store of opened) await store.close();
  await admin?.end();
  await server?.stop();
});

const NOW = new Date('2031-03-14T10:00:00Z');

interface Fixture {
  store: Store;
  accountId: number;
  keyId: number;
}

/** A fresh, migrated database of the dialect, with one invented account and one key. */
async function fixture(dialect: Dialect): Promise<Fixture> {
  let store: Store;
  if (dialect === 'sqlite') {
    store = openSqliteStore(':memory:');
  } else {
    databases += 1;
    const name = `metering_${databases}`;
    await admin.query(`CREATE DATABASE ${name}`);
    store = openPostgresStore(server.url.replace(/\/postgres$/, `/${name}`), { max: 4 });
  }
  opened.push(store);
  await store.migrate();
  const { accounts, apiKeys } = store.t;
  const [account] = await store.db
    .insert(accounts)
    .values({ name: 'Invented Metering Works', monthlyUnitQuota: 100, createdAt: NOW })
    .returning();
  const [key] = await store.db
    .insert(apiKeys)
    .values({
      publicId: 'InventedPublicId1',
      accountId: account!.id,
      name: 'invented key',
      keyHash: 'invented-hash-1',
      scopes: ['steam'],
      prefix: 'ebk1.Inv',
      createdAt: NOW,
    })
    .returning();
  return { store, accountId: account!.id, keyId: key!.id };
}

function record(
  f: Fixture,
  requestId: string,
  units: number,
  extra: Partial<RequestRecord> = {},
): RequestRecord {
  return {
    at: NOW,
    accountId: f.accountId,
    keyId: f.keyId,
    operation: 'steam.state',
    status: 200,
    units,
    latencyMs: 10,
    requestId,
    engineVersion: 'test-engine',
    method: 'POST',
    path: '/v1/steam/state',
    requestBody: null,
    responseBody: null,
    ...extra,
  };
}

async function count(store: Store, table: 'usage_events' | 'request_log'): Promise<number> {
  const [row] = await store.rows<{ n: number | string }>(sql`SELECT COUNT(*) AS n FROM ${sql.raw(table)}`);
  return Number(row!.n);
}

async function rollUps(store: Store) {
  const rows = await store.rows<{
    day: string;
    operation: string;
    requests: number;
    units: number;
    errors: number;
  }>(sql`SELECT day, operation, requests, units, errors FROM usage_daily ORDER BY day, operation`);
  return rows.map((r) => ({
    ...r,
    requests: Number(r.requests),
    units: Number(r.units),
    errors: Number(r.errors),
  }));
}

/** An error's message with its cause's (Drizzle wraps the driver's error on PostgreSQL). */
function messageOf(err: unknown): string {
  const e = err as Error & { cause?: Error };
  return `${e.message} ${e.cause?.message ?? ''}`;
}

/** Makes the database refuse usage events with this request id (stands in for a full disk). */
async function refuseRequestId(store: Store, requestId: string): Promise<void> {
  if (store.dialect === 'sqlite') {
    await store.execute(
      sql.raw(`CREATE TRIGGER refuse_one BEFORE INSERT ON usage_events WHEN NEW.request_id = '${requestId}'
               BEGIN SELECT RAISE(ABORT, 'refused for the test'); END`),
    );
  } else {
    await store.execute(
      sql.raw(`CREATE FUNCTION refuse_one() RETURNS trigger LANGUAGE plpgsql AS $$
               BEGIN RAISE EXCEPTION 'refused for the test'; END $$`),
    );
    await store.execute(
      sql.raw(`CREATE TRIGGER refuse_one BEFORE INSERT ON usage_events FOR EACH ROW
               WHEN (NEW.request_id = '${requestId}') EXECUTE FUNCTION refuse_one()`),
    );
  }
}

describe.each(['sqlite', 'postgres'] as const)('metering on %s', (dialect) => {
  it('commits a group as usage events, log rows, one roll-up per operation and the key’s last use, then calls back', async () => {
    const f = await fixture(dialect);
    const writer = meteringWriter(f.store);
    const seen: Promise<number>[] = [];
    const calls: string[] = [];
    const records = [
      record(f, 'g-1', 2),
      record(f, 'g-2', 3, { at: new Date(NOW.getTime() + 5_000) }),
      record(f, 'g-3', 0, { status: 422 }),
      record(f, 'g-4', 1, { operation: 'steam.saturation' }),
      // A refused key's request: a log row only.
      record(f, 'g-5', 0, { status: 401, logOnly: true }),
    ];
    const all = Promise.all(
      records.map(
        (r, i) =>
          new Promise<void>((resolve) =>
            writer.submit(r, (err) => {
              calls.push(`${i}:${err === undefined ? 'ok' : String(err)}`);
              // Called after the commit: the whole group is readable.
              seen.push(count(f.store, 'usage_events'));
              resolve();
            }),
          ),
      ),
    );
    expect(writer.pending).toBe(5);
    await all;
    expect(calls).toEqual(['0:ok', '1:ok', '2:ok', '3:ok', '4:ok']);
    expect(await Promise.all(seen)).toEqual([4, 4, 4, 4, 4]);
    expect(await count(f.store, 'request_log')).toBe(5);
    expect(await rollUps(f.store)).toEqual([
      { day: '2031-03-14', operation: 'steam.saturation', requests: 1, units: 1, errors: 0 },
      { day: '2031-03-14', operation: 'steam.state', requests: 3, units: 5, errors: 1 },
    ]);
    const [key] = await f.store.rows<{ last_used_at: unknown }>(
      sql`SELECT last_used_at FROM api_keys WHERE id = ${f.keyId}`,
    );
    // The latest use of the group.
    expect(readInstant(key!.last_used_at).toISOString()).toBe('2031-03-14T10:00:05.000Z');
  });

  it('adds a later group to the same roll-up row', async () => {
    const f = await fixture(dialect);
    const writer = meteringWriter(f.store);
    writer.submit(record(f, 'a', 3), () => {});
    await writer.flush();
    writer.submit(record(f, 'b', 0, { status: 422 }), () => {});
    writer.submit(record(f, 'c', 4), () => {});
    await writer.flush();
    expect(await rollUps(f.store)).toEqual([
      { day: '2031-03-14', operation: 'steam.state', requests: 3, units: 7, errors: 1 },
    ]);
  });

  it('retries a refused group record by record: only the refused record gets the error', async () => {
    const f = await fixture(dialect);
    await refuseRequestId(f.store, 'bad');
    const writer = meteringWriter(f.store);
    const outcome: Record<string, string> = {};
    for (const id of ['good-1', 'bad', 'good-2']) {
      writer.submit(record(f, id, 1), (err) => {
        outcome[id] = err === undefined ? 'committed' : messageOf(err);
      });
    }
    await writer.flush();
    expect(outcome).toMatchObject({ 'good-1': 'committed', 'good-2': 'committed' });
    expect(outcome.bad).toContain('refused for the test');
    const ids = await f.store.rows<{ request_id: string }>(
      sql`SELECT request_id FROM usage_events ORDER BY id`,
    );
    expect(ids.map((r) => r.request_id)).toEqual(['good-1', 'good-2']);
    expect(await rollUps(f.store)).toEqual([
      { day: '2031-03-14', operation: 'steam.state', requests: 2, units: 2, errors: 0 },
    ]);
  });

  it('keeps the month total equal to the roll-up, also when it is first read while a group commits', async () => {
    const f = await fixture(dialect);
    const writer = meteringWriter(f.store);
    const agree = async (at: Date) => {
      const cached = await committedUnitsThisMonth(f.store, f.accountId, at);
      expect(cached).toBe(await unitsUsedThisMonth(f.store, f.accountId, at));
      return cached;
    };
    await recordRequest(f.store, record(f, 'before', 4));
    writer.submit(record(f, 'm1', 7), () => {});
    const committing = writer.flush();
    // First read of the month, asked while the group is (on PostgreSQL) still being committed.
    const first = committedUnitsThisMonth(f.store, f.accountId, NOW);
    await committing;
    expect(await first).toBe(11);
    expect(await agree(NOW)).toBe(11);
    await recordRequest(f.store, record(f, 'm2', 2, { status: 500, units: 0 }));
    expect(await agree(NOW)).toBe(11);
    const april = new Date('2031-04-01T00:00:05Z');
    await recordRequest(f.store, record(f, 'a1', 5, { at: april }));
    expect(await agree(NOW)).toBe(11);
    expect(await agree(april)).toBe(5);
  });

  it('reads month usage, reports, the overview and the request log as numbers', async () => {
    const f = await fixture(dialect);
    const at = (minute: number) => new Date(NOW.getTime() + minute * 60_000);
    await recordRequest(f.store, record(f, 'r-1', 5, { at: at(0), latencyMs: 30 }));
    await recordRequest(
      f.store,
      record(f, 'r-2', 3, { at: at(1), latencyMs: 10, operation: 'steam.saturation' }),
    );
    await recordRequest(f.store, record(f, 'r-3', 0, { at: at(2), latencyMs: 20, status: 404 }));
    await recordRequest(
      f.store,
      record(f, 'r-4', 2, { at: new Date('2031-03-02T08:00:00Z'), latencyMs: 40 }),
    );

    const usage = await monthUsage(f.store, f.accountId, NOW);
    expect(usage).toEqual({
      month: '2031-03',
      quota: { limit: 100, used: 10, remaining: 90, resetsAt: '2031-04-01T00:00:00.000Z' },
      totals: { requests: 4, units: 10, errors: 1 },
      byOperation: [
        { operation: 'steam.saturation', requests: 1, units: 3, errors: 0 },
        { operation: 'steam.state', requests: 3, units: 7, errors: 1 },
      ],
      byDay: [
        { day: '2031-03-02', requests: 1, units: 2, errors: 0 },
        { day: '2031-03-14', requests: 3, units: 8, errors: 1 },
      ],
    });

    const range = { from: '2031-03-01', to: '2031-03-31' };
    const byAccount = await usageReport(f.store, { ...range, groupBy: 'account' }, [f.accountId]);
    expect(byAccount).toEqual({
      totals: { requests: 4, units: 10, errors: 1 },
      rows: [
        { group: String(f.accountId), label: 'Invented Metering Works', requests: 4, units: 10, errors: 1 },
      ],
    });
    const byDay = await usageReport(f.store, { ...range, groupBy: 'day' }, null);
    expect(byDay.rows.map((r) => [r.group, r.units])).toEqual([
      ['2031-03-02', 2],
      ['2031-03-14', 8],
    ]);
    expect((await usageReport(f.store, { ...range, groupBy: 'operation' }, [])).rows).toEqual([]);
    expect(await listUsageRows(f.store, range, null, 2)).toEqual([
      {
        day: '2031-03-02',
        accountId: f.accountId,
        accountName: 'Invented Metering Works',
        operation: 'steam.state',
        requests: 1,
        units: 2,
        errors: 0,
      },
      {
        day: '2031-03-14',
        accountId: f.accountId,
        accountName: 'Invented Metering Works',
        operation: 'steam.saturation',
        requests: 1,
        units: 3,
        errors: 0,
      },
    ]);

    const view = await overview(f.store, NOW, null, { nearQuotaPercent: 5, days: 3, topOperations: 1 });
    expect(view).toMatchObject({
      month: '2031-03',
      today: { requests: 3, units: 8, errors: 1 },
      thisMonth: { requests: 4, units: 10, errors: 1 },
      errorRate: 0.25,
      // Nearest rank ⌈0.95 · 4⌉ = 4 of 10, 20, 30, 40 ms.
      p95LatencyMs: 40,
      topOperations: [{ operation: 'steam.state', requests: 3, units: 7, errors: 1 }],
      nearQuota: [
        {
          accountId: f.accountId,
          accountName: 'Invented Metering Works',
          unitsUsed: 10,
          monthlyUnitQuota: 100,
          percent: 10,
        },
      ],
      daily: [
        { day: '2031-03-12', requests: 0, units: 0, errors: 0 },
        { day: '2031-03-13', requests: 0, units: 0, errors: 0 },
        { day: '2031-03-14', requests: 3, units: 8, errors: 1 },
      ],
    });

    const page = await queryRequestLog(
      f.store,
      { page: 1, pageSize: 2, sort: 'latency', order: 'desc', from: NOW },
      [f.accountId],
    );
    expect(page.total).toBe(3);
    expect(page.items.map((i) => [i.requestId, i.latencyMs, i.operation, i.units])).toEqual([
      ['r-1', 30, 'steam.state', 5],
      ['r-3', 20, 'steam.state', 0],
    ]);
    expect(page.items[0]).toMatchObject({
      accountId: f.accountId,
      keyId: f.keyId,
      accountName: 'Invented Metering Works',
      keyName: 'invented key',
      at: NOW,
    });
    expect(typeof page.items[0]!.id).toBe('number');
    const errors = await queryRequestLog(
      f.store,
      { page: 1, pageSize: 10, sort: 'at', order: 'asc', status: '4xx' },
      null,
    );
    expect(errors.items.map((i) => i.requestId)).toEqual(['r-3']);
    expect(await countRequestLog(f.store, { operation: 'steam.saturation' }, null)).toBe(1);
    expect(await countRequestLog(f.store, {}, [])).toBe(0);
    expect(
      (await listRequestLog(f.store, { sort: 'at', order: 'asc' }, null, 2)).map((r) => r.requestId),
    ).toEqual(['r-4', 'r-1']);
    const entry = await getRequestLogEntry(f.store, page.items[0]!.id, [f.accountId]);
    expect(entry).toMatchObject({
      requestId: 'r-1',
      engineVersion: 'test-engine',
      requestBody: null,
      at: NOW,
    });
    expect(await getRequestLogEntry(f.store, page.items[0]!.id, [])).toBeUndefined();

    // Older than 10 days before 14 March: only the 2 March row goes.
    expect(await pruneRequestLog(f.store, NOW, 10)).toBe(1);
    expect(await count(f.store, 'request_log')).toBe(3);
    expect(await count(f.store, 'usage_events')).toBe(4);
  });
});

describe.each(['sqlite', 'postgres'] as const)('the metering middleware on %s', (dialect) => {
  /** Key checks and the rest of the app aside: the metering middleware and a charged route. */
  function meteredApp(f: Fixture) {
    const deps = {
      store: f.store,
      config: testConfig(),
      clock: () => NOW,
      engineVersion: 'test-engine',
    } as AppDeps;
    const app = express();
    app.use(express.json());
    app.use(requestId());
    app.use((_req, res, next) => {
      res.locals.auth = {
        accountId: f.accountId,
        keyId: f.keyId,
        publicId: 'InventedPublicId1',
        scopes: ['evaporators'],
        rateLimitPerMinute: 1000,
        monthlyUnitQuota: 100,
        retainRequestBodies: false,
      };
      next();
    });
    app.use(metering(deps));
    // 5 units (evaporators.multiple-effect) + `extra`; answers how many usage events were committed.
    app.post('/charge', requireOperation('evaporators.multiple-effect'), async (req, res) => {
      chargeUnits(res, Number(req.query.extra ?? 0));
      res.json({ eventsBefore: await count(f.store, 'usage_events') });
    });
    const problems: ErrorRequestHandler = (err, _req, res, _next) => {
      res.status(err instanceof ProblemError ? err.status : 500).json({ type: (err as ProblemError).type });
    };
    app.use(problems);
    return app;
  }

  it('checks the quota against the units committed this month and answers once the row is committed', async () => {
    const f = await fixture(dialect);
    await recordRequest(f.store, record(f, 'earlier', 85)); // 85 of 100 used before the app starts
    const app = meteredApp(f);
    let eventsWhenAnswered = -1;
    const first = await request(app)
      .post('/charge')
      .send({})
      .then(async (res) => {
        eventsWhenAnswered = await count(f.store, 'usage_events');
        return res;
      });
    expect(first.status).toBe(200);
    expect(first.body.eventsBefore).toBe(1);
    expect(eventsWhenAnswered).toBe(2); // its own row was committed before the answer left
    // 90 used: two requests at once for the last 10 units, 7 each: only one fits.
    const pair = await Promise.all([
      request(app).post('/charge?extra=2').send({}),
      request(app).post('/charge?extra=2').send({}),
    ]);
    expect(pair.map((r) => r.status).sort()).toEqual([200, 429]);
    expect(pair.find((r) => r.status === 429)!.body.type).toBe('quota-exceeded');
    // 97 used: 5 more do not fit.
    expect((await request(app).post('/charge').send({})).status).toBe(429);
    const usage = await monthUsage(f.store, f.accountId, NOW);
    expect(usage.quota.used).toBe(97);
    expect(usage.totals).toEqual({ requests: 5, units: 97, errors: 2 });
    expect(await committedUnitsThisMonth(f.store, f.accountId, NOW)).toBe(97);
  });
});

describe('two nodes on one PostgreSQL database', () => {
  it('never commit more units than the quota: the commit refuses what another node spent meanwhile', async () => {
    // Two nodes: two pools on the same database, each with its own writer and month totals.
    const first = await fixture('postgres');
    const url = server.url.replace(/\/postgres$/, `/metering_${databases}`);
    const other = openPostgresStore(url, { max: 2 });
    opened.push(other);
    const second: Fixture = { ...first, store: other };
    // Both nodes have read the month (0 of 100 units) before any of the charges below.
    expect(await committedUnitsThisMonth(first.store, first.accountId, NOW)).toBe(0);
    expect(await committedUnitsThisMonth(other, first.accountId, NOW)).toBe(0);
    const outcomes = new Map<string, unknown>();
    const submit = (f: Fixture, id: string) =>
      new Promise<void>((resolve) =>
        meteringWriter(f.store).submit(record(f, id, 30), (err) => {
          outcomes.set(id, err);
          resolve();
        }),
      );
    await Promise.all([
      submit(first, 'n1-a'),
      submit(first, 'n1-b'),
      submit(second, 'n2-a'),
      submit(second, 'n2-b'),
    ]);
    const refused = [...outcomes].filter(([, err]) => err instanceof QuotaSpentElsewhere);
    expect(refused).toHaveLength(1);
    expect([...outcomes].filter(([, err]) => err === undefined)).toHaveLength(3);
    const refusal = refused[0]![1] as QuotaSpentElsewhere;
    expect({ units: refusal.units, remaining: refusal.remaining, quota: refusal.quota }).toEqual({
      units: 30,
      remaining: 10,
      quota: 100,
    });
    // 90 units charged, never 120; the refused request is logged as a 429 with 0 units.
    expect(await unitsUsedThisMonth(first.store, first.accountId, NOW)).toBe(90);
    const [row] = await first.store.rows<{ status: number; units: number | string }>(
      sql`SELECT status, units FROM usage_events WHERE request_id = ${refused[0]![0]}`,
    );
    expect({ status: Number(row!.status), units: Number(row!.units) }).toEqual({ status: 429, units: 0 });
    // Each node now knows the database's total, the other node's units included.
    expect(await committedUnitsThisMonth(first.store, first.accountId, NOW)).toBe(90);
    expect(await committedUnitsThisMonth(other, first.accountId, NOW)).toBe(90);
  });
});
