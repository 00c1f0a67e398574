// Idempotency-Key on the /v1 POSTs (server/http/middleware/idempotency.ts): a retry gets the
// first answer at 0 units and marked in the request log; another body is a 422; a retry while the
// first runs is a 409; records are per account, last 24 h, and live in the database.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { operationInfo } from '../../shared/operations.js';
import { createAccount, updateAccount } from '../../server/accounts/accounts.js';
import { createKey } from '../../server/accounts/keys.js';
import { pruneIdempotencyRecords } from '../../server/http/middleware/idempotency.js';
import { v1RouteModules } from '../../server/http/v1/index.js';
import type { V1RouteModule } from '../../server/http/v1/module.js';
import { declareOperation, mountOperation } from '../../server/http/v1/operation.js';
import { ALL_SCOPES, makeHarness, type Harness } from './helpers.js';

// A declared POST whose calculation waits for the test to let it go, to hold a request in flight.
let gate: { entered: () => void; release: Promise<void> } | undefined;
const slowModule: V1RouteModule = {
  register(router, deps) {
    mountOperation(
      router,
      declareOperation({
        operation: operationInfo('steam.state')!,
        method: 'post',
        path: '/v1/__test/slow',
        openApiName: 'testSlow',
        tag: 'Steam',
        summary: 'Waits for the test',
        response: { description: 'echo' },
        send: 'json',
        run: async () => {
          const g = gate;
          g?.entered();
          await g?.release;
          return { done: true };
        },
      }),
      deps,
    );
  },
};
if (!v1RouteModules.includes(slowModule)) v1RouteModules.push(slowModule);

const STEAM = { pressure: '10 bar', temperature: 250 };

let h: Harness;
beforeAll(async () => {
  h = await makeHarness();
});
afterAll(async () => {
  await h.store.close();
});

function post(path: string, body: unknown, key?: string, token = h.token) {
  const r = request(h.app).post(path).set('Authorization', `Bearer ${token}`);
  if (key !== undefined) r.set('Idempotency-Key', key);
  return r.send(body as object);
}

interface LogRow {
  request_id: string;
  status: number;
  idempotent_replay: unknown;
  units: number | string | null;
}
async function logOf(requestId: string): Promise<{ status: number; replay: boolean; units: number | null }> {
  const [row] = await h.store.rows<LogRow>(sql`
    SELECT rl.request_id, rl.status, rl.idempotent_replay, ue.units FROM request_log rl
    LEFT JOIN usage_events ue ON ue.request_id = rl.request_id AND ue.at = rl.at
    WHERE rl.request_id = ${requestId}`);
  if (!row) throw new Error(`no request-log row for ${requestId}`);
  return {
    status: Number(row.status),
    replay: Boolean(row.idempotent_replay),
    units: row.units === null ? null : Number(row.units),
  };
}

async function unitsOfAccount(accountId: number): Promise<number> {
  const [row] = await h.store.rows<{ n: number | string }>(
    sql`SELECT coalesce(sum(units), 0) AS n FROM usage_events WHERE account_id = ${accountId}`,
  );
  return Number(row!.n);
}

describe('Idempotency-Key retries', () => {
  it('replays the first answer (same status and body) at 0 units, marked in the request log and the console API', async () => {
    const first = await post('/v1/steam/state', STEAM, 'retry-1');
    expect(first.status).toBe(200);
    expect(first.headers['idempotent-replayed']).toBeUndefined();
    const again = await post('/v1/steam/state', STEAM, 'retry-1');
    expect(again.status).toBe(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.headers['content-type']).toBe(first.headers['content-type']);
    expect(again.text).toBe(first.text);
    const firstId = first.headers['x-request-id'] as string;
    const againId = again.headers['x-request-id'] as string;
    expect(againId).not.toBe(firstId);
    expect(await logOf(firstId)).toEqual({ status: 200, replay: false, units: 1 });
    expect(await logOf(againId)).toEqual({ status: 200, replay: true, units: 0 });
  });

  it('replays a batch (a declared POST like any other) without charging its cases again', async () => {
    const batch = {
      operation: 'steam-state',
      cases: [
        { pressure: 200, temperature: 250 },
        { pressure: -1, temperature: 250 },
      ],
    };
    const before = await unitsOfAccount(h.accountId);
    const first = await post('/v1/batch', batch, 'batch-1');
    expect(first.status).toBe(200);
    const charged = (await unitsOfAccount(h.accountId)) - before;
    expect(charged).toBe(1); // the refused case costs nothing
    const again = await post('/v1/batch', batch, 'batch-1');
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.text).toBe(first.text);
    expect((await unitsOfAccount(h.accountId)) - before).toBe(charged);
  });

  it('treats the same JSON written with its keys in another order as the same request', async () => {
    const first = await post('/v1/steam/state', { pressure: 200, temperature: 250 }, 'order-1');
    const again = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Idempotency-Key', 'order-1')
      .set('Content-Type', 'application/json')
      .send('{ "temperature" : 250, "pressure": 200 }');
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.text).toBe(first.text);
  });

  it('refuses the same key with another body with a 422 naming the header, and runs nothing', async () => {
    await post('/v1/steam/state', { pressure: 150, temperature: 250 }, 'reuse-1').expect(200);
    const before = await unitsOfAccount(h.accountId);
    const other = await post('/v1/steam/state', { pressure: 300, temperature: 250 }, 'reuse-1');
    expect(other.status).toBe(422);
    expect(other.body.type).toBe('/problems/idempotency-key-reused');
    expect(other.body.detail).toContain('Idempotency-Key');
    expect(await unitsOfAccount(h.accountId)).toBe(before);
    // Another path with the same key is another request too.
    const otherPath = await post('/v1/__test/slow', { pressure: 150, temperature: 250 }, 'reuse-1');
    expect(otherPath.status).toBe(422);
    // And the same body asking for another representation.
    const otherAccept = await post('/v1/steam/state', { pressure: 150, temperature: 250 }, 'reuse-1').set(
      'Accept',
      'text/csv',
    );
    expect(otherAccept.status).toBe(422);
  });

  it('answers 409 to a retry while the first request is still being processed, then replays its answer', async () => {
    let entered!: () => void;
    const inside = new Promise<void>((r) => (entered = r));
    let release!: () => void;
    gate = { entered, release: new Promise<void>((r) => (release = r)) };
    const first = post('/v1/__test/slow', { a: 1 }, 'slow-1').then((r) => r);
    await inside;
    const during = await post('/v1/__test/slow', { a: 1 }, 'slow-1');
    expect(during.status).toBe(409);
    expect(during.body.type).toBe('/problems/idempotency-key-in-flight');
    expect(during.headers['retry-after']).toBe('1');
    release();
    const done = await first;
    expect(done.status).toBe(200);
    gate = undefined;
    const after = await post('/v1/__test/slow', { a: 1 }, 'slow-1');
    expect(after.headers['idempotent-replayed']).toBe('true');
    expect(after.body).toEqual({ done: true });
  });

  it('charges two identical requests sent at once exactly once', async () => {
    const before = await unitsOfAccount(h.accountId);
    const answers = await Promise.all([
      post('/v1/steam/state', { pressure: 404, temperature: 250 }, 'twin-1'),
      post('/v1/steam/state', { pressure: 404, temperature: 250 }, 'twin-1'),
    ]);
    const statuses = answers.map((a) => a.status).sort();
    // One processed; the other either waited out (stored answer) or met the claim (409).
    expect(statuses[0]).toBe(200);
    expect([200, 409]).toContain(statuses[1]);
    const processed = answers.filter((a) => a.status === 200 && a.headers['idempotent-replayed'] !== 'true');
    expect(processed).toHaveLength(1);
    expect(await unitsOfAccount(h.accountId)).toBe(before + 1);
  });

  it('forgets an answer after 24 h: the same key then runs the request again (and pruning removes the record)', async () => {
    const first = await post('/v1/steam/state', { pressure: 120, temperature: 250 }, 'day-1');
    expect(first.status).toBe(200);
    const start = h.clock.now;
    try {
      h.clock.now = new Date(start.getTime() + 24 * 3_600_000 - 1);
      expect(
        (await post('/v1/steam/state', { pressure: 120, temperature: 250 }, 'day-1')).headers[
          'idempotent-replayed'
        ],
      ).toBe('true');
      h.clock.now = new Date(start.getTime() + 24 * 3_600_000);
      const before = await unitsOfAccount(h.accountId);
      // Even another body is accepted: the old record no longer counts.
      const later = await post('/v1/steam/state', { pressure: 130, temperature: 250 }, 'day-1');
      expect(later.status).toBe(200);
      expect(later.headers['idempotent-replayed']).toBeUndefined();
      expect(await unitsOfAccount(h.accountId)).toBe(before + 1);
      h.clock.now = new Date(start.getTime() + 49 * 3_600_000);
      expect(await pruneIdempotencyRecords(h.store, h.clock.now)).toBeGreaterThan(0);
      const [left] = await h.store.rows<{ n: number | string }>(
        sql`SELECT count(*) AS n FROM idempotency_records`,
      );
      expect(Number(left!.n)).toBe(0);
    } finally {
      h.clock.now = start;
    }
  });

  it('keeps each account’s keys apart: another account’s same key runs its own request', async () => {
    await post('/v1/steam/state', { pressure: 110, temperature: 250 }, 'shared-key').expect(200);
    const other = await createAccount(h.store, {
      name: 'Invented Second Works',
      monthlyUnitQuota: 1000,
      retainRequestBodies: false,
      now: h.clock.now,
    });
    const { token } = await createKey(h.store, h.config.secret, {
      accountId: other.id,
      name: 'second',
      scopes: ALL_SCOPES,
      rateLimitPerMinute: 1000,
      now: h.clock.now,
    });
    const theirs = await post('/v1/steam/state', { pressure: 220, temperature: 250 }, 'shared-key', token);
    expect(theirs.status).toBe(200);
    expect(theirs.headers['idempotent-replayed']).toBeUndefined();
    expect(await unitsOfAccount(other.id)).toBe(1);
    const theirsAgain = await post(
      '/v1/steam/state',
      { pressure: 220, temperature: 250 },
      'shared-key',
      token,
    );
    expect(theirsAgain.headers['idempotent-replayed']).toBe('true');
    expect(theirsAgain.text).toBe(theirs.text);
  });

  it('replays a 422 validation answer as it was (the same body would be refused the same way), at 0 units', async () => {
    const first = await post('/v1/steam/state', { pressure: -5, temperature: 250 }, 'bad-1');
    expect(first.status).toBe(422);
    const again = await post('/v1/steam/state', { pressure: -5, temperature: 250 }, 'bad-1');
    expect(again.status).toBe(422);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.headers['content-type']).toContain('application/problem+json');
    expect(again.text).toBe(first.text);
    expect(await logOf(again.headers['x-request-id'] as string)).toEqual({
      status: 422,
      replay: true,
      units: 0,
    });
  });

  it('accepts a quoted sf-string and a bare token as the same key', async () => {
    const first = await post('/v1/steam/state', { pressure: 140, temperature: 250 }, '"same-key"');
    expect(first.status).toBe(200);
    const bare = await post('/v1/steam/state', { pressure: 140, temperature: 250 }, 'same-key');
    expect(bare.headers['idempotent-replayed']).toBe('true');
  });

  it.each([
    ['empty', ''],
    ['empty quoted', '""'],
    ['256 characters', 'k'.repeat(256)],
    ['non-ASCII', 'clé'],
    ['a control character', 'a\tb'],
    ['an unbalanced quote', '"abc'],
    ['an inner quote', 'ab"c'],
    ['a bad escape', '"a\\nb"'],
  ])('refuses a key that is %s with a 400 naming the header', async (_label, value) => {
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Idempotency-Key', Buffer.from(value, 'latin1').toString('latin1'))
      .send(STEAM);
    expect(res.status).toBe(400);
    expect(res.body.type).toBe('/problems/idempotency-key-invalid');
    expect(res.body.detail).toContain('Idempotency-Key');
  });

  it('accepts a key of 255 printable characters', async () => {
    const res = await post('/v1/steam/state', STEAM, '~'.repeat(255));
    expect(res.status).toBe(200);
  });

  it('refuses the header on a multipart upload, whose body cannot be compared before it is read', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Idempotency-Key', 'upload-1')
      .field('operation', 'steam-saturation')
      .attach('file', Buffer.from('pressure\n100\n'), 'cases.csv');
    expect(res.status).toBe(400);
    expect(res.body.type).toBe('/problems/idempotency-key-invalid');
  });

  it('takes over a claim whose lease ran out (its node died) and answers 409 while another node’s lease holds', async () => {
    const now = h.clock.now;
    const claimFor = async (key: string, leaseUntil: Date) =>
      h.store.execute(sql`
        INSERT INTO idempotency_records (account_id, key, fingerprint, claim, created_at, lease_until)
        VALUES (${h.accountId}, ${key}, ${'x'.repeat(64)}, ${'other-node'}, ${h.store.instant(now)},
          ${h.store.instant(leaseUntil)})`);
    // Another node holds the key for another request: that is a reuse of the key (422).
    await claimFor('held-1', new Date(now.getTime() + 60_000));
    const held = await post('/v1/steam/state', STEAM, 'held-1');
    expect(held.status).toBe(422);
    // The same request, claimed by a node that is still working on it, then by one that went away.
    await post('/v1/steam/state', { pressure: 170, temperature: 250 }, 'held-2').expect(200);
    await h.store.execute(sql`
      UPDATE idempotency_records SET status = NULL, body = NULL, claim = ${'other-node'},
        lease_until = ${h.store.instant(new Date(now.getTime() + 60_000))}
      WHERE account_id = ${h.accountId} AND key = ${'held-2'}`);
    const busy = await post('/v1/steam/state', { pressure: 170, temperature: 250 }, 'held-2');
    expect(busy.status).toBe(409);
    await h.store.execute(sql`
      UPDATE idempotency_records SET lease_until = ${h.store.instant(new Date(now.getTime() - 1))}
      WHERE account_id = ${h.accountId} AND key = ${'held-2'}`);
    const takenOver = await post('/v1/steam/state', { pressure: 170, temperature: 250 }, 'held-2');
    expect(takenOver.status).toBe(200);
    expect(takenOver.headers['idempotent-replayed']).toBeUndefined();
  });

  it('does not keep a refused answer (quota): the retry runs once units are available', async () => {
    const poor = await makeHarness({ quota: 0 });
    try {
      const refused = await request(poor.app)
        .post('/v1/steam/state')
        .set('Authorization', `Bearer ${poor.token}`)
        .set('Idempotency-Key', 'quota-1')
        .send(STEAM);
      expect(refused.status).toBe(429);
      const [n] = await poor.store.rows<{ n: number | string }>(
        sql`SELECT count(*) AS n FROM idempotency_records`,
      );
      expect(Number(n!.n)).toBe(0);
    } finally {
      await poor.store.close();
    }
  });

  it('does not keep a sweep cut short by the quota: a retry after the quota is raised runs every point', async () => {
    // 12 units: two single-effect points of 5 fit, the other two are refused for quota.
    const h = await makeHarness({ quota: 12 });
    const body = {
      operation: 'single-effect',
      base: {
        liquor: 'sodium-hydroxide',
        feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
        product: { massFraction: 0.3 },
        steam: { pressure: '3 barg' },
        body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
      },
      vary: [{ field: 'body.pressure', values: [10, 15, 20, 25] }],
    };
    const send = () =>
      request(h.app)
        .post('/v1/sweeps')
        .set('Authorization', `Bearer ${h.token}`)
        .set('Idempotency-Key', 'sweep-cut-1')
        .send(body);
    const cut = await send();
    expect(cut.status).toBe(200);
    expect(cut.body).toMatchObject({ succeeded: 2, failed: 2 });
    await updateAccount(h.store, h.accountId, { monthlyUnitQuota: 1000 });
    const retry = await send();
    expect(retry.headers['idempotent-replayed']).toBeUndefined();
    expect(retry.body).toMatchObject({ succeeded: 4, failed: 0 });
  });
});
