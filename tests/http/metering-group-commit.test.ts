// Group commit of metering records (server/accounts/metering.ts, server/http/middleware/metering.ts):
// the records of one event-loop turn share one transaction, no response leaves before the
// transaction holding its row has committed, and a record the database refuses costs only its own
// request a 500 (never an unbilled 2xx).
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import {
  committedUnitsThisMonth,
  meteringWriter,
  recordRequest,
  type RequestRecord,
} from '../../server/accounts/metering.js';
import { unitsUsedThisMonth } from '../../server/accounts/usage.js';
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

const eventCount = (h: Harness) =>
  (h.sqlite.prepare('SELECT COUNT(*) AS n FROM usage_events').get() as { n: number }).n;

describe('metering group commit', () => {
  it('holds every record of a turn until the next turn, commits them together, then calls back in order', async () => {
    const h = await makeHarness();
    const writer = meteringWriter(h.sqlite);
    const calls: string[] = [];
    for (let i = 0; i < 5; i++) {
      writer.submit(record(h, `req-${i}`, 2), (err) => {
        // Called after the commit: the row is already readable.
        calls.push(`${i}:${err === undefined ? 'ok' : 'error'}:${eventCount(h)}`);
      });
    }
    expect(writer.pending).toBe(5);
    expect(eventCount(h)).toBe(0);
    await new Promise((resolve) => setImmediate(resolve));
    expect(writer.pending).toBe(0);
    expect(calls).toEqual(['0:ok:5', '1:ok:5', '2:ok:5', '3:ok:5', '4:ok:5']);
    // One roll-up row for the group, holding all five requests and their units.
    expect(
      h.sqlite
        .prepare('SELECT requests, units, errors FROM usage_daily WHERE operation = ?')
        .all('steam.state'),
    ).toEqual([{ requests: 5, units: 10, errors: 0 }]);
    expect((h.sqlite.prepare('SELECT COUNT(*) AS n FROM request_log').get() as { n: number }).n).toBe(5);
  });

  it('adds a later group to the same roll-up row, counting errors and billing no units for them', async () => {
    const h = await makeHarness();
    const writer = meteringWriter(h.sqlite);
    writer.submit(record(h, 'a', 3), () => {});
    writer.flush();
    writer.submit(record(h, 'b', 0, 422), () => {});
    writer.submit(record(h, 'c', 4), () => {});
    writer.flush();
    expect(
      h.sqlite
        .prepare('SELECT requests, units, errors FROM usage_daily WHERE operation = ?')
        .get('steam.state'),
    ).toEqual({ requests: 3, units: 7, errors: 1 });
  });

  it('retries a failed group record by record: only the refused record gets the error', async () => {
    const h = await makeHarness();
    // The database refuses one request id (stands in for a full disk or a constraint).
    h.sqlite.exec(`CREATE TRIGGER refuse_one BEFORE INSERT ON usage_events WHEN NEW.request_id = 'bad'
                   BEGIN SELECT RAISE(ABORT, 'refused for the test'); END`);
    const writer = meteringWriter(h.sqlite);
    const outcome: Record<string, string> = {};
    for (const id of ['good-1', 'bad', 'good-2']) {
      writer.submit(record(h, id, 1), (err) => {
        outcome[id] = err === undefined ? 'committed' : (err as Error).message;
      });
    }
    writer.flush();
    expect(outcome).toEqual({ 'good-1': 'committed', bad: 'refused for the test', 'good-2': 'committed' });
    expect(usageRows(h.sqlite).map((r) => r.request_id)).toEqual(['good-1', 'good-2']);
  });

  it('answers 500 without the result when its row cannot be committed, and 200 to the others', async () => {
    const h = await makeHarness();
    h.sqlite.exec(`CREATE TRIGGER refuse_one BEFORE INSERT ON usage_events WHEN NEW.request_id = 'unbillable'
                   BEGIN SELECT RAISE(ABORT, 'refused for the test'); END`);
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
    expect(
      usageRows(h.sqlite)
        .map((r) => r.request_id)
        .sort(),
    ).toEqual(['fine-1', 'fine-2']);
    // The refused request's units left the in-flight set: the account is not blocked by them.
    const usage = await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect(usage.status).toBe(200);
  });

  it('keeps the month total that quotas are checked against equal to the roll-up, across commits and months', async () => {
    const h = await makeHarness();
    const writer = meteringWriter(h.sqlite);
    const march = h.clock.now;
    const april = new Date('2031-04-01T00:00:05Z');
    const agree = (at: Date) => {
      const cached = committedUnitsThisMonth(h.sqlite, h.accountId, at);
      expect(cached).toBe(unitsUsedThisMonth(h.sqlite, h.accountId, at));
      return cached;
    };
    expect(agree(march)).toBe(0);
    writer.submit(record(h, 'm1', 7), () => {});
    writer.submit(record(h, 'm2', 0, 500), () => {});
    expect(agree(march)).toBe(0); // queued, not committed: the quota check counts it as in flight
    writer.flush();
    expect(agree(march)).toBe(7);
    recordRequest(h.sqlite, record(h, 'm3', 4)); // the synchronous path keeps it too
    expect(agree(march)).toBe(11);
    // A record of the next month does not touch March's total; April starts from the roll-up.
    recordRequest(h.sqlite, { ...record(h, 'a1', 5), at: april });
    expect(agree(march)).toBe(11);
    expect(agree(april)).toBe(5);
    writer.submit({ ...record(h, 'a2', 6), at: april }, () => {});
    writer.flush();
    expect(agree(april)).toBe(11);
  });
});
