// POST /console-api/request-log/{id}/replay: a logged calculation run again on today's engine,
// compared field by field with the logged answer and metered to the entry's account.
// Runs on SQLite and PostgreSQL (the store of tests/http/helpers.ts).
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { beforeEach, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { recordRequest } from '../../server/accounts/metering.js';
import { consoleRouteModules } from '../../server/console/index.js';
import { requestLogRoutes } from '../../server/console/request-log.js';
import { multipleEffect } from '../../server/http/v1/operations/evaporators.js';
import { getRequestLogEntry } from '../../server/accounts/request-log-query.js';
import { replayEntry } from '../../server/http/replay.js';
import type { ReplayResult } from '../../shared/console/request-log.js';
import { makeHarness, usageRows, type Harness } from '../http/helpers.js';
import { signInOnePerRole, type ConsoleAgent } from './console-agents.js';

if (!consoleRouteModules.includes(requestLogRoutes)) consoleRouteModules.push(requestLogRoutes);

const PASSWORD = 'correct-horse-battery-42';
// Superheated steam in a header: the worked example of POST /v1/steam/state (1 unit).
const STATE_BODY = { pressure: '10 bar', temperature: 250 };

let h: Harness;
let agents: Record<'admin' | 'billing' | 'developer', ConsoleAgent>;

async function setUp(opts: { retain?: boolean; quota?: number } = {}) {
  h = await makeHarness({ retain: opts.retain ?? true, quota: opts.quota ?? 1000 });
  agents = await signInOnePerRole(h.store, h.app, {
    password: PASSWORD,
    developerAccountId: h.accountId,
    now: h.clock.now,
  });
}

/** Calls /v1 with the harness key; returns the request-log id of the call. */
async function logged(path: string, body: unknown): Promise<number> {
  const res = await request(h.app)
    .post(path)
    .set('Authorization', `Bearer ${h.token}`)
    .send(body as object);
  expect(res.status).toBe(200);
  const rid = res.headers['x-request-id'] as string;
  const [row] = await h.store.rows<{ id: number }>(sql`SELECT id FROM request_log WHERE request_id = ${rid}`);
  return Number(row!.id);
}

function replay(id: number, as: ConsoleAgent = agents.developer) {
  return as.agent.post(`/console-api/request-log/${id}/replay`).set('X-CSRF-Token', as.csrf);
}

async function setStored(id: number, column: 'request_body' | 'response_body', text: string | null) {
  if (column === 'request_body')
    await h.store.execute(sql`UPDATE request_log SET request_body = ${text} WHERE id = ${id}`);
  else await h.store.execute(sql`UPDATE request_log SET response_body = ${text} WHERE id = ${id}`);
}

describe('replay of a logged calculation', () => {
  beforeEach(async () => {
    await setUp();
  });

  it('finds no difference when today’s result equals the logged one', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    const res = await replay(id);
    expect(res.status).toBe(200);
    const body = res.body as ReplayResult;
    expect(body.operation).toBe('steam.state');
    expect(body.responseStored).toBe(true);
    expect(body.differences).toEqual([]);
    expect(body.modelSources).toEqual([]);
    expect(body.logged.engineVersion).toBe('test-engine');
    expect(body.today.engineVersion).toBe('test-engine');
    expect(body.today.result).toEqual(body.logged.result);
  });

  it('lists a changed number with its absolute and relative change, and a changed model source', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    const [row] = await h.store.rows<{ response_body: string }>(
      sql`SELECT response_body FROM request_log WHERE id = ${id}`,
    );
    // An older answer: a temperature 0.5 °C lower, another engine and another source for IF97.
    const older = JSON.parse(row!.response_body) as {
      temperature: number;
      provenance: { engineVersion: string; models: { id: string; source: string }[] };
      [k: string]: unknown;
    };
    const todayTemperature = older.temperature;
    older.temperature = todayTemperature - 0.5;
    older.provenance.models[0]!.source = 'An older citation';
    older.oldOnly = 'gone today';
    await setStored(id, 'response_body', JSON.stringify(older));

    const res = await replay(id);
    expect(res.status).toBe(200);
    const body = res.body as ReplayResult;
    const t = body.differences.find((d) => d.field === 'temperature');
    expect(t).toMatchObject({ change: 'changed', logged: todayTemperature - 0.5, today: todayTemperature });
    expect(t!.absolute).toBeCloseTo(0.5, 12);
    expect(t!.relative).toBeCloseTo(0.5 / Math.abs(todayTemperature - 0.5), 12);
    expect(body.differences.find((d) => d.field === 'oldOnly')).toEqual({
      field: 'oldOnly',
      change: 'removed',
      logged: 'gone today',
    });
    expect(body.differences).toHaveLength(2);
    expect(body.modelSources).toEqual([
      {
        id: older.provenance.models[0]!.id,
        change: 'changed',
        logged: 'An older citation',
        today: (body.today.result as typeof older).provenance.models[0]!.source,
      },
    ]);
  });

  it('charges the operation’s units to the entry’s account with a usage event and a log row', async () => {
    const id = await logged('/v1/evaporators/multiple-effect', multipleEffectExample());
    const before = await usageRows(h.store);
    const original = before.at(-1)!;
    const res = await replay(id);
    expect(res.status).toBe(200);
    const body = res.body as ReplayResult;
    expect(body.unitsCharged).toBe(original.units);
    const after = await usageRows(h.store);
    expect(after).toHaveLength(before.length + 1);
    expect(after.at(-1)).toMatchObject({
      operation: 'evaporators.multiple-effect',
      status: 200,
      units: original.units,
      request_id: body.requestId,
    });
    const [row] = await h.store.rows<{ path: string; account_id: number }>(
      sql`SELECT path, account_id FROM request_log WHERE request_id = ${body.requestId}`,
    );
    expect(row!.path).toBe(`/console-api/request-log/${id}/replay`);
    expect(Number(row!.account_id)).toBe(h.accountId);
  });

  it('replays an operation whose path names the liquor, with the liquor from the logged path', async () => {
    // 30 % caustic in the last body: the worked example of the boiling-point operation.
    const id = await logged('/v1/liquors/sodium-hydroxide/boiling-point', {
      massFraction: 0.3,
      pressure: '150 mbar',
    });
    const res = await replay(id);
    expect(res.status).toBe(200);
    const body = res.body as ReplayResult;
    expect(body.operation).toBe('liquors.boiling-point');
    // The log redacts text that looks like a key, which a long caution code can resemble: such a
    // logged value is not compared, so equal results still show no difference.
    expect(body.differences).toEqual([]);
  });

  it('gives a relative change of null where the logged number was 0', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    const [row] = await h.store.rows<{ response_body: string }>(
      sql`SELECT response_body FROM request_log WHERE id = ${id}`,
    );
    const older = JSON.parse(row!.response_body) as { temperature: number };
    const today = older.temperature;
    older.temperature = 0;
    await setStored(id, 'response_body', JSON.stringify(older));
    const body = (await replay(id)).body as ReplayResult;
    expect(body.differences).toEqual([
      { field: 'temperature', change: 'changed', logged: 0, today, absolute: today, relative: null },
    ]);
  });

  it('shows today’s result alone when no response was stored', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    await setStored(id, 'response_body', null);
    const res = await replay(id);
    expect(res.status).toBe(200);
    const body = res.body as ReplayResult;
    expect(body.responseStored).toBe(false);
    expect(body.note).toMatch(/No response was stored/);
    expect(body.logged.result).toBeNull();
    expect((body.today.result as { temperature: number }).temperature).toBeGreaterThan(0);
    expect(body.differences).toEqual([]);
  });
});

describe('replay refusals', () => {
  beforeEach(async () => {
    await setUp();
  });

  async function expectRefused(res: request.Response, status: number, type: string, detail: RegExp) {
    expect(res.status).toBe(status);
    expect(res.body).toMatchObject({ type: `/problems/${type}` });
    expect((res.body as { detail: string }).detail).toMatch(detail);
  }

  it('refuses an entry whose body was not retained, charging nothing', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    await setStored(id, 'request_body', null);
    const before = await usageRows(h.store);
    await expectRefused(await replay(id), 422, 'not-replayable', /request body was not retained/);
    expect(await usageRows(h.store)).toEqual(before);
  });

  it('refuses a body cut at the log limit', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    await setStored(id, 'request_body', '{"pressure":"10 bar","tempe…[truncated]');
    await expectRefused(await replay(id), 422, 'not-replayable', /cut at the log limit/);
  });

  it('refuses a body with redacted values', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    await setStored(id, 'request_body', '{"pressure":"[redacted]","temperature":250}');
    await expectRefused(await replay(id), 422, 'not-replayable', /redacted/);
  });

  it('refuses a logged body holding a prototype key or nested beyond the body limit, charging nothing', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    const before = await usageRows(h.store);
    await setStored(
      id,
      'request_body',
      '{"pressure":"10 bar","temperature":250,"__proto__":{"polluted":true}}',
    );
    await expectRefused(await replay(id), 422, 'not-replayable', /refused as a body/);
    const deep = `{"pressure":"10 bar","temperature":250,"note":${'['.repeat(80)}1${']'.repeat(80)}}`;
    await setStored(id, 'request_body', deep);
    await expectRefused(await replay(id), 422, 'not-replayable', /refused as a body/);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(await usageRows(h.store)).toEqual(before);
  });

  it('refuses an operation that changes stored data', async () => {
    const id = await logged('/v1/steam/state', STATE_BODY);
    await h.store.execute(sql`UPDATE usage_events SET operation = 'liquors.stored.create' WHERE request_id =
      (SELECT request_id FROM request_log WHERE id = ${id})`);
    await expectRefused(await replay(id), 422, 'not-replayable', /not a calculation that can be run again/);
  });

  it('refuses another account’s entry to a developer, and a missing entry', async () => {
    const other = await createAccount(h.store, { name: 'Invented Other Mill', now: h.clock.now });
    await recordRequest(h.store, {
      at: h.clock.now,
      accountId: other.id,
      keyId: null,
      operation: 'steam.state',
      status: 200,
      units: 1,
      latencyMs: 3,
      requestId: 'other-account-call',
      engineVersion: 'test-engine',
      method: 'POST',
      path: '/v1/steam/state',
      requestBody: JSON.stringify(STATE_BODY),
      responseBody: null,
    });
    const [row] = await h.store.rows<{ id: number }>(
      sql`SELECT id FROM request_log WHERE request_id = 'other-account-call'`,
    );
    const before = await usageRows(h.store);
    await expectRefused(await replay(Number(row!.id)), 403, 'forbidden', /not a member/);
    expect(await usageRows(h.store)).toEqual(before);
    await expectRefused(await replay(999_999), 404, 'not-found', /no request-log entry/);
    // An admin sees every account: the replay is charged to the entry's own account.
    const res = await replay(Number(row!.id), agents.admin);
    expect(res.status).toBe(200);
    expect((await usageRows(h.store)).at(-1)).toMatchObject({
      request_id: (res.body as ReplayResult).requestId,
    });
  });
});

describe('replay and the quota', () => {
  it('refuses with the quota problem when the account has no units left', async () => {
    await setUp({ quota: 1 });
    const id = await logged('/v1/steam/state', STATE_BODY); // spends the only unit
    const before = await usageRows(h.store);
    const res = await replay(id);
    expect(res.status).toBe(429);
    expect(res.body).toMatchObject({ type: '/problems/quota-exceeded' });
    expect((res.body as { detail: string }).detail).toMatch(
      /costs 1 units but only 0 of the monthly quota of 1/,
    );
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
    expect(await usageRows(h.store)).toEqual(before);
  });
});

describe('replay and the quota under concurrency', () => {
  it('charges only one of two replays sent at once when the quota covers one', async () => {
    await setUp({ quota: 2 });
    const id = await logged('/v1/steam/state', STATE_BODY); // 1 of 2 units spent
    const [a, b] = await Promise.all([replay(id), replay(id)]);
    expect([a.status, b.status].sort()).toEqual([200, 429]);
    // The service itself, called twice in the same turn: the two checks may not both pass.
    const row = (await getRequestLogEntry(h.store, id, null))!;
    const again = await Promise.allSettled([
      replayEntry(h.deps, row, '/test'),
      replayEntry(h.deps, row, '/test'),
    ]);
    expect(again.map((r) => r.status)).toEqual(['rejected', 'rejected']);
    await h.store.execute(sql`UPDATE accounts SET monthly_unit_quota = 3 WHERE id = ${h.accountId}`);
    const third = await Promise.allSettled([
      replayEntry(h.deps, row, '/test'),
      replayEntry(h.deps, row, '/test'),
    ]);
    expect(third.map((r) => r.status).sort()).toEqual(['fulfilled', 'rejected']);
    const charged = (await usageRows(h.store)).reduce((sum, r) => sum + r.units, 0);
    expect(charged).toBe(3);
  });
});

/** The worked example of POST /v1/evaporators/multiple-effect, as OpenAPI documents it. */
function multipleEffectExample(): unknown {
  const r = multipleEffect.request!;
  return r.example?.value ?? r.body!.meta()?.example;
}
