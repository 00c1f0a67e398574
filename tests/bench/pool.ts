/**
 * Benchmark of the calculation pool (server/workers/engine-pool.ts). Run alone with
 * `npx tsx tests/bench/pool.ts`.
 *
 * 1. Crossover: one call of a single effect and of n-effect trains (n = 1…10), inline on the
 *    main thread vs a round trip through a one-thread pool (plain data out, plain result back).
 *    A single /v1 call goes to the pool from the smallest train where the pool is no slower
 *    (POOLED_EFFECTS in server/http/v1/operations/evaporators.ts); a single effect stays inline.
 * 2. Under load: while two 1000-case ten-effect batches run, the p95 latency of `GET /healthz`
 *    and of a single-effect POST, sent one after another (target ≤ 100 ms), with the pool
 *    (threads = available parallelism; at the default lower priority and at the main thread's)
 *    and with ENGINE_WORKERS=0 (everything on the main thread).
 * 3. Throughput: cases per second of the two batches with 0 (inline), 1 and 2 worker threads
 *    (and 2 at the main thread's priority). On a machine shared with other work, threads at a
 *    lower priority also yield to the other processes, which lowers their throughput here.
 *
 * The app runs in this process on an in-memory database, as the tests build it; the invented
 * plant is the one of tests/bench/multiple-effect.ts (10 % → 30 % NaOH, backward feed).
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import { closeApp } from '../../server/app.js';
import { POOLED_EFFECTS } from '../../server/http/v1/operations/evaporators.js';
import { createEnginePool, DEFAULT_NICE_INCREMENT } from '../../server/workers/engine-pool.js';
import {
  engineTasks,
  type MultipleEffectTask,
  type SingleEffectTask,
} from '../../server/workers/engine-tasks.js';
import { makeHarness } from '../http/helpers.js';

const C = 273.15;

function trainTask(effects: number): MultipleEffectTask {
  return {
    mode: 'design',
    spec: {
      liquor: { builtIn: 'sodium-hydroxide' },
      feed: { massFlow: 10, massFraction: 0.1, temperature: 60 + C },
      productMassFraction: 0.3,
      steam: { pressure: 1.0e6 },
      lastEffectPressure: 15e3,
      overallHeatTransferCoefficients: Array.from(
        { length: effects },
        (_, i) => 2800 - (1500 * i) / Math.max(1, effects - 1),
      ),
      feedArrangement: 'backward',
    },
  };
}

const singleTask: SingleEffectTask = {
  mode: 'design',
  spec: {
    liquor: { builtIn: 'sodium-hydroxide' },
    feed: { massFlow: 1.25, massFraction: 0.1, temperature: 40 + C },
    product: { massFraction: 0.3 },
    steam: { pressure: 401_325 },
    body: { pressure: 20e3, overallHeatTransferCoefficient: 1800 },
  },
};

/** The same cases as API requests (display units). */
function trainCase(effects: number) {
  return {
    liquor: 'sodium-hydroxide',
    effects,
    feedArrangement: 'backward',
    feed: { massFlow: 10, massFraction: 0.1, temperature: 60 },
    product: { massFraction: 0.3 },
    steam: { pressure: 1000 },
    lastEffectPressure: 15,
    overallHeatTransferCoefficients: trainTask(effects).spec.overallHeatTransferCoefficients,
  };
}
const singleCase = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 1.25, massFraction: 0.1, temperature: 40 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: 20, overallHeatTransferCoefficient: 1800 },
};

function quantile(values: number[], q: number): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))] ?? NaN;
}
const median = (values: number[]) => quantile(values, 0.5);

async function crossover(): Promise<void> {
  const pool = createEnginePool({ workers: 1, taskTimeoutMs: 60_000, eager: true });
  const rounds = 200;
  /** Median latency of one call, and the main thread's busy time per call (event-loop utilisation). */
  const time = async (run: () => unknown) => {
    for (let i = 0; i < 20; i++) await run(); // warm-up (JIT, the thread's first load)
    const t: number[] = [];
    const elu0 = performance.eventLoopUtilization();
    for (let i = 0; i < rounds; i++) {
      const t0 = performance.now();
      await run();
      t.push(performance.now() - t0);
    }
    const busy = performance.eventLoopUtilization(elu0).active / rounds;
    return { latency: median(t), busy };
  };
  const rows: { label: string; effects: number; inline: number; pooled: number; pooledBusy: number }[] = [];
  const row = async (
    label: string,
    effects: number,
    name: 'evaporators.single-effect' | 'evaporators.multiple-effect',
    task: unknown,
  ) => {
    const run = engineTasks[name] as (t: unknown) => unknown;
    const inline = await time(() => run(task));
    const pooled = await time(() => pool.run(name, task));
    rows.push({ label, effects, inline: inline.latency, pooled: pooled.latency, pooledBusy: pooled.busy });
  };
  await row('single effect', 0, 'evaporators.single-effect', singleTask);
  for (const n of [1, 2, 3, 4, 5, 6, 7, 8, 10])
    await row(`${n}-effect train`, n, 'evaporators.multiple-effect', trainTask(n));
  await pool.destroy();
  console.log(
    'one call, median of 200 (ms): inline (= main thread busy) | through a one-thread pool | main thread busy per pooled call | pool overhead (pooled − inline)',
  );
  for (const r of rows) {
    console.log(
      `  ${r.label.padEnd(16)} ${r.inline.toFixed(3).padStart(7)} | ${r.pooled.toFixed(3).padStart(7)} | ${r.pooledBusy.toFixed(3).padStart(7)} | ${(r.pooled - r.inline).toFixed(3).padStart(7)}`,
    );
  }
  // The crossover: from here on, a call inline would hold the main thread longer than the pool
  // delays its caller, so every other request on the server waits less.
  // (The smallest train from which every longer one measured agrees: single medians are noisy.)
  const trains = rows.filter((r) => r.effects > 0);
  const cross = trains.find((r, i) => trains.slice(i).every((t) => t.inline >= t.pooled - t.inline));
  console.log(
    `  crossover (inline time ≥ pool overhead): ${cross ? `${cross.effects} effects` : 'none up to 10 effects'}; ` +
      `single /v1 calls use the pool from POOLED_EFFECTS = ${POOLED_EFFECTS} effects (server/http/v1/operations/evaporators.ts); single effects stay inline`,
  );
}

interface LoadResult {
  batchSeconds: number;
  casesPerSecond: number;
  healthzP95: number;
  singleP95: number;
  probes: number;
}

/** Two 1000-case ten-effect batches at once; meanwhile /healthz and a single effect, one after another. */
async function underLoad(workers: number, probe: boolean, niceIncrement?: number): Promise<LoadResult> {
  const pool = createEnginePool({
    workers,
    taskTimeoutMs: 120_000,
    eager: true,
    ...(niceIncrement !== undefined ? { niceIncrement } : {}),
  });
  const h = await makeHarness({
    quota: 100_000_000,
    rateLimit: 100_000,
    enginePool: pool,
    config: { bodyLimitBytes: 8 * 1024 * 1024 },
  });
  const server = http.createServer({ keepAlive: true }, h.app).listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const headers = { authorization: `Bearer ${h.token}`, 'content-type': 'application/json' };
  const post = (path: string, body: unknown) =>
    fetch(`${base}${path}`, {
      method: 'POST',
      headers,
      body: typeof body === 'string' ? body : JSON.stringify(body),
    });
  // Warm the threads and the routes.
  await (
    await post('/v1/batch', {
      operation: 'multiple-effect',
      cases: Array.from({ length: 20 }, () => trainCase(10)),
    })
  ).text();
  await (await post('/v1/evaporators/single-effect', singleCase)).text();

  const body = JSON.stringify({
    operation: 'multiple-effect',
    cases: Array.from({ length: 1000 }, () => trainCase(10)),
  });
  let running = true;
  const t0 = performance.now();
  const batches = Promise.all(
    [1, 2].map(async () => {
      const res = await post('/v1/batch', body);
      // Checked without parsing the 7 MB answer: the client shares this thread with the server.
      const bytes = Buffer.from(await res.arrayBuffer());
      if (!bytes.subarray(0, 200).includes('"succeeded":1000,')) {
        throw new Error(`batch: ${bytes.subarray(0, 300).toString()}`);
      }
    }),
  ).then(() => {
    running = false;
    return performance.now() - t0;
  });
  const healthz: number[] = [];
  const single: number[] = [];
  if (probe) {
    await new Promise((resolve) => setTimeout(resolve, 50));
    while (running) {
      let t = performance.now();
      await (await fetch(`${base}/healthz`)).text();
      healthz.push(performance.now() - t);
      t = performance.now();
      const res = await post('/v1/evaporators/single-effect', singleCase);
      await res.text();
      if (res.status !== 200) throw new Error(`single effect: ${res.status}`);
      single.push(performance.now() - t);
      await new Promise((resolve) => setTimeout(resolve, 10));
    }
  }
  const ms = await batches;
  server.closeAllConnections();
  await new Promise((resolve) => server.close(resolve));
  await closeApp(h.deps);
  await h.store.close();
  return {
    batchSeconds: ms / 1000,
    casesPerSecond: 2000 / (ms / 1000),
    healthzP95: quantile(healthz, 0.95),
    singleP95: quantile(single, 0.95),
    probes: healthz.length,
  };
}

export async function runPoolBench(only?: string): Promise<void> {
  const cores = os.availableParallelism();
  console.log(
    `cores: ${cores} available (os.availableParallelism), load ${os
      .loadavg()
      .map((l) => l.toFixed(2))
      .join(' ')}`,
  );
  await crossover();
  if (only === 'crossover') return;

  console.log('\nwhile two 1000-case ten-effect batches run (p95 of sequential probes, target ≤ 100 ms):');
  for (const [workers, nice] of [
    [cores, undefined],
    [cores, 0],
    [0, undefined],
  ] as const) {
    const r = await underLoad(workers, true, nice);
    const label =
      workers === 0
        ? 'ENGINE_WORKERS=0 (inline)'
        : `pool of ${workers} thread(s), nice ${nice ?? DEFAULT_NICE_INCREMENT}`;
    console.log(
      `  ${label.padEnd(30)} GET /healthz p95 ${r.healthzP95.toFixed(1)} ms, single-effect POST p95 ${r.singleP95.toFixed(1)} ms ` +
        `(${r.probes} probes; batches took ${r.batchSeconds.toFixed(2)} s)`,
    );
  }

  console.log('\nbatch throughput, two 1000-case ten-effect batches at once (no probes):');
  const byWorkers = new Map<number, number>();
  for (const workers of [0, 1, 2]) {
    const r = await underLoad(workers, false);
    byWorkers.set(workers, r.casesPerSecond);
    const label = workers === 0 ? 'inline (ENGINE_WORKERS=0)' : `${workers} worker thread(s)`;
    console.log(
      `  ${label.padEnd(30)} ${r.casesPerSecond.toFixed(0).padStart(6)} cases/s (${r.batchSeconds.toFixed(2)} s)`,
    );
  }
  const same = await underLoad(2, false, 0);
  console.log(
    `  ${'2 worker threads, nice 0'.padEnd(30)} ${same.casesPerSecond.toFixed(0).padStart(6)} cases/s (${same.batchSeconds.toFixed(2)} s)`,
  );
  const inline = byWorkers.get(0)!;
  console.log(
    `  scaling: 1 thread ${(byWorkers.get(1)! / inline).toFixed(2)}× inline, 2 threads ${(byWorkers.get(2)! / inline).toFixed(2)}× inline, ` +
      `2 threads ${(byWorkers.get(2)! / byWorkers.get(1)!).toFixed(2)}× 1 thread (on ${cores} cores)`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  // `npx tsx tests/bench/pool.ts crossover` runs the first part alone.
  await runPoolBench(process.argv[2]);
}
