// Group commit of metering records (server/accounts/metering.ts, server/http/middleware/metering.ts):
// the records of one event-loop turn share one transaction, no response leaves before the
// transaction holding its row has committed, and a record the database refuses costs only its own
// request a 500 (never an unbilled 2xx).
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import {
  committedUnitsThisMonth,
  meteringWriter,
  recordRequest,
  type RequestRecord,
} from '../../server/accounts/metering.js';
import { unitsUsedThisMonth } from '../../server/accounts/usage.js';
import type { Store } from '../../server/db/store.js';
import { makeHarness, usageRows, type Harness } from './helpers.js';

function record(h: Harness, requestId: string, units: number, status = 200): RequestRecord {
  return {
    at: h.clock.now,
    accountId: h.accountId,
    keyId: h.keyId,
    operation: 'steam.state',
    status,
    units,
    latencyMs: 1,
    requestId,
    engineVersion: 'test-engine',
    method: 'POST',
    path: '/v1/steam/state',
    requestBody: null,
    responseBody: null,
  };
}

async function count(h: Harness, table: 'usage_events' | 'request_log'): Promise<number> {
  const [row] = await h.store.rows<{ n: number | string }>(sql`SELECT COUNT(*) AS n FROM ${sql.raw(table)}`);
  return Number(row!.n);
}
const eventCount = (h: Harness) => count(h, 'usage_events');

async function stepsOfSteamState(h: Harness): Promise<{ requests: number; units: number; errors: number }[]> {
  const rows = await h.store.rows<Record<'requests' | 'units' | 'errors', number>>(
    sql`SELECT requests, units, errors FROM usage_daily WHERE operation = ${'steam.state'}`,
  );
  return rows.map((r) => ({
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

/** Makes the database refuse usage events with this request id (stands in for a full disk or a constraint). */
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

describe('metering group commit', () => {
  it('holds every record of a turn until the next turn, commits them together, then calls back in order', async () => {
    const h = await makeHarness();
    const writer = meteringWriter(h.store);
    const calls: string[] = [];
    // Each callback reads the events at once: after the commit, the whole group is readable.
    const seen: Promise<number>[] = [];
    let allDone!: () => void;
    const finished = new Promise<void>((resolve) => (allDone = resolve));
    for (let i = 0; i < 5; i++) {
      writer.submit(record(h, `req-${i}`, 2), (err) => {
        calls.push(`${i}:${err === undefined ? 'ok' : 'error'}`);
        seen.push(eventCount(h));
        if (i === 4) allDone();
      });
    }
    expect(writer.pending).toBe(5);
    expect(await eventCount(h)).toBe(0);
    expect(calls).toEqual([]);
    await finished;
    expect(writer.pending).toBe(0);
    expect(calls).toEqual(['0:ok', '1:ok', '2:ok', '3:ok', '4:ok']);
    expect(await Promise.all(seen)).toEqual([5, 5, 5, 5, 5]);
    // One roll-up row for the group, holding all five requests and their units.
    expect(await stepsOfSteamState(h)).toEqual([{ requests: 5, units: 10, errors: 0 }]);
    expect(await count(h, 'request_log')).toBe(5);
  });

  it('adds a later group to the same roll-up row, counting errors and billing no units for them', async () => {
    const h = await makeHarness();
    const writer = meteringWriter(h.store);
    writer.submit(record(h, 'a', 3), () => {});
    await writer.flush();
    writer.submit(record(h, 'b', 0, 422), () => {});
    writer.submit(record(h, 'c', 4), () => {});
    await writer.flush();
    expect(await stepsOfSteamState(h)).toEqual([{ requests: 3, units: 7, errors: 1 }]);
  });

  it('retries a failed group record by record: only the refused record gets the error', async () => {
    const h = await makeHarness();
    await refuseRequestId(h.store, 'bad');
    const writer = meteringWriter(h.store);
    const outcome: Record<string, string> = {};
    for (const id of ['good-1', 'bad', 'good-2']) {
      writer.submit(record(h, id, 1), (err) => {
        outcome[id] = err === undefined ? 'committed' : messageOf(err);
      });
    }
    await writer.flush();
    expect(outcome).toMatchObject({ 'good-1': 'committed', 'good-2': 'committed' });
    expect(outcome.bad).toContain('refused for the test');
    expect((await usageRows(h.store)).map((r) => r.request_id)).toEqual(['good-1', 'good-2']);
  });

  it('answers 500 without the result when its row cannot be committed, and 200 to the others', async () => {
    const h = await makeHarness();
    await refuseRequestId(h.store, 'unbillable');
    const auth = `Bearer ${h.token}`;
    const send = (id: string) =>
      request(h.app)
        .post('/v1/__test/charge')
        .set('Authorization', auth)
        .set('X-Request-Id', id)
        .send({ marker: 'result-body' });
    const [a, refused, b] = await Promise.all([send('fine-1'), send('unbillable'), send('fine-2')]);
    expect([a.status, refused.status, b.status]).toEqual([200, 500, 200]);
    expect(refused.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(refused.body).toMatchObject({ status: 500, requestId: 'unbillable' });
    expect(JSON.stringify(refused.body)).not.toContain('result-body');
    expect((await usageRows(h.store)).map((r) => r.request_id).sort()).toEqual(['fine-1', 'fine-2']);
    // The refused request's units left the in-flight set: the account is not blocked by them.
    const usage = await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect(usage.status).toBe(200);
  });

  it('keeps the month total that quotas are checked against equal to the roll-up, across commits and months', async () => {
    const h = await makeHarness();
    const writer = meteringWriter(h.store);
    const march = h.clock.now;
    const april = new Date('2031-04-01T00:00:05Z');
    const agree = async (at: Date) => {
      const cached = await committedUnitsThisMonth(h.store, h.accountId, at);
      expect(cached).toBe(await unitsUsedThisMonth(h.store, h.accountId, at));
      return cached;
    };
    expect(await agree(march)).toBe(0);
    writer.submit(record(h, 'm1', 7), () => {});
    writer.submit(record(h, 'm2', 0, 500), () => {});
    expect(await agree(march)).toBe(0); // queued, not committed: the quota check counts it as in flight
    await writer.flush();
    expect(await agree(march)).toBe(7);
    await recordRequest(h.store, record(h, 'm3', 4)); // the single-record path keeps it too
    expect(await agree(march)).toBe(11);
    // A record of the next month does not touch March's total; April starts from the roll-up.
    await recordRequest(h.store, { ...record(h, 'a1', 5), at: april });
    expect(await agree(march)).toBe(11);
    expect(await agree(april)).toBe(5);
    writer.submit({ ...record(h, 'a2', 6), at: april }, () => {});
    await writer.flush();
    expect(await agree(april)).toBe(11);
  });
});
