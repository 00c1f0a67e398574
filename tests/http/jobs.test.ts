// Jobs: a long batch or sweep answered 202 and run in the background. Its result must be exactly
// the synchronous answer (JSON and CSV), its points charge what their single calls cost (the 202
// itself nothing), another account cannot see it, it can be cancelled, a quota that runs out stops
// it cleanly, its callback is signed and only ever sent to public https addresses, and its
// results expire.
import http from 'node:http';
import crypto from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey } from '../../server/accounts/keys.js';
import { rotateSigningSecret } from '../../server/accounts/signing-secrets.js';
import { closeApp, createApp, type AppDeps } from '../../server/app.js';
import { openPostgresStore } from '../../server/db/store.js';
import type { Config } from '../../server/config.js';
import { ALL_SCOPES, makeHarness, type Harness } from './helpers.js';

const auth = (token: string) => ({ Authorization: `Bearer ${token}` });

/** An invented caustic single-effect evaporator (5 units on its own route). */
const base = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
};
const sweepOf = (steps: number) => ({
  operation: 'single-effect',
  base,
  vary: [{ field: 'feed.temperature', from: 30, to: 80, steps }],
});
/** Boiling points of an invented caustic liquor at 8 strengths (1 unit each). */
const batchBody = {
  operation: 'liquor-boiling-point',
  liquor: 'sodium-hydroxide',
  cases: Array.from({ length: 8 }, (_, i) => ({ massFraction: 0.1 + i * 0.04, pressure: 20 })),
};

const harnesses: Harness[] = [];
async function harness(opts: { quota?: number; config?: Partial<Config> } = {}): Promise<Harness> {
  const h = await makeHarness({
    quota: opts.quota ?? 100_000,
    rateLimit: 100_000,
    config: { engineWorkers: 0, ...opts.config },
  });
  harnesses.push(h);
  return h;
}
afterAll(async () => {
  await Promise.all(harnesses.map((h) => closeApp(h.deps)));
});

type Job = {
  id: string;
  state: string;
  progress: { done: number; total: number };
  unitsCharged: number;
  problem?: { type: string; status: number; detail?: string };
  callback?: { state: string; attempts: number; outcome?: string };
  links: { self: string; result?: string; resultCsv?: string };
};

async function readJob(h: Harness, id: string): Promise<Job> {
  const res = await request(h.app).get(`/v1/jobs/${id}`).set(auth(h.token));
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as Job;
}

/** Polls the job until `until` holds (generous deadline; no fixed sleep decides anything). */
async function waitFor(h: Harness, id: string, until: (j: Job) => boolean, ms = 20_000): Promise<Job> {
  const deadline = Date.now() + ms;
  for (;;) {
    const job = await readJob(h, id);
    if (until(job)) return job;
    if (Date.now() > deadline) throw new Error(`job ${id} still ${JSON.stringify(job)}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}
const ended = (j: Job) => !['queued', 'running'].includes(j.state);

async function submit(h: Harness, path: string, body: object, headers: Record<string, string> = {}) {
  return request(h.app)
    .post(path)
    .set(auth(h.token))
    .set({ Prefer: 'respond-async', ...headers })
    .send(body);
}

/** Units of the account's usage events, by operation. */
async function unitsBy(h: Harness): Promise<Record<string, { units: number; rows: number }>> {
  const rows = await h.store.rows<{ operation: string; units: unknown; n: unknown }>(
    sql`SELECT operation, coalesce(sum(units), 0) AS units, count(*) AS n FROM usage_events
        WHERE account_id = ${h.accountId} GROUP BY operation`,
  );
  return Object.fromEntries(rows.map((r) => [r.operation, { units: Number(r.units), rows: Number(r.n) }]));
}

describe('jobs for batches and sweeps', () => {
  it('answers Prefer: respond-async with 202, Location, Preference-Applied and the queued job', async () => {
    const h = await harness();
    const res = await submit(h, '/v1/sweeps', sweepOf(6));
    expect(res.status).toBe(202);
    const job = res.body as Job;
    expect(res.headers.location).toBe(`/v1/jobs/${job.id}`);
    expect(res.headers['preference-applied']).toBe('respond-async');
    expect(job).toMatchObject({
      operation: 'sweep',
      state: 'queued',
      progress: { done: 0, total: 6 },
      unitsCharged: 0,
      links: { self: `/v1/jobs/${job.id}` },
    });
    const done = await waitFor(h, job.id, ended);
    expect(done.state).toBe('succeeded');
    expect(done.links).toEqual({
      self: `/v1/jobs/${job.id}`,
      result: `/v1/jobs/${job.id}/result`,
      resultCsv: `/v1/jobs/${job.id}/result.csv`,
    });
  });

  it('runs a request larger than the threshold as a job without being asked, and a smaller one at once', async () => {
    const h = await harness({ config: { asyncJobThreshold: 5 } });
    const small = await request(h.app).post('/v1/sweeps').set(auth(h.token)).send(sweepOf(5));
    expect(small.status).toBe(200);
    const big = await request(h.app).post('/v1/sweeps').set(auth(h.token)).send(sweepOf(6));
    expect(big.status).toBe(202);
    expect(big.headers['preference-applied']).toBeUndefined();
    expect(big.headers.location).toMatch(/^\/v1\/jobs\/job_/);
  });

  it("gives as a sweep job's result exactly the synchronous answer, as JSON and as CSV (columns too)", async () => {
    const h = await harness({ config: { jobChunkPoints: 7 } });
    const body = {
      operation: 'single-effect',
      base,
      vary: [
        { field: 'body.pressure', values: [10, 15, '20 kPa'] },
        { field: 'feed.temperature', from: 30, to: 80, steps: 6 },
      ],
    };
    const sync = await request(h.app).post('/v1/sweeps').set(auth(h.token)).send(body);
    const syncCsv = await request(h.app)
      .post('/v1/sweeps')
      .set(auth(h.token))
      .set('Accept', 'text/csv')
      .send(body);
    const syncCols = await request(h.app)
      .post('/v1/sweeps?columns=area,steamEconomy')
      .set(auth(h.token))
      .set('Accept', 'text/csv')
      .send(body);
    expect([sync.status, syncCsv.status, syncCols.status]).toEqual([200, 200, 200]);

    const accepted = await submit(h, '/v1/sweeps', body);
    const job = await waitFor(h, (accepted.body as Job).id, ended);
    expect(job).toMatchObject({ state: 'succeeded', progress: { done: 18, total: 18 }, unitsCharged: 90 });
    const json = await request(h.app).get(job.links.result!).set(auth(h.token));
    expect(json.status).toBe(200);
    expect(json.text).toBe(sync.text);
    const csv = await request(h.app).get(job.links.resultCsv!).set(auth(h.token));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.text).toBe(syncCsv.text);
    const cols = await request(h.app)
      .get(`${job.links.resultCsv!}?columns=area,steamEconomy`)
      .set(auth(h.token));
    expect(cols.text).toBe(syncCols.text);
    const unknown = await request(h.app).get(`${job.links.resultCsv!}?columns=nonsense`).set(auth(h.token));
    expect(unknown.status).toBe(422);
    expect(unknown.body.errors[0].field).toBe('columns');
  });

  it("gives as a batch job's result exactly the synchronous answer, failed cases included, as JSON and CSV", async () => {
    const h = await harness({ config: { jobChunkPoints: 3 } });
    // One case out of the model's range: its problem is part of the answer, and it costs nothing.
    const body = { ...batchBody, cases: [...batchBody.cases, { massFraction: 1.5, pressure: 20 }] };
    const sync = await request(h.app).post('/v1/batch').set(auth(h.token)).send(body);
    const syncCsv = await request(h.app)
      .post('/v1/batch')
      .set(auth(h.token))
      .set('Accept', 'text/csv')
      .send(body);
    expect(sync.status).toBe(200);
    expect(sync.body).toMatchObject({ count: 9, succeeded: 8, failed: 1, unitsCharged: 8 });

    const accepted = await submit(h, '/v1/batch', body);
    expect(accepted.status).toBe(202);
    expect(accepted.body.operation).toBe('batch');
    const job = await waitFor(h, (accepted.body as Job).id, ended);
    expect(job).toMatchObject({ state: 'succeeded', progress: { done: 9, total: 9 }, unitsCharged: 8 });
    const json = await request(h.app).get(job.links.result!).set(auth(h.token));
    expect(json.text).toBe(sync.text);
    const csv = await request(h.app).get(job.links.resultCsv!).set(auth(h.token));
    expect(csv.text).toBe(syncCsv.text);
  });

  it('charges the sum of the single calls: the 202 is metered at 0 units, each chunk at its points', async () => {
    const h = await harness({ config: { jobChunkPoints: 4 } });
    const single = await request(h.app).post('/v1/evaporators/single-effect').set(auth(h.token)).send(base);
    expect(single.status).toBe(200);
    const before = await unitsBy(h);
    expect(before['evaporators.single-effect']).toEqual({ units: 5, rows: 1 });

    const accepted = await submit(h, '/v1/sweeps', sweepOf(10));
    const job = await waitFor(h, (accepted.body as Job).id, ended);
    expect(job.unitsCharged).toBe(10 * 5);
    const after = await unitsBy(h);
    // The 202 (0 units) and three chunks of 4, 4 and 2 points.
    expect(after['sweeps.run']).toEqual({ units: 50, rows: 4 });
    const chunks = await h.store.rows<{ request_id: string; units: unknown; status: unknown }>(
      sql`SELECT request_id, units, status FROM usage_events WHERE request_id LIKE ${`${job.id}:%`} ORDER BY id`,
    );
    expect(chunks.map((c) => [c.request_id, Number(c.units), Number(c.status)])).toEqual([
      [`${job.id}:0`, 20, 200],
      [`${job.id}:4`, 20, 200],
      [`${job.id}:8`, 10, 200],
    ]);
    const usage = await request(h.app).get('/v1/usage').set(auth(h.token));
    expect(usage.body.quota.used).toBe(55);
  });

  it("answers 404 for another account's job, as for an unknown one", async () => {
    const h = await harness();
    const accepted = await submit(h, '/v1/sweeps', sweepOf(3));
    const id = (accepted.body as Job).id;
    await waitFor(h, id, ended);
    const other = await createAccount(h.store, {
      name: 'Invented Other Works',
      monthlyUnitQuota: 1000,
      now: h.clock.now,
    });
    const { token } = await createKey(h.store, h.config.secret, {
      accountId: other.id,
      name: 'other key',
      scopes: ALL_SCOPES,
      rateLimitPerMinute: 1000,
      now: h.clock.now,
    });
    for (const path of [`/v1/jobs/${id}`, `/v1/jobs/${id}/result`, `/v1/jobs/${id}/result.csv`]) {
      const res = await request(h.app).get(path).set(auth(token));
      expect(res.status, path).toBe(404);
    }
    expect((await request(h.app).delete(`/v1/jobs/${id}`).set(auth(token))).status).toBe(404);
    expect((await request(h.app).get('/v1/jobs/job_unknown').set(auth(h.token))).status).toBe(404);
  });

  it('cancels a running job: the points committed stay charged, nothing after them runs or charges', async () => {
    const h = await harness({ config: { jobChunkPoints: 2, jobChunkPauseMs: 50 } });
    const accepted = await submit(h, '/v1/sweeps', sweepOf(200));
    const id = (accepted.body as Job).id;
    await waitFor(h, id, (j) => j.progress.done >= 4);
    const res = await request(h.app).delete(`/v1/jobs/${id}`).set(auth(h.token));
    expect(res.status).toBe(200);
    expect(res.body.state).toBe('cancelled');
    // Whatever chunk was running when the cancel came is discarded: the job stays as committed.
    await new Promise((r) => setTimeout(r, 300));
    const job = await readJob(h, id);
    expect(job.state).toBe('cancelled');
    expect(job.progress.done).toBeLessThan(200);
    expect(job.unitsCharged).toBe(job.progress.done * 5);
    expect((await unitsBy(h))['sweeps.run']!.units).toBe(job.unitsCharged);
    expect(job.links.result).toBeUndefined();
    expect((await request(h.app).get(`/v1/jobs/${id}/result`).set(auth(h.token))).status).toBe(409);
    expect((await request(h.app).delete(`/v1/jobs/${id}`).set(auth(h.token))).status).toBe(409);
  });

  it('answers 409 for the result of a job that has not ended', async () => {
    const h = await harness({ config: { jobChunkPoints: 1, jobChunkPauseMs: 100 } });
    const accepted = await submit(h, '/v1/sweeps', sweepOf(100));
    const id = (accepted.body as Job).id;
    const res = await request(h.app).get(`/v1/jobs/${id}/result`).set(auth(h.token));
    expect(res.status).toBe(409);
    expect(res.body.type).toBe('/problems/conflict');
    await request(h.app).delete(`/v1/jobs/${id}`).set(auth(h.token));
  });

  it('stops a job cleanly when the quota runs out: failed with the quota problem, the rest refused in its result', async () => {
    // 7 single effects fit (35 units); the 8th does not.
    const h = await harness({ quota: 37, config: { jobChunkPoints: 3 } });
    const accepted = await submit(h, '/v1/sweeps', sweepOf(12));
    expect(accepted.status).toBe(202);
    const job = await waitFor(h, (accepted.body as Job).id, ended);
    expect(job.state).toBe('failed');
    expect(job.problem).toMatchObject({ type: '/problems/quota-exceeded', status: 429 });
    expect(job.progress).toEqual({ done: 7, total: 12 });
    expect(job.unitsCharged).toBe(35);
    expect((await unitsBy(h))['sweeps.run']!.units).toBe(35);
    const result = await request(h.app).get(job.links.result!).set(auth(h.token));
    expect(result.status).toBe(200);
    expect(result.body).toMatchObject({ count: 12, succeeded: 7, failed: 5, unitsCharged: 35 });
    const refused = (result.body.rows as { status: string; problem?: { type: string } }[]).slice(7);
    expect(refused.every((r) => r.status === 'error' && r.problem?.type === '/problems/quota-exceeded')).toBe(
      true,
    );
  });

  it('refuses a job with 429 when not even its first point fits the quota', async () => {
    const h = await harness({ quota: 4 });
    const res = await submit(h, '/v1/sweeps', sweepOf(3));
    expect(res.status).toBe(429);
    expect(res.body.type).toBe('/problems/quota-exceeded');
  });

  it('posts the ended job to the callback URL, signed with the account’s secret (HMAC-SHA256 of id.timestamp.body)', async () => {
    const h = await harness({ config: { allowLoopbackCallbacks: true } });
    const { secret } = await rotateSigningSecret(h.store, h.config.secret, h.accountId, h.clock.now);
    const received: { headers: http.IncomingHttpHeaders; body: string }[] = [];
    const receiver = http.createServer((req, res) => {
      let body = '';
      req.on('data', (c: Buffer) => (body += c.toString()));
      req.on('end', () => {
        received.push({ headers: req.headers, body });
        res.writeHead(204).end();
      });
    });
    await new Promise<void>((r) => receiver.listen(0, '127.0.0.1', r));
    try {
      const port = (receiver.address() as AddressInfo).port;
      const accepted = await submit(h, '/v1/sweeps', {
        ...sweepOf(4),
        callbackUrl: `http://127.0.0.1:${port}/hook`,
      });
      expect(accepted.status).toBe(202);
      const id = (accepted.body as Job).id;
      const job = await waitFor(h, id, (j) => j.callback?.state === 'delivered');
      expect(job.callback).toMatchObject({ state: 'delivered', attempts: 1, outcome: 'answered 204' });
      expect(received).toHaveLength(1);
      const { headers, body } = received[0]!;
      expect(headers['ebullio-job-id']).toBe(id);
      const timestamp = String(headers['ebullio-timestamp']);
      expect(Math.abs(Number(timestamp) - Date.now() / 1000)).toBeLessThan(300);
      const expected = crypto.createHmac('sha256', secret).update(`${id}.${timestamp}.${body}`).digest('hex');
      expect(headers['ebullio-signature']).toBe(expected);
      expect(JSON.parse(body)).toMatchObject({ id, state: 'succeeded', progress: { done: 4, total: 4 } });
    } finally {
      await new Promise((r) => receiver.close(r));
    }
  });

  it('sends on the next start a callback its process left pending', async () => {
    const h = await harness({ config: { allowLoopbackCallbacks: true } });
    await rotateSigningSecret(h.store, h.config.secret, h.accountId, h.clock.now);
    const received: string[] = [];
    const receiver = http.createServer((req, res) => {
      received.push(String(req.headers['ebullio-job-id']));
      res.writeHead(200).end();
    });
    // A port with nothing listening yet: the first attempt is refused.
    await new Promise<void>((r) => receiver.listen(0, '127.0.0.1', r));
    const port = (receiver.address() as AddressInfo).port;
    await new Promise((r) => receiver.close(r));
    try {
      const accepted = await submit(h, '/v1/sweeps', {
        ...sweepOf(2),
        callbackUrl: `http://127.0.0.1:${port}/hook`,
      });
      const id = (accepted.body as Job).id;
      const pending = await waitFor(h, id, (j) => (j.callback?.attempts ?? 0) >= 1);
      expect(pending.callback).toMatchObject({ state: 'pending', attempts: 1 });
      expect(pending.callback?.outcome).toMatch(/^failed/);
      // The process stops before its next attempt; the next one sends it at start.
      await closeApp(h.deps);
      await new Promise<void>((r) => receiver.listen(port, '127.0.0.1', r));
      // Later than any live node would still be trying it (several nodes: two minutes).
      h.clock.now = new Date(h.clock.now.getTime() + 3 * 60_000);
      h.deps.jobRunner = undefined;
      h.deps.enginePool = undefined;
      h.app = createApp(h.deps);
      const sent = await waitFor(h, id, (j) => j.callback?.state === 'delivered');
      expect(sent.callback).toMatchObject({ state: 'delivered', attempts: 2, outcome: 'answered 200' });
      expect(received).toEqual([id]);
    } finally {
      if (receiver.listening) await new Promise((r) => receiver.close(r));
    }
  });

  it('refuses a callback URL that is not https or reaches loopback, private or link-local addresses, naming callbackUrl', async () => {
    const h = await harness();
    await rotateSigningSecret(h.store, h.config.secret, h.accountId, h.clock.now);
    const urls = [
      'http://hooks.example.com/x',
      'https://127.0.0.1/x',
      'https://10.1.2.3/x',
      'https://192.168.0.10/x',
      'https://169.254.169.254/latest/meta-data',
      'https://[::1]/x',
      'https://[::ffff:127.0.0.1]/x',
      'https://[fe80::1]/x',
      'https://localhost/x',
      'not a url',
    ];
    for (const callbackUrl of urls) {
      const res = await submit(h, '/v1/sweeps', { ...sweepOf(3), callbackUrl });
      expect(res.status, callbackUrl).toBe(422);
      expect(res.body.errors[0].field, callbackUrl).toBe('callbackUrl');
    }
    // The batch takes its callback in the query string (its body may be CSV).
    const batch = await request(h.app)
      .post(`/v1/batch?callbackUrl=${encodeURIComponent('https://10.0.0.1/x')}`)
      .set(auth(h.token))
      .set('Prefer', 'respond-async')
      .send(batchBody);
    expect(batch.status).toBe(422);
    expect(batch.body.errors[0].field).toBe('callbackUrl');
    // Nothing was stored.
    const [n] = await h.store.rows<{ n: unknown }>(sql`SELECT count(*) AS n FROM jobs`);
    expect(Number(n!.n)).toBe(0);
  });

  it('refuses loopback callbacks unless the server allows them, and a callback without a signing secret', async () => {
    const strict = await harness();
    await rotateSigningSecret(strict.store, strict.config.secret, strict.accountId, strict.clock.now);
    const refused = await submit(strict, '/v1/sweeps', {
      ...sweepOf(3),
      callbackUrl: 'http://127.0.0.1:9/x',
    });
    expect(refused.status).toBe(422);
    const lax = await harness({ config: { allowLoopbackCallbacks: true } });
    const noSecret = await submit(lax, '/v1/sweeps', { ...sweepOf(3), callbackUrl: 'http://127.0.0.1:9/x' });
    expect(noSecret.status).toBe(422);
    expect(noSecret.body.errors[0].field).toBe('callbackUrl');
    // Loopback is all the setting opens: a private address stays refused.
    await rotateSigningSecret(lax.store, lax.config.secret, lax.accountId, lax.clock.now);
    const privateAddress = await submit(lax, '/v1/sweeps', {
      ...sweepOf(3),
      callbackUrl: 'http://10.0.0.1/x',
    });
    expect(privateAddress.status).toBe(422);
  });

  it('stops the runner after its current chunk on shutdown, leaving the job queued to resume', async () => {
    const h = await harness({ config: { jobChunkPoints: 2, jobChunkPauseMs: 30 } });
    const accepted = await submit(h, '/v1/sweeps', sweepOf(60));
    const id = (accepted.body as Job).id;
    await waitFor(h, id, (j) => j.progress.done >= 4);
    await closeApp(h.deps);
    const stopped = await readJob(h, id);
    expect(stopped.state).toBe('queued');
    expect(stopped.progress.done).toBeGreaterThanOrEqual(4);
    expect(stopped.progress.done).toBeLessThan(60);
    expect(stopped.unitsCharged).toBe(stopped.progress.done * 5);
    // A new app on the same database resumes it from there.
    h.deps.jobRunner = undefined;
    h.deps.enginePool = undefined;
    h.app = createApp(h.deps);
    const job = await waitFor(h, id, ended);
    expect(job).toMatchObject({ state: 'succeeded', progress: { done: 60, total: 60 }, unitsCharged: 300 });
    expect((await unitsBy(h))['sweeps.run']!.units).toBe(300);
  });

  it('runs each job on one node only when two nodes share the database, charging every point once', async () => {
    const h = await harness({ config: { jobChunkPoints: 3, jobChunkPauseMs: 10, jobPollMs: 50 } });
    // A second node: its own app and runner (on PostgreSQL its own connection pool) on the same database.
    const url = (h.store.pool as unknown as { options?: { connectionString?: string } } | undefined)?.options
      ?.connectionString;
    const store = url ? openPostgresStore(url, { max: 2 }) : h.store;
    const other: AppDeps = { ...h.deps, store, jobRunner: undefined, enginePool: undefined };
    createApp(other);
    try {
      const ids: string[] = [];
      for (let i = 0; i < 6; i++) ids.push(((await submit(h, '/v1/sweeps', sweepOf(12))).body as Job).id);
      for (const id of ids) {
        const job = await waitFor(h, id, ended);
        expect(job).toMatchObject({
          state: 'succeeded',
          progress: { done: 12, total: 12 },
          unitsCharged: 60,
        });
        const chunks = await h.store.rows<{ request_id: string; units: unknown }>(
          sql`SELECT request_id, units FROM usage_events WHERE request_id LIKE ${`${id}:%`} ORDER BY request_id`,
        );
        expect(chunks.map((c) => [c.request_id, Number(c.units)])).toEqual(
          [0, 3, 6, 9].map((start) => [`${id}:${start}`, 15]),
        );
      }
      expect((await unitsBy(h))['sweeps.run']!.units).toBe(6 * 60);
    } finally {
      await closeApp(other);
      if (store !== h.store) await store.close();
    }
  });

  it('expires a finished job after the retention time and prunes it with its rows', async () => {
    const h = await harness({ config: { jobRetentionHours: 1 } });
    const accepted = await submit(h, '/v1/sweeps', sweepOf(3));
    const id = (accepted.body as Job).id;
    const job = await waitFor(h, id, ended);
    expect(job.state).toBe('succeeded');
    expect((await request(h.app).get(`/v1/jobs/${id}/result`).set(auth(h.token))).status).toBe(200);
    h.clock.now = new Date(h.clock.now.getTime() + 61 * 60_000);
    expect((await request(h.app).get(`/v1/jobs/${id}`).set(auth(h.token))).status).toBe(404);
    expect((await request(h.app).get(`/v1/jobs/${id}/result`).set(auth(h.token))).status).toBe(404);
    expect(await h.deps.jobRunner!.prune()).toBe(1);
    const [left] = await h.store.rows<{ jobs: unknown; chunks: unknown }>(
      sql`SELECT (SELECT count(*) FROM jobs) AS jobs, (SELECT count(*) FROM job_chunks) AS chunks`,
    );
    expect([Number(left!.jobs), Number(left!.chunks)]).toEqual([0, 0]);
  });
});
