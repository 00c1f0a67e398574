// The console's workbench: GET /console-api/workbench/operations and POST /console-api/workbench/run
// (a /v1 calculation, or a sweep of it, run with a chosen API key as that key's own call).
// Runs on SQLite and PostgreSQL (the store of tests/http/helpers.ts).
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { promisify } from 'node:util';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { beforeEach, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey, revokeKey } from '../../server/accounts/keys.js';
import { consoleRouteModules } from '../../server/console/index.js';
import { workbenchRoutes } from '../../server/console/workbench.js';
import type { WorkbenchOperationList, WorkbenchResult } from '../../shared/console/workbench.js';
import {
  curlSnippet,
  pythonSnippet,
  typescriptSnippet,
} from '../../console/src/composables/request-snippets.js';
import { makeHarness, usageRows, type Harness } from '../http/helpers.js';
import { signInOnePerRole, type ConsoleAgent } from './console-agents.js';

if (!consoleRouteModules.includes(workbenchRoutes)) consoleRouteModules.push(workbenchRoutes);

const PASSWORD = 'correct-horse-battery-42';
// The worked example of POST /v1/evaporators/single-effect (an invented caustic concentrator), with
// the body pressure typed as an engineer types it.
const SINGLE_EFFECT = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: '4.5 t/h', massFraction: 0.1, temperature: 40 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: '20 kPa', overallHeatTransferCoefficient: 1800 },
};

let h: Harness;
let agents: Record<'admin' | 'billing' | 'developer', ConsoleAgent>;

async function setUp(opts: { quota?: number } = {}) {
  h = await makeHarness({ retain: true, quota: opts.quota ?? 1000 });
  agents = await signInOnePerRole(h.store, h.app, {
    password: PASSWORD,
    developerAccountId: h.accountId,
    now: h.clock.now,
  });
}

function run(body: object, as: ConsoleAgent = agents.developer) {
  return as.agent.post('/console-api/workbench/run').set('X-CSRF-Token', as.csrf).send(body);
}

async function logRow(requestId: string) {
  const [row] = await h.store.rows<{
    path: string;
    key_id: number;
    account_id: number;
    status: number;
  }>(sql`SELECT path, key_id, account_id, status FROM request_log WHERE request_id = ${requestId}`);
  return row;
}

describe('workbench operations', () => {
  beforeEach(async () => {
    await setUp();
  });

  it('lists the calculations with a JSON Schema of the request and its worked example', async () => {
    const res = await agents.developer.agent.get('/console-api/workbench/operations');
    expect(res.status).toBe(200);
    const list = res.body as WorkbenchOperationList;
    const single = list.items.find((o) => o.id === 'evaporators.single-effect')!;
    expect(single).toMatchObject({
      path: '/v1/evaporators/single-effect',
      method: 'post',
      scope: 'evaporators',
      batchName: 'single-effect',
      sweepable: true,
      params: null,
    });
    // The schema comes from the zod contract: the quantity fields carry their unit and kind.
    const defs = single.body.$defs as Record<string, { properties: Record<string, Record<string, unknown>> }>;
    const feed = Object.values(defs).find((d) => d.properties?.massFlow && d.properties?.temperature)!;
    expect(feed.properties.massFlow).toMatchObject({ 'x-unit': 'kg/s', 'x-quantity-kind': 'massFlow' });
    expect((single.example.body as { liquor: string }).liquor).toBe('sodium-hydroxide');
    // An operation whose path names the liquor brings its path parameters, and is not swept here.
    const bpr = list.items.find((o) => o.id === 'liquors.boiling-point')!;
    expect(bpr.sweepable).toBe(false);
    expect(bpr.example.params).toEqual({ liquorId: expect.any(String) as string });
    // Only calculations: nothing that stores or lists.
    expect(list.items.map((o) => o.id)).not.toContain('liquors.stored.create');
  });

  it('refuses the billing role, which runs no calculations', async () => {
    const res = await agents.billing.agent.get('/console-api/workbench/operations');
    expect(res.status).toBe(403);
  });
});

describe('workbench runs', () => {
  beforeEach(async () => {
    await setUp();
  });

  it('runs a calculation with the key, answering as the public API and metering it as the key’s call', async () => {
    const res = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    expect(res.status).toBe(200);
    const out = res.body as WorkbenchResult;
    expect(out.kind).toBe('single');
    expect(out.unitsCharged).toBe(5);
    expect(out.request).toEqual({
      method: 'POST',
      path: '/v1/evaporators/single-effect',
      body: SINGLE_EFFECT,
    });

    // The same body through the public API gives the same result.
    const direct = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set('Authorization', `Bearer ${h.token}`)
      .send(SINGLE_EFFECT);
    expect(direct.status).toBe(200);
    const result = out.result as Record<string, unknown>;
    expect(result).toEqual(direct.body);
    expect(result).toHaveProperty('warnings');
    expect(result).toHaveProperty('cautions');
    expect(result).toHaveProperty('provenance');

    const row = await logRow(out.requestId);
    expect(row!.path).toBe('/v1/evaporators/single-effect');
    expect(Number(row!.key_id)).toBe(h.keyId);
    expect(Number(row!.account_id)).toBe(h.accountId);
    const usage = await usageRows(h.store);
    expect(usage.find((u) => u.request_id === out.requestId)).toMatchObject({
      operation: 'evaporators.single-effect',
      status: 200,
      units: 5,
    });
  });

  it('logs the call so that the request log can run it again', async () => {
    const res = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    const out = res.body as WorkbenchResult;
    const [row] = await h.store.rows<{ id: number }>(
      sql`SELECT id FROM request_log WHERE request_id = ${out.requestId}`,
    );
    const again = await agents.developer.agent
      .post(`/console-api/request-log/${Number(row!.id)}/replay`)
      .set('X-CSRF-Token', agents.developer.csrf);
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({
      operation: 'evaporators.single-effect',
      responseStored: true,
      differences: [],
    });
  });

  it('runs an operation that names its liquor in the path, and logs the public path', async () => {
    // 30 % caustic at 150 mbar: the worked example of the boiling-point operation.
    const res = await run({
      keyId: h.keyId,
      operation: 'liquors.boiling-point',
      params: { liquorId: 'sodium-hydroxide' },
      body: { massFraction: 0.3, pressure: '150 mbar' },
    });
    expect(res.status).toBe(200);
    const out = res.body as WorkbenchResult;
    expect(out.request.path).toBe('/v1/liquors/sodium-hydroxide/boiling-point');
    const direct = await request(h.app)
      .post('/v1/liquors/sodium-hydroxide/boiling-point')
      .set('Authorization', `Bearer ${h.token}`)
      .send({ massFraction: 0.3, pressure: '150 mbar' });
    expect(out.result).toEqual(direct.body);
    expect((await logRow(out.requestId))!.path).toBe('/v1/liquors/sodium-hydroxide/boiling-point');
    // A liquor the service does not know is the API's 404.
    const unknown = await run({
      keyId: h.keyId,
      operation: 'liquors.boiling-point',
      params: { liquorId: 'no-such-liquor' },
      body: { massFraction: 0.3, pressure: '150 mbar' },
    });
    expect(unknown.status).toBe(404);
  });

  it('does not sweep an operation that takes path parameters', async () => {
    const res = await run({
      keyId: h.keyId,
      operation: 'liquors.boiling-point',
      params: { liquorId: 'sodium-hydroxide' },
      body: { massFraction: 0.3, pressure: '150 mbar' },
      vary: [{ field: 'pressure', values: [10, 20] }],
    });
    expect(res.status).toBe(422);
    expect((res.body as { errors: { field: string }[] }).errors[0]!.field).toBe('vary');
  });

  it('admin may use any account’s key', async () => {
    const res = await run(
      { keyId: h.keyId, operation: 'steam.state', body: { pressure: '10 bar', temperature: 250 } },
      agents.admin,
    );
    expect(res.status).toBe(200);
    expect((res.body as WorkbenchResult).unitsCharged).toBe(1);
  });

  it('refuses a key of another account as one that does not exist, running and charging nothing', async () => {
    const other = await createAccount(h.store, {
      name: 'Invented Other Mills',
      monthlyUnitQuota: 1000,
      now: h.clock.now,
    });
    const { key } = await createKey(h.store, h.config.secret, {
      accountId: other.id,
      name: 'other key',
      scopes: ['evaporators'],
      now: h.clock.now,
    });
    const before = await usageRows(h.store);
    const res = await run({ keyId: key.id, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    expect(res.status).toBe(404);
    expect(await usageRows(h.store)).toEqual(before);
  });

  it('refuses a revoked key, logging the refusal for its account at 0 units', async () => {
    await revokeKey(h.store, h.keyId, h.clock.now);
    const before = await usageRows(h.store);
    const res = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    expect(res.status).toBe(403);
    expect((res.body as { detail: string }).detail).toMatch(/revoked/);
    expect(await usageRows(h.store)).toEqual(before);
    const [row] = await h.store.rows<{ status: number; units: number }>(
      sql`SELECT status FROM request_log WHERE key_id = ${h.keyId} ORDER BY id DESC LIMIT 1`,
    );
    expect(Number(row!.status)).toBe(403);
  });

  it('holds a run to the key’s own per-minute limit', async () => {
    const { key } = await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'two a minute',
      scopes: ['steam'],
      rateLimitPerMinute: 2,
      now: h.clock.now,
    });
    const call = () =>
      run({ keyId: key.id, operation: 'steam.state', body: { pressure: '10 bar', temperature: 250 } });
    expect((await call()).status).toBe(200);
    expect((await call()).status).toBe(200);
    const third = await call();
    expect(third.status).toBe(429);
    expect((third.body as { type: string; detail: string }).type).toMatch(/rate-limited/);
    expect((third.body as { detail: string }).detail).toMatch(/2 requests per minute/);
  });

  it('refuses a key without the operation’s scope', async () => {
    const { key } = await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'steam only',
      scopes: ['steam'],
      now: h.clock.now,
    });
    const res = await run({ keyId: key.id, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    expect(res.status).toBe(403);
    expect((res.body as { detail: string }).detail).toMatch(/scope "evaporators"/);
  });

  it('answers a bad value with the API’s problem naming the field, logged at 0 units', async () => {
    const body = { ...SINGLE_EFFECT, body: { ...SINGLE_EFFECT.body, pressure: '20 furlongs' } };
    const res = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body });
    expect(res.status).toBe(422);
    const direct = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set('Authorization', `Bearer ${h.token}`)
      .send(body);
    expect(direct.status).toBe(422);
    const errors = (res.body as { errors: { field: string; message: string }[] }).errors;
    expect(errors.map((e) => e.field)).toEqual(['body.pressure']);
    expect(errors).toEqual((direct.body as { errors: unknown }).errors);
    const [row] = await h.store.rows<{ status: number; units: number }>(
      sql`SELECT status, units FROM usage_events WHERE operation = 'evaporators.single-effect' ORDER BY id`,
    );
    expect(Number(row!.status)).toBe(422);
    expect(Number(row!.units)).toBe(0);
  });

  it('refuses a body with a prototype key as the public door does', async () => {
    const body = JSON.parse(
      '{"liquor":"sodium-hydroxide","feed":{"__proto__":{"massFlow":1}},"steam":{"pressure":300},"body":{"pressure":20}}',
    ) as object;
    const res = await agents.developer.agent
      .post('/console-api/workbench/run')
      .set('X-CSRF-Token', agents.developer.csrf)
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ keyId: h.keyId, operation: 'evaporators.single-effect', body }));
    expect(res.status).toBe(422);
    expect(JSON.stringify(res.body)).toMatch(/__proto__/);
  });

  it('refuses a body nested beyond the limit, an odd operation name or key id, charging nothing', async () => {
    let deep: unknown = 1;
    for (let i = 0; i < 200; i++) deep = [deep];
    const nested = await run({
      keyId: h.keyId,
      operation: 'evaporators.single-effect',
      body: { ...SINGLE_EFFECT, note: deep },
    });
    expect(nested.status).toBeGreaterThanOrEqual(400);
    expect(nested.status).toBeLessThan(500);
    for (const operation of ['__proto__', 'constructor', 'toString', 'x'.repeat(5000)]) {
      const res = await run({ keyId: h.keyId, operation, body: SINGLE_EFFECT });
      expect(res.status, operation.slice(0, 20)).toBe(422);
      expect(JSON.stringify(res.body)).toContain('operation');
    }
    for (const keyId of ['1; DROP TABLE api_keys', -1, 1.5, 1e300, null, { valueOf: 1 }]) {
      const res = await run({ keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
      expect(res.status, JSON.stringify(keyId)).toBeGreaterThanOrEqual(400);
      expect(res.status, JSON.stringify(keyId)).toBeLessThan(500);
    }
    const [charged] = await h.store.rows<{ units: number | string | null }>(
      sql`SELECT SUM(units) AS units FROM usage_events`,
    );
    expect(Number(charged?.units ?? 0)).toBe(0);
  });

  it('keeps no key sent in the body out of the request log of the run', async () => {
    // The account keeps bodies (retain: true): the run's body is logged, the key in it redacted.
    const res = await run({
      keyId: h.keyId,
      operation: 'evaporators.single-effect',
      body: { ...SINGLE_EFFECT, note: h.token, [h.token]: 1 },
    });
    expect(res.status).toBeLessThan(500);
    const rows = await h.store.rows<{ request_body: string | null; response_body: string | null }>(
      sql`SELECT request_body, response_body FROM request_log`,
    );
    expect(rows.length).toBeGreaterThan(0);
    expect(JSON.stringify(rows)).not.toContain(h.token);
  });

  it('refuses when the month’s quota cannot cover the call', async () => {
    await setUp({ quota: 3 });
    const res = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    expect(res.status).toBe(429);
    expect((res.body as { type: string }).type).toMatch(/quota-exceeded/);
  });

  it('sweeps a field, each point equal to the single call and charged as one', async () => {
    const res = await run({
      keyId: h.keyId,
      operation: 'evaporators.single-effect',
      body: SINGLE_EFFECT,
      vary: [{ field: 'body.pressure', values: [15, '20 kPa', 25] }],
    });
    expect(res.status).toBe(200);
    const out = res.body as WorkbenchResult;
    expect(out.kind).toBe('sweep');
    expect(out.request.path).toBe('/v1/sweeps');
    const sweep = out.result as {
      count: number;
      succeeded: number;
      unitsCharged: number;
      provenance: unknown;
      rows: { values: Record<string, unknown>; status: string; result: Record<string, unknown> }[];
    };
    expect(sweep).toMatchObject({ count: 3, succeeded: 3, unitsCharged: 15 });
    expect(out.unitsCharged).toBe(15);
    expect(sweep.provenance).toBeDefined();
    expect(sweep.rows.map((r) => r.values['body.pressure'])).toEqual([15, '20 kPa', 25]);
    // The middle point is the single call of the same body (cautions and provenance lifted out).
    const single = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    const {
      cautions: _c,
      provenance: _p,
      ...rest
    } = (single.body as WorkbenchResult).result as Record<string, unknown>;
    expect(sweep.rows[1]!.result).toEqual(rest);
    const row = await logRow(out.requestId);
    expect(row!.path).toBe('/v1/sweeps');
    const usage = await usageRows(h.store);
    expect(usage.find((u) => u.request_id === out.requestId)).toMatchObject({
      operation: 'sweeps.run',
      units: 15,
    });
  });

  it('answers a sweep of a field the body does not have with the field named', async () => {
    const res = await run({
      keyId: h.keyId,
      operation: 'evaporators.single-effect',
      body: SINGLE_EFFECT,
      vary: [{ field: 'body.colour', values: [1, 2] }],
    });
    expect(res.status).toBe(422);
    expect((res.body as { errors: { field: string }[] }).errors[0]!.field).toBe('vary[0].field');
  });
});

describe('copy as', () => {
  beforeEach(async () => {
    await setUp();
  });

  it('gives curl, TypeScript and Python requests that the public API answers as the workbench did', async () => {
    const res = await run({ keyId: h.keyId, operation: 'evaporators.single-effect', body: SINGLE_EFFECT });
    expect(res.status).toBe(200);
    const out = res.body as WorkbenchResult;
    const server = h.app.listen(0, '127.0.0.1');
    await new Promise((resolve) => server.once('listening', resolve));
    try {
      const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
      // The key comes from the environment, as the snippets say; the snippets themselves hold none.
      const env = { ...process.env, EBULLIO_API_KEY: h.token };
      const curl = curlSnippet(origin, out.request);
      expect(curl).not.toContain(h.token);
      const viaCurl = await promisify(execFile)('/usr/bin/bash', ['-c', curl], { env });
      expect(JSON.parse(viaCurl.stdout)).toEqual(out.result);
      // Debian's Python 3, standard library only.
      const python = pythonSnippet(origin, out.request);
      const viaPython = await promisify(execFile)('/usr/bin/python3', ['-c', python], { env });
      expect(JSON.parse(viaPython.stdout)).toEqual(out.result);
      // The generated client (openapi/client): the snippet type-checks against it and runs.
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-snippet-'));
      try {
        const file = path.join(dir, 'snippet.mts');
        const client = path.resolve(import.meta.dirname, '../../openapi/client/index.js');
        const snippet = typescriptSnippet(origin, out.request, {
          template: '/v1/evaporators/single-effect',
          params: {},
        });
        fs.writeFileSync(file, snippet.replace("'./openapi/client/index.js'", JSON.stringify(client)));
        const root = path.resolve(import.meta.dirname, '../..');
        const bin = path.join(root, 'node_modules/.bin');
        // From the checkout, where tsc finds Node's types.
        await promisify(execFile)(
          path.join(bin, 'tsc'),
          [
            ...['--noEmit', '--strict', '--skipLibCheck', '--types', 'node'],
            ...['--module', 'nodenext', '--target', 'es2022', file],
          ],
          { cwd: root },
        );
        const viaTypeScript = await promisify(execFile)(path.join(bin, 'tsx'), [file], { env });
        expect(JSON.parse(viaTypeScript.stdout)).toEqual(out.result);
      } finally {
        fs.rmSync(dir, { recursive: true, force: true });
      }
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });
});
