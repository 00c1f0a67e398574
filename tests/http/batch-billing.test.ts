// Batch billing: a case that is refused costs nothing, as the same call on its own route would;
// the quota still has to cover every case before the batch runs.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { makeHarness, usageRows } from './helpers.js';

const auth = (token: string) => ({ Authorization: `Bearer ${token}` });

/** An invented single-effect case (5 units on its own route). */
const singleEffectCase = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
};

describe('batch billing', () => {
  it('charges nothing for two refused single-effect cases, as a refused single call costs nothing', async () => {
    const h = await makeHarness({ quota: 1000 });
    const single = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth(h.token))
      .send({
        ...singleEffectCase,
        liquor: 'sodium-hydroxide',
        feed: { ...singleEffectCase.feed, massFraction: 2 },
      });
    expect(single.status).toBe(422);
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth(h.token))
      .send({
        operation: 'single-effect',
        cases: [
          { ...singleEffectCase, feed: { ...singleEffectCase.feed, massFraction: 2 } },
          { ...singleEffectCase, body: { ...singleEffectCase.body, pressure: -5 } },
        ],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 2, succeeded: 0, failed: 2, unitsCharged: 0 });
    // The single refused call and the batch both bill 0 units.
    expect((await usageRows(h.store)).map((r) => [r.operation, r.units])).toEqual([
      ['evaporators.single-effect', 0],
      ['batch', 0],
    ]);
  });

  it('bills only the cases that succeed and says so in unitsCharged and the usage event', async () => {
    const h = await makeHarness({ quota: 1000 });
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth(h.token))
      .send({
        operation: 'single-effect',
        cases: [
          singleEffectCase,
          { ...singleEffectCase, feed: { ...singleEffectCase.feed, massFraction: 2 } },
          { ...singleEffectCase, product: { massFraction: 0.2 } },
        ],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ succeeded: 2, failed: 1, unitsCharged: 10 });
    expect((await usageRows(h.store)).at(-1)).toMatchObject({ operation: 'batch', units: 10 });
    const log = await h.store.rows(sql`SELECT status FROM request_log`);
    expect(log).toEqual([{ status: 200 }]);
  });

  it('still refuses with 429 a batch whose cases together exceed the quota, even if some would fail', async () => {
    // 3 cases × 5 units = 15 > 12: the quota check covers every case before any runs.
    const h = await makeHarness({ quota: 12 });
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth(h.token))
      .send({
        operation: 'single-effect',
        cases: [singleEffectCase, singleEffectCase, { ...singleEffectCase, body: { pressure: -1 } }],
      });
    expect(res.status).toBe(429);
    expect(res.body.detail).toContain('costs 15 units');
    expect((await usageRows(h.store)).at(-1)).toMatchObject({ status: 429, units: 0 });
  });
});
