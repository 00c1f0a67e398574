// Metering, quotas, rate limits and the request log. The rate-limit headers are checked against
// IETF draft-ietf-httpapi-ratelimit-headers-07 (RateLimit-Policy and RateLimit fields).
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { pruneRequestLog } from '../../server/accounts/request-log.js';
import { readInstant } from '../../server/db/store.js';
import { makeHarness, usageRows } from './helpers.js';

describe('metering', () => {
  it('writes one usage row per authenticated request, success or error, with its status and units', async () => {
    const h = await makeHarness();
    const auth = `Bearer ${h.token}`;
    const ok = await request(h.app).post('/v1/__test/charge?extra=3').set('Authorization', auth).send({});
    const bad = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', auth)
      .set('Content-Type', 'application/json')
      .send('{oops');
    const missing = await request(h.app).get('/v1/no-such-route').set('Authorization', auth);
    await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect([ok.status, bad.status, missing.status]).toEqual([200, 400, 404]);
    // The catalogue says evaporators.multiple-effect costs 5 up front; the route charged 3 more.
    expect(await usageRows(h.store)).toEqual([
      {
        operation: 'evaporators.multiple-effect',
        status: 200,
        units: 8,
        request_id: ok.headers['x-request-id'],
      },
      { operation: 'unmatched', status: 400, units: 0, request_id: bad.headers['x-request-id'] },
      { operation: 'unmatched', status: 404, units: 0, request_id: missing.headers['x-request-id'] },
      expect.objectContaining({ operation: 'usage.read', status: 200, units: 0 }),
    ]);
  });

  it('rolls usage up per day and operation, and /v1/usage reports the month and the quota', async () => {
    const h = await makeHarness({ quota: 100 });
    const auth = `Bearer ${h.token}`;
    await request(h.app).post('/v1/__test/charge').set('Authorization', auth).send({});
    await request(h.app).post('/v1/__test/charge?extra=2').set('Authorization', auth).send({});
    h.clock.now = new Date('2031-03-15T09:00:00Z');
    await request(h.app).post('/v1/__test/charge').set('Authorization', auth).send({});
    await request(h.app).get('/v1/nothing-here').set('Authorization', auth);
    const daily = await h.store.rows(
      sql`SELECT day, operation, requests, units, errors FROM usage_daily ORDER BY day, operation`,
    );
    expect(daily).toEqual([
      { day: '2031-03-14', operation: 'evaporators.multiple-effect', requests: 2, units: 12, errors: 0 },
      { day: '2031-03-15', operation: 'evaporators.multiple-effect', requests: 1, units: 5, errors: 0 },
      { day: '2031-03-15', operation: 'unmatched', requests: 1, units: 0, errors: 1 },
    ]);
    const usage = await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect(usage.body.quota).toEqual({
      limit: 100,
      used: 17,
      remaining: 83,
      resetsAt: '2031-04-01T00:00:00.000Z',
    });
    expect(usage.body.totals).toEqual({ requests: 4, units: 17, errors: 1 });
    expect(usage.body.byDay.map((d: { day: string }) => d.day)).toEqual(['2031-03-14', '2031-03-15']);
    // A new calendar month (UTC) starts from zero.
    h.clock.now = new Date('2031-04-01T00:00:00Z');
    const april = await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect(april.body.quota.used).toBe(0);
  });

  it('commits the usage row before the response reaches the client', async () => {
    const h = await makeHarness();
    let rowsWhenResponseArrived = -1;
    await request(h.app)
      .get('/v1/usage')
      .set('Authorization', `Bearer ${h.token}`)
      .then(async () => {
        rowsWhenResponseArrived = (await usageRows(h.store)).length;
      });
    expect(rowsWhenResponseArrived).toBe(1);
  });
});

describe('quota', () => {
  it('refuses with 429 quota-exceeded before running, and bills nothing beyond the quota', async () => {
    const h = await makeHarness({ quota: 12 });
    const auth = `Bearer ${h.token}`;
    const first = await request(h.app).post('/v1/__test/charge?extra=5').set('Authorization', auth).send({}); // 10 units
    expect(first.status).toBe(200);
    const second = await request(h.app).post('/v1/__test/charge').set('Authorization', auth).send({}); // 5 more: 15 > 12
    expect(second.status).toBe(429);
    expect(second.body.type).toBe('/problems/quota-exceeded');
    expect(second.body.echo).toBeUndefined(); // the handler did not run
    expect(Number(second.headers['retry-after'])).toBeGreaterThan(0);
    const third = await request(h.app).post('/v1/__test/charge?extra=0').set('Authorization', auth).send({});
    expect(third.status).toBe(429);
    const [billed] = await h.store.rows<{ u: number | string }>(
      sql`SELECT SUM(units) AS u FROM usage_events`,
    );
    expect(Number(billed!.u)).toBe(10);
    expect((await usageRows(h.store)).map((r) => r.status)).toEqual([200, 429, 429]);
    // Free reads still work when the quota is spent.
    expect((await request(h.app).get('/v1/usage').set('Authorization', auth)).status).toBe(200);
  });
});

describe('rate limit', () => {
  it('answers 429 rate-limited with draft-7 RateLimit and RateLimit-Policy headers after the per-key limit', async () => {
    const h = await makeHarness({ rateLimit: 3 });
    const auth = `Bearer ${h.token}`;
    const statuses: number[] = [];
    let last: request.Response | undefined;
    for (let i = 0; i < 4; i++) {
      last = await request(h.app).get('/v1/usage').set('Authorization', auth);
      statuses.push(last.status);
    }
    expect(statuses).toEqual([200, 200, 200, 429]);
    expect(last!.body.type).toBe('/problems/rate-limited');
    // draft-ietf-httpapi-ratelimit-headers-07 (from memory): RateLimit-Policy: <quota>;w=<window seconds>
    // and RateLimit: limit=<quota>, remaining=<left>, reset=<seconds>.
    expect(last!.headers['ratelimit-policy']).toBe('3;w=60');
    expect(last!.headers['ratelimit']).toMatch(/^limit=3, remaining=0, reset=\d+$/);
    expect(last!.headers['x-ratelimit-limit']).toBeUndefined(); // legacy headers off
    expect((await usageRows(h.store)).at(-1)).toMatchObject({ status: 429, units: 0 });
  });
});

describe('request log', () => {
  it('keeps redacted bodies for a retaining account and never the Authorization header or key', async () => {
    const h = await makeHarness({ retain: true });
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .send({ feed: { massFraction: 0.32 }, password: 'hunter2-hunter2', note: `my key is ${h.token}` });
    expect(res.status).toBe(200);
    const [row] = await h.store.rows<Record<string, unknown>>(sql`SELECT * FROM request_log`);
    const stored = JSON.stringify(row);
    expect(stored).not.toContain(h.token);
    expect(stored).not.toContain('hunter2');
    expect(stored).not.toMatch(/Bearer/);
    expect(JSON.parse(row!.request_body as string)).toMatchObject({
      feed: { massFraction: 0.32 },
      password: '[redacted]',
    });
    expect(row).toMatchObject({
      method: 'POST',
      path: '/v1/__test/charge',
      status: 200,
      engine_version: 'test-engine',
    });
  });

  it('keeps no bodies when the account does not retain them, and truncates long ones', async () => {
    const off = await makeHarness({ retain: false });
    await request(off.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${off.token}`)
      .send({ a: 1 });
    expect(await off.store.rows(sql`SELECT request_body, response_body FROM request_log`)).toEqual([
      { request_body: null, response_body: null },
    ]);
    const on = await makeHarness({ retain: true, config: { logBodyLimitBytes: 100 } });
    await request(on.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${on.token}`)
      // Spaced: one unbroken run of 32+ key characters would be redacted as key-shaped.
      .send({ pad: 'y '.repeat(250) });
    const [row] = await on.store.rows<{ request_body: string }>(sql`SELECT request_body FROM request_log`);
    expect(Buffer.byteLength(row!.request_body)).toBeLessThan(130);
    expect(row!.request_body).toMatch(/\[truncated\]$/);
  });

  it('prunes rows older than the retention period and keeps newer ones', async () => {
    const h = await makeHarness();
    const auth = `Bearer ${h.token}`;
    h.clock.now = new Date('2031-01-01T00:00:00Z');
    await request(h.app).get('/v1/usage').set('Authorization', auth);
    h.clock.now = new Date('2031-01-25T00:00:00Z');
    await request(h.app).get('/v1/usage').set('Authorization', auth);
    const removed = await pruneRequestLog(h.store, new Date('2031-02-05T00:00:00Z'), 30);
    expect(removed).toBe(1);
    const left = await h.store.rows<{ at: unknown }>(sql`SELECT at FROM request_log`);
    expect(left.map((r) => readInstant(r.at).toISOString())).toEqual(['2031-01-25T00:00:00.000Z']);
    // Usage events are billing records: pruning the log leaves them alone.
    expect(await usageRows(h.store)).toHaveLength(2);
  });
});
