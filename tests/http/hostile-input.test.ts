// Hostile bodies: property names and CSV columns that name prototypes, and JSON nested thousands
// of levels deep. Each must get a problem (RFC 9457) naming the column, field or limit, change
// nothing outside its own request, and leave the service answering other accounts normally.
// Why: assignment through a user-chosen key "__proto__" sets a prototype (ECMA-262 §B.2.2.1,
// Object.prototype.__proto__), so one account's body could change every object in the process;
// and recursive code overflows the stack on deep input (common practice: bound the depth first).
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey } from '../../server/accounts/keys.js';
import { MAX_JSON_DEPTH } from '../../server/http/middleware/body.js';
import { ALL_SCOPES, makeHarness, type Harness } from './helpers.js';

/** A second account with its own key on the same app (the same process). */
async function otherAccount(h: Harness): Promise<string> {
  const account = await createAccount(h.store, {
    name: 'Invented Other Mills',
    monthlyUnitQuota: 1000,
    now: h.clock.now,
  });
  return (
    await createKey(h.store, h.config.secret, {
      accountId: account.id,
      name: 'other key',
      scopes: ALL_SCOPES,
      rateLimitPerMinute: 1000,
      now: h.clock.now,
    })
  ).token;
}

/** A valid steam-state request (IF97 region 1, compressed water) from the other account: 200. */
async function otherAccountIsServed(h: Harness, token: string): Promise<void> {
  const res = await request(h.app)
    .post('/v1/steam/state')
    .set('Authorization', `Bearer ${token}`)
    .send({ pressure: '100 kPa', temperature: 20 });
  expect(res.status).toBe(200);
}

function noPollution(): void {
  expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  expect(Object.prototype.hasOwnProperty.call(Object.prototype, 'polluted')).toBe(false);
  expect(([] as unknown as Record<string, unknown>).polluted).toBeUndefined();
  expect((Object.prototype.toString as unknown as Record<string, unknown>).polluted).toBeUndefined();
}

afterEach(() => {
  // Keep one failing test from poisoning the next if a refusal ever regresses.
  for (const target of [Object.prototype, Array.prototype, Object.prototype.toString]) {
    delete (target as unknown as Record<string, unknown>).polluted;
  }
});

const csvPost = (h: Harness, csv: string) =>
  request(h.app)
    .post('/v1/batch?operation=steam-state')
    .set('Authorization', `Bearer ${h.token}`)
    .set('Content-Type', 'text/csv')
    .send(csv);

describe('batch CSV columns that name prototypes', () => {
  it.each(['__proto__.polluted', 'constructor.prototype.polluted', 'feed.__proto__.polluted'])(
    'refuses a CSV column named %s with a 422 naming the column, and another account is then served',
    async (column) => {
      const h = await makeHarness();
      const other = await otherAccount(h);
      const res = await csvPost(h, `pressure,temperature,${column}\n100 kPa,20,1\n`);
      expect(res.status).toBe(422);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(res.body.type).toBe('/problems/validation-failed');
      expect(res.body.errors).toEqual([expect.objectContaining({ field: `line 1, column ${column}` })]);
      noPollution();
      await otherAccountIsServed(h, other);
    },
  );

  it('refuses the same column in an uploaded CSV file with a 422 naming the column', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/batch')
      .set('Authorization', `Bearer ${h.token}`)
      .field('operation', 'steam-state')
      .attach('file', Buffer.from('pressure,temperature,__proto__.polluted\n100 kPa,20,1\n'), 'cases.csv');
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([
      expect.objectContaining({ field: 'line 1, column __proto__.polluted' }),
    ]);
    noPollution();
  });

  it('fails the case, without touching Object.prototype.toString, for a column toString.polluted', async () => {
    const h = await makeHarness();
    const res = await csvPost(h, 'pressure,temperature,toString.polluted\n100 kPa,20,1\n');
    // An own property "toString" is built instead, which the contract then refuses as no field:
    // the batch answers, and that case carries its own 422.
    expect(res.status).toBe(200);
    expect(res.body.results[0]).toMatchObject({ status: 'error', problem: { status: 422 } });
    expect(JSON.stringify(res.body.results[0].problem.errors)).toContain('toString');
    noPollution();
  });

  it.each([
    ['an array length', 'overallHeatTransferCoefficients.length'],
    ['an index above 999', 'overallHeatTransferCoefficients[4000000000]'],
  ])('refuses a CSV column setting %s with a 422 naming the column', async (_what, column) => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/batch?operation=multiple-effect')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'text/csv')
      .send(`overallHeatTransferCoefficients[0],${column}\n2000,5\n`);
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([expect.objectContaining({ field: `line 1, column ${column}` })]);
  });

  it('answers 422, not 500, when one column goes inside the number another column set', async () => {
    const h = await makeHarness();
    const res = await csvPost(h, 'pressure,pressure.unit,temperature\n100 kPa,kPa,20\n');
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([expect.objectContaining({ field: 'line 1, column pressure.unit' })]);
  });
});

describe('JSON bodies with prototype-named properties', () => {
  const cases: [string, string, string][] = [
    ['top level', '{"pressure":"100 kPa","temperature":20,"__proto__":{"polluted":1}}', '__proto__'],
    [
      'constructor.prototype',
      '{"pressure":"100 kPa","temperature":20,"constructor":{"prototype":{"polluted":1}}}',
      'constructor',
    ],
    [
      'inside a batch case',
      '{"operation":"steam-state","cases":[{"pressure":"100 kPa","temperature":20},{"__proto__":{"polluted":1}}]}',
      'cases[1].__proto__',
    ],
    [
      'deep inside a liquor definition',
      '{"operation":"liquor-boiling-point","cases":[{"liquor":{"definition":{"name":"x","prototype":{"polluted":1}}}}]}',
      'cases[0].liquor.definition.prototype',
    ],
  ];
  it.each(cases)(
    'refuses a "__proto__"-style property (%s) with a 422 naming its path, and another account is then served',
    async (_where, body, field) => {
      const h = await makeHarness({ retain: true });
      const other = await otherAccount(h);
      const path = body.includes('"cases"') ? '/v1/batch' : '/v1/steam/state';
      const res = await request(h.app)
        .post(path)
        .set('Authorization', `Bearer ${h.token}`)
        .set('Content-Type', 'application/json')
        .send(body);
      expect(res.status).toBe(422);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(res.body.errors).toEqual([expect.objectContaining({ field })]);
      noPollution();
      await otherAccountIsServed(h, other);
    },
  );

  it('refuses a multipart text field named __proto__[polluted] with a 422 naming it', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/batch')
      .set('Authorization', `Bearer ${h.token}`)
      .field('operation', 'steam-state')
      .field('__proto__[polluted]', '1')
      .attach('file', Buffer.from('pressure,temperature\n100 kPa,20\n'), 'cases.csv');
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([expect.objectContaining({ field: '__proto__' })]);
    noPollution();
  });

  it('refuses a console body with a __proto__ property with a 422 before any route reads it', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('Content-Type', 'application/json')
      .send('{"email":"a@b.invalid","password":"x","__proto__":{"polluted":1}}');
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([expect.objectContaining({ field: '__proto__' })]);
    noPollution();
  });
});

/** `[[[…]]]` nested `depth` levels (the outer array is level 1). */
const nested = (depth: number) => '['.repeat(depth) + ']'.repeat(depth);

describe('deeply nested JSON bodies', () => {
  it(`refuses a 5 000-level body on a retained-body account with a 400 naming the limit of ${MAX_JSON_DEPTH}, logs it at 0 units, and keeps serving`, async () => {
    const h = await makeHarness({ retain: true });
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/json')
      .send(`{"pressure":"100 kPa","temperature":20,"x":${nested(5000)}}`);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body.type).toBe('/problems/body-too-deep');
    expect(res.body.detail).toContain(`${MAX_JSON_DEPTH} levels`);
    const rows = await h.store.rows<{ status: number; response_body: string; units: number }>(
      sql`SELECT rl.status, rl.response_body, ue.units FROM request_log rl JOIN usage_events ue USING (request_id)`,
    );
    expect(rows).toEqual([
      { status: 400, response_body: expect.stringContaining('body-too-deep'), units: 0 },
    ]);
    // The process is healthy: the same key is served at once.
    const ok = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .send({ pressure: '100 kPa', temperature: 20 });
    expect(ok.status).toBe(200);
  });

  it('handles a 63-level body normally, and logs it with its deep part cut', async () => {
    const h = await makeHarness({ retain: true });
    // The harness's test route echoes its body, so any nesting reaches a 200.
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/json')
      .send(nested(63));
    expect(res.status).toBe(200);
    expect(JSON.stringify(res.body.echo)).toBe(nested(63));
    const [row] = await h.store.rows<{ status: number; request_body: string }>(
      sql`SELECT status, request_body FROM request_log`,
    );
    expect(row!.status).toBe(200);
    expect(row!.request_body).toContain('[nested too deep]');
  });

  it(`accepts exactly ${MAX_JSON_DEPTH} levels and refuses ${MAX_JSON_DEPTH + 1}`, async () => {
    const h = await makeHarness();
    const send = (depth: number) =>
      request(h.app)
        .post('/v1/__test/charge')
        .set('Authorization', `Bearer ${h.token}`)
        .set('Content-Type', 'application/json')
        .send(nested(depth));
    expect((await send(MAX_JSON_DEPTH)).status).toBe(200);
    const refused = await send(MAX_JSON_DEPTH + 1);
    expect(refused.status).toBe(400);
    expect(refused.body.type).toBe('/problems/body-too-deep');
  });

  it('refuses a deeply nested console body with the same 400', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('Content-Type', 'application/json')
      .send(`{"email":${nested(5000)}}`);
    expect(res.status).toBe(400);
    expect(res.body.type).toBe('/problems/body-too-deep');
  });
});
