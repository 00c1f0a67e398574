// Sweeps: one calculation over lists or ranges of one or two of its fields. Each point must be the
// single call exactly and cost what the single call costs; a refused point costs nothing.
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createEnginePool } from '../../server/workers/engine-pool.js';
import { makeHarness, usageRows, type Harness } from './helpers.js';

const auth = (token: string) => ({ Authorization: `Bearer ${token}` });

/** An invented caustic single-effect evaporator (5 units on its own route). */
const base = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
};

const sweep = (h: Harness, body: unknown, query = '') =>
  request(h.app)
    .post(`/v1/sweeps${query}`)
    .set(auth(h.token))
    .send(body as object);

const single = (h: Harness, body: unknown) =>
  request(h.app)
    .post('/v1/evaporators/single-effect')
    .set(auth(h.token))
    .send(body as object);

type Row = {
  values: Record<string, unknown>;
  status: string;
  result?: Record<string, unknown>;
  problem?: Record<string, unknown>;
};

const pools: ReturnType<typeof createEnginePool>[] = [];
afterAll(async () => {
  await Promise.all(pools.map((p) => p.destroy()));
});

describe('POST /v1/sweeps', () => {
  it('answers the points in order, the first field varying slowest, with unit-typed values kept as sent', async () => {
    const h = await makeHarness();
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [
        { field: 'body.pressure', values: [10, 15, '20 kPa'] },
        { field: 'feed.temperature', from: 30, to: 80, steps: 6 },
      ],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ operation: 'single-effect', count: 18, succeeded: 18, failed: 0 });
    const values = (res.body.rows as Row[]).map((r) => [
      r.values['body.pressure'],
      r.values['feed.temperature'],
    ]);
    expect(values).toEqual([10, 15, '20 kPa'].flatMap((p) => [30, 40, 50, 60, 70, 80].map((t) => [p, t])));
    // "20 kPa" is read as 20 kPa absolute, so the body boils as at the plain number 20 would.
    const rows = res.body.rows as Row[];
    expect(rows[12]!.result!.waterBoilingPoint).toBeGreaterThan(rows[6]!.result!.waterBoilingPoint as number);
  });

  it('gives every point exactly the result of the single call, with cautions and provenance once at the top', async () => {
    const h = await makeHarness();
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [
        { field: 'body.pressure', values: [12, '18 kPa'] },
        { field: 'feed.temperature', values: [40, 75] },
      ],
    });
    expect(res.status).toBe(200);
    const rows = res.body.rows as Row[];
    for (const row of rows) {
      expect(row.result).not.toHaveProperty('cautions');
      expect(row.result).not.toHaveProperty('provenance');
    }
    const cases = [
      [0, 12, 40],
      [1, 12, 75],
      [3, '18 kPa', 75],
    ] as const;
    for (const [i, pressure, temperature] of cases) {
      const one = await single(h, {
        ...base,
        body: { ...base.body, pressure },
        feed: { ...base.feed, temperature },
      });
      expect(one.status).toBe(200);
      const { cautions, provenance, ...rest } = one.body as Record<string, unknown>;
      // Bit for bit: the JSON texts are equal, not merely close.
      expect(JSON.stringify(rows[i]!.result)).toBe(JSON.stringify(rest));
      expect(res.body.cautions).toEqual(cautions);
      expect(res.body.provenance).toEqual(provenance);
    }
  });

  it('spaces a log range by even ratios with both ends exact, and a linear range by even steps', async () => {
    const h = await makeHarness();
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'body.pressure', from: 10, to: 1000, steps: 3, spacing: 'log' }],
    });
    expect(res.status).toBe(200);
    const ps = (res.body.rows as Row[]).map((r) => r.values['body.pressure'] as number);
    expect(ps[0]).toBe(10);
    expect(ps[1]).toBeCloseTo(100, 10);
    expect(ps[2]).toBe(1000);
    const lin = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'feed.temperature', from: 30, to: 31, steps: 5 }],
    });
    expect((lin.body.rows as Row[]).map((r) => r.values['feed.temperature'])).toEqual([
      30, 30.25, 30.5, 30.75, 31,
    ]);
  });

  it('charges each point what the single call costs and nothing for refused points', async () => {
    const h = await makeHarness({ quota: 1000 });
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      // −5 kPa is refused by the operation's own contract; 0.35 > 0.3 asks to dilute the feed.
      vary: [{ field: 'body.pressure', values: [10, -5, 15, 20] }],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 4, succeeded: 3, failed: 1, unitsCharged: 15 });
    const refused = (res.body.rows as Row[])[1]!;
    expect(refused.status).toBe('error');
    // The problem is the single call's: it names the body's field and its range.
    const alone = await single(h, { ...base, body: { ...base.body, pressure: -5 } });
    expect(alone.status).toBe(422);
    expect(refused.problem).toMatchObject({ status: 422, errors: alone.body.errors });
    expect((await usageRows(h.store)).map((r) => [r.operation, r.units])).toEqual([
      ['sweeps.run', 15],
      ['evaporators.single-effect', 0],
    ]);
  });

  it('refuses the points beyond the quota with the quota problem and bills only those that ran', async () => {
    // 12 units left: two points of 5 fit, the third and fourth do not.
    const h = await makeHarness({ quota: 12 });
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'feed.temperature', values: [40, 50, 60, 70] }],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 4, succeeded: 2, failed: 2, unitsCharged: 10 });
    const rows = res.body.rows as Row[];
    expect(rows.map((r) => r.status)).toEqual(['ok', 'ok', 'error', 'error']);
    expect(rows[2]!.problem).toMatchObject({ status: 429 });
    expect(String(rows[2]!.problem!.type)).toMatch(/quota-exceeded$/);
    expect((await usageRows(h.store)).map((r) => [r.operation, r.units])).toEqual([['sweeps.run', 10]]);
    // Nothing left for even one point: the sweep itself is refused, as a single call would be.
    const none = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'feed.temperature', values: [40] }],
    });
    expect(none.status).toBe(429);
  });

  it('uses the units a refused point gave back for the next points before refusing the rest for quota', async () => {
    // 12 units: 10 and −5 are reserved first; −5 is refused and gives its 5 back, so 15 runs too;
    // then 2 units remain and 20 is refused for quota.
    const h = await makeHarness({ quota: 12 });
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'body.pressure', values: [10, -5, 15, 20] }],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 4, succeeded: 2, failed: 2, unitsCharged: 10 });
    const rows = res.body.rows as Row[];
    expect(rows.map((r) => [r.status, r.problem?.status])).toEqual([
      ['ok', undefined],
      ['error', 422],
      ['ok', undefined],
      ['error', 429],
    ]);
    expect(rows[3]!.problem!.detail).toMatch(/quota of 12 units ran out/);
    expect((await usageRows(h.store)).map((r) => [r.operation, r.units])).toEqual([['sweeps.run', 10]]);
  });

  it('answers CSV with the varied fields, status and the columns chosen by columns=', async () => {
    const h = await makeHarness();
    const res = await sweep(
      h,
      { operation: 'single-effect', base, vary: [{ field: 'body.pressure', values: [10, -5, '20 kPa'] }] },
      '?columns=area,steamEconomy',
    ).set('Accept', 'text/csv');
    expect(res.status).toBe(200);
    expect(res.type).toBe('text/csv');
    const lines = res.text.trim().split(/\r?\n/);
    expect(lines[0]).toBe('body.pressure,status,area,steamEconomy,warnings,error');
    expect(lines).toHaveLength(4);
    const json = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'body.pressure', values: [10] }],
    });
    const r0 = (json.body.rows as Row[])[0]!.result!;
    expect(lines[1]!.startsWith(`10,ok,${String(r0.area)},${String(r0.steamEconomy)},`)).toBe(true);
    expect(lines[2]).toMatch(/^-5,error,,,,/);
    expect(lines[3]).toMatch(/^20 kPa,ok,/);
    const bad = await sweep(
      h,
      { operation: 'single-effect', base, vary: [{ field: 'body.pressure', values: [10] }] },
      '?columns=area,nonsense',
    ).set('Accept', 'text/csv');
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].field).toBe('columns');
  });

  it('refuses, before running a point and charging anything, a column the table always has', async () => {
    const h = await makeHarness();
    // Every point fails here (negative pressures), so no result could reveal the clash later.
    for (const column of ['status', 'error', 'warnings', 'body.pressure']) {
      const res = await sweep(
        h,
        { operation: 'single-effect', base, vary: [{ field: 'body.pressure', values: [-1, -2] }] },
        `?columns=area,${column}`,
      ).set('Accept', 'text/csv');
      expect(res.status, column).toBe(422);
      expect(res.body.errors[0]).toMatchObject({ field: 'columns' });
      expect(res.body.errors[0].message).toContain(`"${column}"`);
    }
    expect((await usageRows(h.store)).every((r) => r.units === 0)).toBe(true);
  });

  it('gives CSV every scalar of the result when no columns are named', async () => {
    const h = await makeHarness();
    const res = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [{ field: 'body.pressure', values: [10, 15] }],
    }).set('Accept', 'text/csv');
    expect(res.status).toBe(200);
    const header = res.text.split(/\r?\n/)[0]!.split(',');
    expect(header.slice(0, 2)).toEqual(['body.pressure', 'status']);
    expect(header).toContain('area');
    expect(header).toContain('steam.massFlow');
    expect(header.some((c) => c.startsWith('provenance'))).toBe(false);
  });

  it('sweeps any batchable operation, e.g. a liquor boiling point over concentration', async () => {
    const h = await makeHarness();
    const res = await sweep(h, {
      operation: 'liquor-boiling-point',
      base: { liquor: 'sodium-hydroxide', massFraction: 0.2, pressure: 20 },
      vary: [{ field: 'massFraction', from: 0.1, to: 0.4, steps: 4 }],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 4, succeeded: 4, unitsCharged: 4 });
  });

  it('sends heavy points (six-effect trains) to the calculation threads and still equals the single calls', async () => {
    const pool = createEnginePool({ workers: 2, taskTimeoutMs: 30_000 });
    pools.push(pool);
    const h = await makeHarness({ quota: 10_000, enginePool: pool });
    // An invented six-effect caustic train, backward feed (6 ≥ the pooled crossover of 5 effects).
    const train = {
      liquor: 'sodium-hydroxide',
      effects: 6,
      feedArrangement: 'backward',
      feed: { massFlow: 10, massFraction: 0.1, temperature: 60 },
      product: { massFraction: 0.3 },
      steam: { pressure: 1000 },
      lastEffectPressure: 15,
      overallHeatTransferCoefficients: [2800, 2500, 2200, 1900, 1600, 1300],
    };
    const res = await sweep(h, {
      operation: 'multiple-effect',
      base: train,
      vary: [{ field: 'lastEffectPressure', values: [12, '20 kPa'] }],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 2, succeeded: 2 });
    const rows = res.body.rows as Row[];
    for (const [i, p] of [12, '20 kPa'].entries()) {
      const one = await request(h.app)
        .post('/v1/evaporators/multiple-effect')
        .set(auth(h.token))
        .send({ ...train, lastEffectPressure: p });
      expect(one.status).toBe(200);
      const { cautions, provenance, ...rest } = one.body as Record<string, unknown>;
      expect(JSON.stringify(rows[i]!.result)).toBe(JSON.stringify(rest));
      expect(res.body.cautions).toEqual(cautions);
      expect(res.body.provenance).toEqual(provenance);
    }
    // Each point costs what its single call costs (5 + 5 per effect).
    expect(res.body.unitsCharged).toBe(2 * (5 + 5 * 6));
  });

  it('accepts 10 000 points and refuses more, naming vary and the limit', async () => {
    const h = await makeHarness();
    const over = await sweep(h, {
      operation: 'single-effect',
      base,
      vary: [
        { field: 'body.pressure', from: 10, to: 20, steps: 101 },
        { field: 'feed.temperature', from: 30, to: 80, steps: 100 },
      ],
    });
    expect(over.status).toBe(422);
    expect(over.body.errors).toEqual([expect.objectContaining({ field: 'vary' })]);
    expect(over.body.errors[0].message).toMatch(/10100 points; at most 10000/);
  });

  describe('refuses hostile input with a problem naming the field', () => {
    const cases: [string, unknown, string, RegExp?][] = [
      [
        'an unknown operation',
        { operation: 'rm -rf', base, vary: [{ field: 'body.pressure', values: [1] }] },
        'operation',
      ],
      [
        'a field not in the schema',
        { operation: 'single-effect', base, vary: [{ field: 'body.colour', values: [1] }] },
        'vary[0].field',
        /not a value field/,
      ],
      [
        'a path to an object',
        { operation: 'single-effect', base, vary: [{ field: 'body', values: [1] }] },
        'vary[0].field',
      ],
      [
        'a __proto__ segment',
        { operation: 'single-effect', base, vary: [{ field: 'body.__proto__.x', values: [1] }] },
        'vary[0].field',
        /__proto__/,
      ],
      [
        'a constructor segment',
        { operation: 'single-effect', base, vary: [{ field: 'constructor.prototype', values: [1] }] },
        'vary[0].field',
      ],
      [
        'a path with brackets of text',
        { operation: 'single-effect', base, vary: [{ field: 'body["pressure"]', values: [1] }] },
        'vary[0].field',
      ],
      [
        'one step',
        { operation: 'single-effect', base, vary: [{ field: 'body.pressure', from: 1, to: 2, steps: 1 }] },
        'vary[0].steps',
        /2/,
      ],
      [
        'too many steps',
        {
          operation: 'single-effect',
          base,
          vary: [{ field: 'body.pressure', from: 1, to: 2, steps: 10001 }],
        },
        'vary[0].steps',
        /10000/,
      ],
      [
        'fractional steps',
        { operation: 'single-effect', base, vary: [{ field: 'body.pressure', from: 1, to: 2, steps: 2.5 }] },
        'vary[0].steps',
      ],
      [
        'log spacing from 0',
        {
          operation: 'single-effect',
          base,
          vary: [{ field: 'body.pressure', from: 0, to: 20, steps: 3, spacing: 'log' }],
        },
        'vary[0].from',
        /above 0/,
      ],
      [
        'log spacing to a negative',
        {
          operation: 'single-effect',
          base,
          vary: [{ field: 'body.pressure', from: 10, to: -20, steps: 3, spacing: 'log' }],
        },
        'vary[0].to',
      ],
      [
        'a huge number',
        {
          operation: 'single-effect',
          base,
          vary: [{ field: 'body.pressure', from: 1, to: '__HUGE__', steps: 3 }],
        },
        'vary[0].to',
      ],
      [
        'three fields',
        {
          operation: 'single-effect',
          base,
          vary: [
            { field: 'body.pressure', values: [1] },
            { field: 'feed.temperature', values: [1] },
            { field: 'feed.massFlow', values: [1] },
          ],
        },
        'vary',
      ],
      ['no field', { operation: 'single-effect', base, vary: [] }, 'vary'],
      [
        'a duplicate field',
        {
          operation: 'single-effect',
          base,
          vary: [
            { field: 'body.pressure', values: [1] },
            { field: 'body.pressure', values: [2] },
          ],
        },
        'vary[1].field',
        /twice/,
      ],
      [
        'an object as a value',
        { operation: 'single-effect', base, vary: [{ field: 'body.pressure', values: [{ $gt: 1 }] }] },
        'vary[0].values[0]',
      ],
      [
        'an empty list',
        { operation: 'single-effect', base, vary: [{ field: 'body.pressure', values: [] }] },
        'vary[0].values',
      ],
      [
        'an unknown key',
        { operation: 'single-effect', base, vary: [{ field: 'body.pressure', values: [1], evil: true }] },
        'vary[0].evil',
      ],
      [
        'a base that is not an object',
        { operation: 'single-effect', base: [1, 2], vary: [{ field: 'body.pressure', values: [1] }] },
        'base',
      ],
    ];
    it.each(cases)('%s', async (_name, body, field, message) => {
      const h = await makeHarness();
      const res = await request(h.app)
        .post('/v1/sweeps')
        .set(auth(h.token))
        .set('Content-Type', 'application/json')
        .send(JSON.stringify(body).replace('"__HUGE__"', '1e400'));
      expect(res.status).toBe(422);
      expect(res.type).toBe('application/problem+json');
      const hit = (res.body.errors as { field: string; message: string }[]).find((e) => e.field === field);
      expect(hit, JSON.stringify(res.body.errors)).toBeDefined();
      if (message) expect(hit!.message).toMatch(message);
      expect((await usageRows(h.store)).every((r) => r.units === 0)).toBe(true);
    });
  });
});
