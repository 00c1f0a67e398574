// The calculation pool (server/workers/): what runs in its worker threads must answer exactly as
// the main thread would, a hung or dead worker must cost the client nothing and leave the next
// request working, /healthz must not wait for a batch, and shutdown must end the threads.
import { execFileSync } from 'node:child_process';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { closeApp } from '../../server/app.js';
import { EngineRangeError } from '../../server/engine/errors.js';
import { createEnginePool, type EnginePool } from '../../server/workers/engine-pool.js';
import { reviveError, runEngineTasks, serializeError } from '../../server/workers/engine-tasks.js';
import { makeHarness, type Harness } from './helpers.js';

const pools: EnginePool[] = [];
afterAll(async () => {
  await Promise.all(pools.map((p) => p.destroy()));
});

function pool(options: { workers: number; taskTimeoutMs?: number; testHooks?: boolean }): EnginePool {
  const p = createEnginePool({ taskTimeoutMs: 30_000, ...options });
  pools.push(p);
  return p;
}

async function harness(enginePool: EnginePool): Promise<Harness> {
  return await makeHarness({ quota: 10_000_000, enginePool, config: { bodyLimitBytes: 4 * 1024 * 1024 } });
}

/** The value as JSON with every number written as the hex of its IEEE 754 bits. */
const bits = (value: unknown) =>
  JSON.stringify(value, (_key, x: unknown) =>
    typeof x === 'number' ? Buffer.from(new Float64Array([x]).buffer).toString('hex') : x,
  );

const auth = (h: Harness) => ({ Authorization: `Bearer ${h.token}` });

// Invented user data (demo only): a brine whose boiling-point rise is `rise`·x K.
const inventedBrine = (rise: number) => ({
  name: 'Invented test brine',
  boilingPointRise: { polynomial: [0, rise] },
  heatCapacity: { polynomial: [4.0] },
  validity: { massFraction: { min: 0, max: 0.5 } },
});

/** A multiple-effect case (invented plant): 10 % → 30 %, backward feed, `effects` effects. */
function train(effects: number, liquor: unknown = 'sodium-hydroxide', extra: Record<string, unknown> = {}) {
  return {
    liquor,
    effects,
    feedArrangement: 'backward',
    feed: { massFlow: 10, massFraction: 0.1, temperature: 60 },
    product: { massFraction: 0.3 },
    steam: { pressure: 1000 },
    lastEffectPressure: 15,
    overallHeatTransferCoefficients: Array.from(
      { length: effects },
      (_, i) => 2800 - (1500 * i) / Math.max(1, effects - 1),
    ),
    ...extra,
  };
}

/** A single-effect case (invented plant). */
function single(extra: Record<string, unknown> = {}) {
  return {
    liquor: 'sodium-hydroxide',
    feed: { massFlow: 1.25, massFraction: 0.1, temperature: 40 },
    product: { massFraction: 0.3 },
    steam: { pressure: '3 barg' },
    body: { pressure: 20, overallHeatTransferCoefficient: 1800 },
    ...extra,
  };
}

describe('the calculation pool', () => {
  it('answers every batch through its worker threads exactly as the main thread does, custom and stored liquors included', async () => {
    const inline = await harness(pool({ workers: 0 }));
    const pooled = await harness(pool({ workers: 2 }));
    const multiple = [
      train(3),
      train(6, 'stored-brine'),
      train(10, inventedBrine(8), { feedArrangement: 'forward' }),
      train(4, 'stored-brine', { areas: [40, 40, 40, 40], product: {} }),
      train(5, inventedBrine(8), { product: { massFraction: 0.9 } }), // refused: above the definition's limit
      train(2, 'sucrose', {
        feed: { massFlow: 10, massFraction: '15 Bx', temperature: 95 },
        product: { massFraction: '65 Bx' },
      }),
    ];
    const singles = [
      single(),
      single({ liquor: 'stored-brine' }),
      single({
        liquor: inventedBrine(5),
        body: { pressure: 20, overallHeatTransferCoefficient: 1800, area: 30 },
        product: {},
      }),
      single({ product: { massFraction: 0.05 } }), // refused: product leaner than the feed
    ];
    const answers: unknown[][] = [[], []];
    for (const [i, h] of [inline, pooled].entries()) {
      const stored = await request(h.app)
        .post('/v1/stored-liquors')
        .set(auth(h))
        .send({ id: 'stored-brine', definition: inventedBrine(12) });
      expect(stored.status).toBe(201);
      for (const [operation, cases] of [
        ['multiple-effect', multiple],
        ['single-effect', singles],
      ] as const) {
        const res = await request(h.app).post('/v1/batch').set(auth(h)).send({ operation, cases });
        expect(res.status).toBe(200);
        answers[i]!.push(res.body);
      }
      // A single call past the crossover goes to the pool too.
      const one = await request(h.app)
        .post('/v1/evaporators/multiple-effect')
        .set(auth(h))
        .send(train(8, 'stored-brine'));
      expect(one.status).toBe(200);
      answers[i]!.push(one.body);
    }
    const [viaMain, viaPool] = answers as [unknown[], unknown[]];
    // Both kinds of answer occur: results and refusals with their fields.
    const multipleBatch = viaPool[0] as { succeeded: number; failed: number; results: { status: string }[] };
    expect(multipleBatch.failed).toBeGreaterThan(0);
    expect(multipleBatch.succeeded).toBeGreaterThan(3);
    expect(bits(viaPool)).toBe(bits(viaMain));
  });

  it('answers multiple-effect trains with { estimate } U through its threads bit for bit as inline, breakdowns, TVR, flash, figures and refusals included', async () => {
    const inline = await harness(pool({ workers: 0 }));
    const pooled = await harness(pool({ workers: 2 }));
    // Invented tubes (demo only); the estimate's correlations and fouling are the engine's own.
    const juiceTube = {
      evaporatorType: 'falling-film',
      tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'stainless-304' },
      flow: { wettingRate: 1 },
    };
    const brineTube = {
      evaporatorType: 'falling-film',
      tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'titanium-grade-2' },
      flow: { wettingRate: '1800 kg/(m*h)' },
    };
    const estimated = (n: number, estimate: object) => Array.from({ length: n }, () => ({ estimate }));
    const juice = (n: number, extra: Record<string, unknown> = {}) =>
      train(n, 'sucrose', {
        feedArrangement: 'forward',
        feed: { massFlow: '72 t/h', massFraction: '15 Bx', temperature: 95 },
        product: { massFraction: '65 Bx' },
        steam: { pressure: 300 },
        overallHeatTransferCoefficients: estimated(n, juiceTube),
        ...extra,
      });
    const brine = (n: number, extra: Record<string, unknown> = {}) =>
      train(n, 'seawater', {
        feedArrangement: 'forward',
        feed: { massFlow: 10, massFraction: 0.035, temperature: 60 },
        product: { massFraction: 0.07 },
        steam: { temperature: 80 },
        lastEffectPressure: 20,
        overallHeatTransferCoefficients: estimated(n, brineTube),
        ...extra,
      });
    const cases = [
      juice(6),
      juice(4, {
        overallHeatTransferCoefficients: [2800, { estimate: juiceTube }, 1800, { estimate: juiceTube }],
      }),
      // rating a little more area than the design needs (≈ 472 m² each): U re-estimated as the state moves
      juice(3, { areas: [500, 500, 500], product: {} }),
      brine(4), // seawater: figures of merit by default
      brine(3, { thermocompressor: { motivePressure: 1000 }, condensateFlash: true }),
      // refused inside the task: a custom liquor without a thermal conductivity; names effect 2's estimate field
      train(
        3,
        { ...inventedBrine(2), density: { polynomial: [1000, 400] }, viscosity: { polynomial: [1, 2, 30] } },
        {
          overallHeatTransferCoefficients: [1500, { estimate: juiceTube }, 1500],
        },
      ),
    ];
    const answers: unknown[][] = [[], []];
    for (const [i, h] of [inline, pooled].entries()) {
      const res = await request(h.app)
        .post('/v1/batch')
        .set(auth(h))
        .send({ operation: 'multiple-effect', cases });
      expect(res.status).toBe(200);
      answers[i]!.push(res.body);
      // A single call past the crossover (POOLED_EFFECTS) goes to the pool with its estimates too.
      const one = await request(h.app).post('/v1/evaporators/multiple-effect').set(auth(h)).send(juice(6));
      expect(one.status).toBe(200);
      answers[i]!.push(one.body);
    }
    const [viaMain, viaPool] = answers as [unknown[], unknown[]];
    type Effect = { heatTransfer?: { area: string; overallHeatTransferCoefficient: number } };
    const batch = viaPool[0] as {
      succeeded: number;
      failed: number;
      results: {
        status: string;
        result?: { effects: Effect[]; thermocompressor?: unknown; figuresOfMerit?: unknown };
        problem?: { errors?: { field: string }[] };
      }[];
    };
    expect(batch).toMatchObject({ succeeded: 5, failed: 1 });
    const [all, mixed, rated, seawater, tvr, refused] = batch.results;
    expect(rated!.result!.effects.every((e) => e.heatTransfer?.area === 'outside')).toBe(true);
    expect(all!.result!.effects.every((e) => e.heatTransfer?.area === 'outside')).toBe(true);
    expect(mixed!.result!.effects.map((e) => e.heatTransfer !== undefined)).toEqual([
      false,
      true,
      false,
      true,
    ]);
    expect(seawater!.result!.figuresOfMerit).toBeDefined();
    expect(tvr!.result!.thermocompressor).toBeDefined();
    expect(refused!.problem!.errors![0]!.field).toBe(
      'cases[5].overallHeatTransferCoefficients[1].estimate.liquorProperties.thermalConductivity',
    );
    expect(bits(viaPool)).toBe(bits(viaMain));
  });

  it('answers batches of MVR and of the U estimate (inline parts, no engine task) beside a pool as without one', async () => {
    const inline = await harness(pool({ workers: 0 }));
    const pooled = await harness(pool({ workers: 2 }));
    const fallingFilm = {
      evaporatorType: 'falling-film',
      tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'titanium-grade-2' },
      flow: { wettingRate: '1800 kg/(m*h)' },
    };
    // Invented seawater duties (demo only).
    const mvr = (u: unknown) => ({
      liquor: 'seawater',
      feed: { massFlow: 10, massFraction: 0.035, temperature: 60 },
      product: { massFraction: 0.07 },
      body: { pressure: 31, overallHeatTransferCoefficient: u, temperatureDifference: 5 },
    });
    const estimate = (massFraction: number) => ({
      ...fallingFilm,
      liquor: 'seawater',
      massFraction,
      bodyPressure: 31,
      steam: { temperature: 80 },
    });
    const batches = [
      { operation: 'mechanical-vapor-recompression', cases: [mvr({ estimate: fallingFilm }), mvr(1500)] },
      { operation: 'overall-coefficient', cases: [estimate(0.035), estimate(0.07), estimate(1.5)] },
    ];
    const answers: { succeeded: number; failed: number; unitsCharged: number }[][] = [[], []];
    for (const [i, h] of [inline, pooled].entries()) {
      for (const body of batches) {
        const res = await request(h.app).post('/v1/batch').set(auth(h)).send(body);
        expect(res.status).toBe(200);
        answers[i]!.push(res.body);
      }
    }
    const [viaMain, viaPool] = answers as [(typeof answers)[0], (typeof answers)[0]];
    expect(viaPool.map((b) => [b.succeeded, b.failed])).toEqual([
      [2, 0],
      [2, 1], // a mass fraction of 1.5 is refused
    ]);
    expect(bits(viaPool)).toBe(bits(viaMain));
  });

  it('loads its TypeScript worker under `node --import tsx`, the way the server runs', () => {
    const out = execFileSync(process.execPath, ['--import', 'tsx', 'tests/support/engine-pool-smoke.ts'], {
      encoding: 'utf8',
      timeout: 30_000,
    });
    const outcome = JSON.parse(out) as {
      ok: boolean;
      value: { effects: unknown[]; balances: { mass: number } };
    };
    expect(outcome.ok).toBe(true);
    expect(outcome.value.effects).toHaveLength(3);
    expect(Math.abs(outcome.value.balances.mass)).toBeLessThan(1e-9);
  });

  it('knows no test task in a pool made without the test flag', async () => {
    const p = pool({ workers: 1 });
    expect(() => p.divertNext('hang')).toThrow(/testHooks/);
    // Refused at once (a loop would hold the thread until the limit).
    await expect(p.run('test.hang', {})).rejects.toThrow(/unknown engine task "test.hang"/);
    await expect(p.run('test.crash', {})).rejects.toThrow(/unknown engine task "test.crash"/);
  });

  it('returns bit-identical engine results from a worker thread and the main thread', async () => {
    const p = pool({ workers: 1 });
    const inputs = [3, 7, 10].map((n) => ({
      mode: 'design' as const,
      spec: {
        liquor: { builtIn: 'sodium-hydroxide' },
        feed: { massFlow: 10, massFraction: 0.1, temperature: 333.15 },
        productMassFraction: 0.3,
        steam: { pressure: 1e6 },
        lastEffectPressure: 15e3,
        overallHeatTransferCoefficients: Array.from({ length: n }, (_, i) => 2800 - (1500 * i) / (n - 1)),
        feedArrangement: 'backward' as const,
      },
    }));
    const here = runEngineTasks('evaporators.multiple-effect', inputs);
    const there = await p.runMany('evaporators.multiple-effect', inputs);
    expect(there.every((o) => o.ok)).toBe(true);
    // Every double compared by its 64 bits (so -0 differs from 0, and NaN would show).
    expect(bits(there)).toBe(bits(here));
  });

  it('starts the time limit when a thread takes a call, not while the call queues behind others', async () => {
    const p = createEnginePool({ workers: 1, taskTimeoutMs: 1500, eager: true });
    pools.push(p);
    const task = {
      mode: 'design' as const,
      spec: {
        liquor: { builtIn: 'sodium-hydroxide' },
        feed: { massFlow: 10, massFraction: 0.1, temperature: 333.15 },
        productMassFraction: 0.3,
        steam: { pressure: 1e6 },
        lastEffectPressure: 15e3,
        overallHeatTransferCoefficients: [2800, 2600, 2400, 2200, 2000, 1800, 1600, 1500, 1400, 1300],
        feedArrangement: 'backward' as const,
      },
    };
    await p.run('evaporators.multiple-effect', task); // the thread is up
    // Chunks of 32 ten-effect trains take milliseconds each; all of them together take longer
    // than the limit, so the last chunks wait longer than 1.5 s for the one thread.
    const started = performance.now();
    const outcomes = await p.runMany(
      'evaporators.multiple-effect',
      Array.from({ length: 4000 }, () => task),
    );
    expect(performance.now() - started).toBeGreaterThan(1500);
    expect(outcomes.every((o) => o.ok)).toBe(true);
    // About 8 s of work on one thread when the machine is idle; far more on a busy one.
  }, 120_000);

  it('rebuilds an engine error from its data as the same typed error', () => {
    const err = new EngineRangeError(
      'massFraction',
      0.9,
      { min: 0, max: 0.5, unit: '' },
      undefined,
      'effect 2',
      'why',
    );
    const back = reviveError(serializeError(err));
    expect(back).toBeInstanceOf(EngineRangeError);
    expect(back).toMatchObject({
      field: 'massFraction',
      value: 0.9,
      validRange: { min: 0, max: 0.5, unit: '' },
      context: 'effect 2',
      reason: 'why',
      message: err.message,
    });
  });

  it('stops a hung calculation with 503 calculation-timeout, charges nothing, logs it, and answers the next request', async () => {
    // The limit counts from the hand-over, so it must also cover starting a replacement thread.
    const p = pool({ workers: 1, taskTimeoutMs: 3000, testHooks: true });
    const h = await harness(p);
    p.divertNext('hang');
    const hung = await request(h.app)
      .post('/v1/batch')
      .set(auth(h))
      .send({ operation: 'multiple-effect', cases: [train(10), train(10)] });
    expect(hung.status).toBe(503);
    expect(hung.body).toMatchObject({ type: '/problems/calculation-timeout', status: 503 });
    expect(hung.body.detail).toMatch(/3000 ms/);
    const usage = await h.store.rows(sql`SELECT operation, status, units FROM usage_events`);
    expect(usage).toEqual([{ operation: 'batch', status: 503, units: 0 }]);
    const log = await h.store.rows(sql`SELECT path, status FROM request_log`);
    expect(log).toEqual([{ path: '/v1/batch', status: 503 }]);
    // What the client sees: the batch counted as an error, 0 units used.
    const usageRes = await request(h.app).get('/v1/usage').set(auth(h));
    expect(usageRes.status).toBe(200);
    expect(usageRes.body.quota.used).toBe(0);
    expect(usageRes.body.byOperation).toContainEqual({
      operation: 'batch',
      requests: 1,
      units: 0,
      errors: 1,
    });

    // A single call past the crossover is stopped the same way.
    p.divertNext('hang');
    const hungOne = await request(h.app).post('/v1/evaporators/multiple-effect').set(auth(h)).send(train(10));
    expect(hungOne.status).toBe(503);
    expect(hungOne.body.type).toBe('/problems/calculation-timeout');

    const next = await request(h.app)
      .post('/v1/batch')
      .set(auth(h))
      .send({ operation: 'multiple-effect', cases: [train(10)] });
    expect(next.status).toBe(200);
    expect(next.body).toMatchObject({ succeeded: 1, unitsCharged: expect.any(Number) });
    const units = await h.store.rows<{ status: number; units: number }>(
      sql`SELECT status, units FROM usage_events ORDER BY id`,
    );
    expect(units.filter((u) => u.status >= 500).every((u) => u.units === 0)).toBe(true);
    expect(units.at(-1)!.units).toBe(next.body.unitsCharged);
  });

  it('answers 500 calculation-failed when a worker thread dies, charges nothing, logs it, and answers the next request', async () => {
    const p = pool({ workers: 1, testHooks: true });
    const h = await harness(p);
    p.divertNext('crash');
    const crashed = await request(h.app)
      .post('/v1/batch')
      .set(auth(h))
      .send({ operation: 'multiple-effect', cases: [train(6)] });
    expect(crashed.status).toBe(500);
    expect(crashed.body).toMatchObject({ type: '/problems/calculation-failed', status: 500 });
    expect(await h.store.rows(sql`SELECT status, units FROM usage_events`)).toEqual([
      { status: 500, units: 0 },
    ]);
    expect(await h.store.rows(sql`SELECT status FROM request_log`)).toEqual([{ status: 500 }]);
    expect((await request(h.app).get('/v1/usage').set(auth(h))).body.quota.used).toBe(0);
    const next = await request(h.app).post('/v1/evaporators/multiple-effect').set(auth(h)).send(train(6));
    expect(next.status).toBe(200);
  });

  it('answers /healthz while a large batch is still running', async () => {
    const h = await harness(pool({ workers: 1 }));
    const server = http.createServer(h.app).listen(0, '127.0.0.1');
    await new Promise((resolve) => server.once('listening', resolve));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    try {
      const order: string[] = [];
      const batch = fetch(`${base}/v1/batch`, {
        method: 'POST',
        headers: { ...auth(h), 'content-type': 'application/json' },
        body: JSON.stringify({
          operation: 'multiple-effect',
          cases: Array.from({ length: 300 }, () => train(10)),
        }),
      }).then(async (res) => {
        order.push('batch');
        return res.json() as Promise<{ succeeded: number }>;
      });
      // Ask once the batch has reached the server.
      await new Promise((resolve) => setTimeout(resolve, 100));
      const health = await fetch(`${base}/healthz`).then((res) => {
        order.push('healthz');
        return res.status;
      });
      expect(health).toBe(200);
      expect((await batch).succeeded).toBe(300);
      expect(order).toEqual(['healthz', 'batch']);
    } finally {
      server.closeAllConnections();
      await new Promise((resolve) => server.close(resolve));
    }
  });

  it('ends the pool when the app is closed after the drain', async () => {
    const p = pool({ workers: 1 });
    const h = await harness(p);
    expect(
      (await request(h.app).post('/v1/evaporators/multiple-effect').set(auth(h)).send(train(10))).status,
    ).toBe(200);
    await closeApp(h.deps);
    expect(p.destroyed).toBe(true);
    await expect(p.run('evaporators.multiple-effect', {})).rejects.toThrow(/shut down/);
    // A request that still arrives is calculated on the main thread, not refused with a 500.
    const late = await request(h.app).post('/v1/evaporators/multiple-effect').set(auth(h)).send(train(10));
    expect(late.status).toBe(200);
  });
});
