/**
 * A 10 000-point single-effect sweep through the metered route (`POST /v1/sweeps`, 100 body
 * pressures × 100 feed temperatures), target ≤ 1.5 s; and, while it runs, the p95 latency of
 * `GET /healthz` probed one after another (the sweep parses a slice of points per turn of the
 * event loop and calculates in the pool, so other requests must not stall; target ≤ 100 ms, the
 * pool bench's). The same sweep as a job too (`Prefer: respond-async`, to its result). Run alone:
 * `npx tsx tests/bench/sweep.ts`.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import { closeApp } from '../../server/app.js';
import { createEnginePool } from '../../server/workers/engine-pool.js';
import { makeHarness } from '../http/helpers.js';

/** An invented caustic single-effect evaporator. */
const base = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
};

const sweepBody = JSON.stringify({
  operation: 'single-effect',
  base,
  vary: [
    { field: 'body.pressure', from: 10, to: 40, steps: 100 },
    { field: 'feed.temperature', from: 30, to: 80, steps: 100 },
  ],
});

function quantile(xs: number[], q: number): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))]!;
}

interface SweepResult {
  seconds: number[];
  healthzP95: number;
  probes: number;
  bytes: number;
}

/**
 * Times `runs` runs of `once` after one warm-up, then probes `/healthz` one request after another
 * while one more runs; closes the server and the app.
 */
async function timeRuns(
  once: () => Promise<{ ms: number; bytes: number }>,
  runs: number,
  origin: string,
  close: () => Promise<void>,
): Promise<SweepResult> {
  await once(); // warm the threads and the route
  const seconds: number[] = [];
  let bytes = 0;
  for (let i = 0; i < runs; i++) {
    const r = await once();
    seconds.push(r.ms / 1000);
    bytes = r.bytes;
  }
  let running = true;
  const last = once().then(() => {
    running = false;
  });
  const healthz: number[] = [];
  await new Promise((resolve) => setTimeout(resolve, 20));
  while (running) {
    const t = performance.now();
    await (await fetch(`${origin}/healthz`)).text();
    healthz.push(performance.now() - t);
    await new Promise((resolve) => setTimeout(resolve, 5));
  }
  await last;
  await close();
  return { seconds, healthzP95: quantile(healthz, 0.95), probes: healthz.length, bytes };
}

/** Serves a harness's app on a loopback port; `close` stops the server, the app and its store. */
async function serve(h: Awaited<ReturnType<typeof makeHarness>>) {
  const server = http.createServer({ keepAlive: true }, h.app).listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const close = async () => {
    server.closeAllConnections();
    await new Promise((resolve) => server.close(resolve));
    await closeApp(h.deps);
    await h.store.close();
  };
  return { origin, close };
}

async function measure(workers: number, runs: number): Promise<SweepResult> {
  const pool = createEnginePool({ workers, taskTimeoutMs: 120_000, eager: true });
  // Answered at once: above the jobs' threshold (2000 points by default) it would be a job.
  const h = await makeHarness({
    quota: 100_000_000,
    rateLimit: 100_000,
    enginePool: pool,
    config: { asyncJobThreshold: 1_000_000 },
  });
  const { origin, close } = await serve(h);
  const post = () =>
    fetch(`${origin}/v1/sweeps`, {
      method: 'POST',
      headers: { authorization: `Bearer ${h.token}`, 'content-type': 'application/json' },
      body: sweepBody,
    });
  const once = async () => {
    const t = performance.now();
    const res = await post();
    // Checked without parsing the answer: the client shares this thread with the server.
    const bytes = Buffer.from(await res.arrayBuffer());
    const ms = performance.now() - t;
    if (res.status !== 200 || !bytes.subarray(0, 200).includes('"succeeded":10000,')) {
      throw new Error(`sweep: ${res.status} ${bytes.subarray(0, 300).toString()}`);
    }
    return { ms, bytes: bytes.length };
  };
  return timeRuns(once, runs, origin, close);
}

/**
 * The same sweep as a job (`Prefer: respond-async`): from the POST to the job's success (polled),
 * then its result fetched; /healthz probed meanwhile. Chunks of the default 500 points, each
 * committed with its rows and usage.
 */
async function measureJob(runs: number): Promise<SweepResult> {
  const h = await makeHarness({ quota: 100_000_000, rateLimit: 100_000, config: { engineWorkers: 0 } });
  const { origin, close } = await serve(h);
  const headers = { authorization: `Bearer ${h.token}`, 'content-type': 'application/json' };
  const once = async () => {
    const t = performance.now();
    const accepted = await fetch(`${origin}/v1/sweeps`, {
      method: 'POST',
      headers: { ...headers, prefer: 'respond-async' },
      body: sweepBody,
    });
    const { id } = (await accepted.json()) as { id: string };
    for (;;) {
      const job = (await (await fetch(`${origin}/v1/jobs/${id}`, { headers })).json()) as { state: string };
      if (job.state === 'succeeded') break;
      if (job.state !== 'queued' && job.state !== 'running') throw new Error(`job ${id}: ${job.state}`);
      await new Promise((resolve) => setTimeout(resolve, 10));
    }
    const bytes = Buffer.from(
      await (await fetch(`${origin}/v1/jobs/${id}/result`, { headers })).arrayBuffer(),
    );
    if (!bytes.subarray(0, 200).includes('"succeeded":10000,'))
      throw new Error(`job result: ${bytes.subarray(0, 300)}`);
    return { ms: performance.now() - t, bytes: bytes.length };
  };
  return timeRuns(once, runs, origin, close);
}

export async function runSweepBench(): Promise<void> {
  const cores = os.availableParallelism();
  console.log(
    `10 000-point single-effect sweep, POST /v1/sweeps (target ≤ 1.5 s; /healthz p95 ≤ 100 ms meanwhile):`,
  );
  for (const workers of [cores, 0]) {
    const r = await measure(workers, 3);
    const label = workers === 0 ? 'ENGINE_WORKERS=0 (inline)' : `pool of ${workers} thread(s)`;
    const best = Math.min(...r.seconds);
    const median = quantile(r.seconds, 0.5);
    console.log(
      `  ${label.padEnd(28)} best ${best.toFixed(2)} s, median ${median.toFixed(2)} s (${(best / 1.5).toFixed(2)}× target), ` +
        `${(r.bytes / 1e6).toFixed(1)} MB; GET /healthz p95 ${r.healthzP95.toFixed(1)} ms (${r.probes} probes)`,
    );
  }
  const job = await measureJob(3);
  const best = Math.min(...job.seconds);
  console.log(
    `  ${'as a job, inline, to result'.padEnd(28)} best ${best.toFixed(2)} s, median ${quantile(job.seconds, 0.5).toFixed(2)} s ` +
      `(${(best / 1.5).toFixed(2)}× target), ${(job.bytes / 1e6).toFixed(1)} MB; GET /healthz p95 ${job.healthzP95.toFixed(1)} ms (${job.probes} probes)`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runSweepBench();
}
