/**
 * API benchmark: throughput and latency of the real, authenticated and metered
 * `POST /v1/evaporators/single-effect`, against a bare Express 5 JSON route that parses the same
 * request body and returns a body of the same size (tests/bench/bare-server.ts); then the usage
 * rows the database holds for the measuring key beside the 2xx responses autocannon received.
 * Targets: throughput ratio real / bare ≥ 0.6; usage rows (2xx) = 2xx responses, exactly.
 *
 * A third server runs the same single-effect route code with no key, metering or rate limit
 * (bare-server.ts, BARE_MODE=calculation). It splits the gap: bare-calculation / bare is the
 * ceiling any metered calculation route can reach here (the calculation's own cost), and
 * metered / bare-calculation is what the metered layers cost.
 *
 *   npx tsx tests/bench/api.ts
 *
 * Layout (2 cores): each server runs in its own child process (`tsx`), the load generator
 * (autocannon's programmatic API) in this parent, so the generator and the server under test do
 * not share an event loop. Loopback only (127.0.0.1), ephemeral ports, a temporary file database
 * in WAL mode (opened and migrated by the child exactly as server/main.ts does).
 *
 * Runs, all with CONNECTIONS connections: a warm-up of each server (WARMUP_S s, a separate key);
 * the measured runs, interleaved in ROUNDS rounds of ROUND_S s per server (metered, bare,
 * calculation, metered, …) so that a change in the machine's speed during the run (a shared
 * 2-core VM drifts by tens of per cent over minutes) weighs on the three alike, each server's
 * figures summed over its rounds; then an exact metering check of
 * EXACT_AMOUNT requests on a third key. A duration-bounded run stops by destroying its sockets,
 * so requests still in flight at that moment reach the server (and are metered) without
 * autocannon counting their responses; for that run the report gives rows = 2xx + abandoned. The
 * count-bounded run waits for every response, so there rows must equal 2xx exactly.
 *
 * Besides wall-clock throughput, each server reports its own CPU time (process.cpuUsage) around
 * the measured run; CPU µs per request is the steadier comparison when other work shares the
 * machine, and bare/metered CPU per request is the ratio the two would reach with a core to spare.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import autocannon from 'autocannon';
import Database from 'better-sqlite3';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey } from '../../server/accounts/keys.js';
import { scopes } from '../../server/accounts/operations.js';
import { loadConfig } from '../../server/config.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { createApp } from '../../server/app.js';

const ROOT = path.resolve(import.meta.dirname, '../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const SELF = fileURLToPath(import.meta.url);
const CONNECTIONS = 10;
const WARMUP_S = 3;
const ROUNDS = 8;
const ROUND_S = 3;
const EXACT_AMOUNT = 3000;
/** The largest per-key limit keys.ts accepts; the runs stay below it (checked after each run). */
const RATE_LIMIT_PER_MINUTE = 100_000;
const CHILD_START_TIMEOUT_MS = 20_000;

/**
 * An invented caustic concentrator (not from any plant or book): 2.2 kg/s of 12 % sodium
 * hydroxide at 55 °C concentrated to 32 % in a body held at 18 kPa, heated by steam at 2.5 barg,
 * U = 1500 W/(m²·K); design mode (the area is the answer).
 */
export const BENCH_CASE = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: '2.2 kg/s', massFraction: 0.12, temperature: '55 degC' },
  product: { massFraction: 0.32 },
  steam: { pressure: '2.5 barg' },
  body: { pressure: '18 kPa', overallHeatTransferCoefficient: 1500 },
};
const PATH = '/v1/evaporators/single-effect';

export interface RunFigures {
  requestsPerSecond: number;
  p50Ms: number;
  p99Ms: number;
  ok2xx: number;
  non2xx: number;
  errors: number;
  /** Requests written but not answered when autocannon stopped. */
  abandoned: number;
  /** CPU time the server process spent per answered request, µs (robust to a busy machine). */
  serverCpuMicrosPerRequest: number;
}

export interface ApiBenchResult {
  responseBytes: number;
  metered: RunFigures;
  bare: RunFigures;
  /** The same calculation without key, metering or rate limit. */
  calculation: RunFigures;
  ratio: number;
  /** bare-calculation / bare: the ratio a metered route could reach if metering cost nothing. */
  calculationCeiling: number;
  /** metered / bare-calculation: the share of throughput the metered layers leave. */
  meteredVsCalculation: number;
  /** Bare CPU per request / metered CPU per request. */
  cpuRatio: number;
  /** Usage rows with a 2xx status for the duration-run key, and all its rows. */
  durationRows: { ok2xx: number; all: number };
  exact: { ok2xx: number; non2xx: number; errors: number; rows2xx: number; rowsAll: number };
}

// ---------------------------------------------------------------------------------------------
// Child mode: the real app, started as server/main.ts does (config → WAL DB → migrations → app).
// ---------------------------------------------------------------------------------------------

function serveApp(): void {
  const config = loadConfig(process.env);
  const { sqlite, db } = openDatabase(config.dbFile);
  const store = sqliteStore(sqlite, db);
  runMigrations(db);
  const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as { version: string };
  const app = createApp({
    store,
    config,
    clock: () => new Date(),
    engineVersion: `ebullio-${pkg.version}`,
  });
  const server = app.listen(0, '127.0.0.1', (err?: Error) => {
    if (err) {
      console.error(`app cannot listen: ${err.message}`);
      process.exit(1);
    }
    console.log(JSON.stringify({ port: (server.address() as AddressInfo).port }));
  });
  process.stdin.setEncoding('utf8');
  process.stdin.on('data', (text: string) => {
    if (text.includes('cpu')) console.log(JSON.stringify({ cpu: process.cpuUsage() }));
  });
  process.on('SIGTERM', () => {
    server.close(() => {
      sqlite.close();
      process.exit(0);
    });
    server.closeAllConnections();
  });
}

// ---------------------------------------------------------------------------------------------
// Parent mode.
// ---------------------------------------------------------------------------------------------

export interface Child {
  proc: ChildProcess;
  port: number;
  exited: Promise<number | null>;
  /** CPU time (user + system, µs) the server process has used so far. */
  cpuMicros: () => Promise<number>;
}

function killGroup(proc: ChildProcess): void {
  try {
    if (proc.pid !== undefined) process.kill(-proc.pid, 'SIGKILL');
  } catch {
    // already gone
  }
}

/**
 * The Node flags `npm start` gives the server (package.json "start":
 * `node <flags> --import tsx server/main.ts`),
 * given here to all three servers alike, so the service is measured as it ships and the bare
 * routes under the same runtime settings.
 */
export function serverNodeFlags(): string[] {
  const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as {
    scripts: Record<string, string>;
  };
  const m = /\bnode((?:\s+--[\w-]+(?:=\S+)?)*)\s+--import tsx\s+server\/main\.ts/.exec(
    pkg.scripts.start ?? '',
  );
  if (!m) throw new Error('package.json "start" does not run `node [flags] --import tsx server/main.ts`');
  return m[1]!.trim().split(/\s+/).filter(Boolean);
}

export function startChild(args: string[], env: Record<string, string>): Promise<Child> {
  const proc = spawn(TSX, [...serverNodeFlags(), ...args], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: ['pipe', 'pipe', 'pipe'],
    // tsx runs the script in a child node process: give it its own process group so a forced
    // stop (SIGKILL, which tsx cannot relay) reaches that process too.
    detached: true,
  });
  const exited = new Promise<number | null>((resolve) => proc.on('exit', (code) => resolve(code)));
  const cpuWaiters: ((micros: number) => void)[] = [];
  let cpuBuffer = '';
  const cpuMicros = () =>
    new Promise<number>((resolve) => {
      cpuWaiters.push(resolve);
      proc.stdin?.write('cpu\n');
    });
  proc.stdout?.on('data', (chunk: Buffer) => {
    cpuBuffer += chunk.toString();
    let m: RegExpExecArray | null;
    while ((m = /\{"cpu":\{"user":(\d+),"system":(\d+)\}\}\n/.exec(cpuBuffer))) {
      cpuBuffer = cpuBuffer.slice(m.index + m[0].length);
      cpuWaiters.shift()?.(Number(m[1]) + Number(m[2]));
    }
  });
  return new Promise((resolve, reject) => {
    let out = '';
    const timer = setTimeout(() => {
      killGroup(proc);
      reject(new Error(`child ${args.join(' ')} did not start in time: ${out}`));
    }, CHILD_START_TIMEOUT_MS);
    const onData = (chunk: Buffer) => {
      out += chunk.toString();
      const m = /\{"port":(\d+)\}/.exec(out);
      if (m?.[1]) {
        clearTimeout(timer);
        resolve({ proc, port: Number(m[1]), exited, cpuMicros });
      }
    };
    proc.stdout?.on('data', onData);
    proc.stderr?.on('data', (chunk: Buffer) => {
      out += chunk.toString();
      process.stderr.write(chunk);
    });
    proc.on('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`child ${args.join(' ')} exited (${code}) before listening: ${out}`));
    });
  });
}

export async function stopChild(child: Child): Promise<void> {
  child.proc.kill('SIGTERM');
  const timer = setTimeout(() => killGroup(child.proc), 5000);
  await child.exited;
  clearTimeout(timer);
}

function cannon(
  url: string,
  headers: Record<string, string>,
  body: string,
  bound: { duration?: number; amount?: number },
) {
  return autocannon({
    url,
    method: 'POST',
    headers: { 'content-type': 'application/json', ...headers },
    body,
    connections: CONNECTIONS,
    ...(bound.amount !== undefined ? { amount: bound.amount } : { duration: bound.duration ?? ROUND_S }),
  });
}

/** One server's figures over its rounds: totals summed; p50 and p99 the median of the rounds'. */
function figures(rounds: readonly { result: autocannon.Result; cpuMicros: number }[]): RunFigures {
  const sum = (f: (r: autocannon.Result) => number) => rounds.reduce((t, x) => t + f(x.result), 0);
  const median = (values: number[]) => {
    const s = [...values].sort((a, b) => a - b);
    const mid = Math.floor(s.length / 2);
    return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
  };
  const answered = sum((r) => r['2xx'] + r.non2xx);
  const seconds = sum((r) => r.duration);
  return {
    serverCpuMicrosPerRequest: rounds.reduce((t, x) => t + x.cpuMicros, 0) / Math.max(1, answered),
    requestsPerSecond: answered / seconds,
    p50Ms: median(rounds.map((x) => x.result.latency.p50)),
    p99Ms: median(rounds.map((x) => x.result.latency.p99)),
    ok2xx: sum((r) => r['2xx']),
    non2xx: sum((r) => r.non2xx),
    errors: sum((r) => r.errors),
    abandoned: sum((r) => Math.max(0, r.requests.sent - r.requests.total)),
  };
}

function rowsForKey(dbFile: string, keyId: number): { ok2xx: number; all: number } {
  const check = new Database(dbFile, { readonly: true });
  try {
    const row = check
      .prepare(
        `SELECT COUNT(*) AS total, COALESCE(SUM(CASE WHEN status BETWEEN 200 AND 299 THEN 1 ELSE 0 END), 0) AS ok
         FROM usage_events WHERE key_id = ?`,
      )
      .get(keyId) as { total: number; ok: number };
    return { ok2xx: row.ok, all: row.total };
  } finally {
    check.close();
  }
}

const fmt = (n: number, d = 0) =>
  n.toLocaleString('en-GB', { maximumFractionDigits: d, minimumFractionDigits: d });

export async function runApiBench(): Promise<ApiBenchResult> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-api-bench-'));
  const dbFile = path.join(dir, 'bench.db');
  const secretText = crypto.randomBytes(32).toString('hex');
  const secret = Buffer.from(secretText, 'utf8'); // as loadConfig reads EBULLIO_SECRET

  // Account and keys, written before the app starts (the app reads them from the same file).
  const opened = openDatabase(dbFile);
  runMigrations(opened.db);
  const setup = { ...opened, store: sqliteStore(opened.sqlite, opened.db) };
  const now = new Date();
  const account = await createAccount(setup.store, {
    name: 'Bench Caustic Works (invented)',
    plan: 'professional',
    monthlyUnitQuota: 100_000_000,
    now,
  });
  const newKey = async (name: string) =>
    await createKey(setup.store, secret, {
      accountId: account.id,
      name,
      scopes,
      rateLimitPerMinute: RATE_LIMIT_PER_MINUTE,
      now,
    });
  const warmKey = await newKey('bench warm-up');
  const runKey = await newKey('bench duration run');
  const exactKey = await newKey('bench exact metering run');
  setup.sqlite.close();

  const body = JSON.stringify(BENCH_CASE);
  const children: Child[] = [];
  try {
    const app = await startChild([SELF, '--serve-app'], {
      DB_FILE: dbFile,
      EBULLIO_SECRET: secretText,
      PORT: '0',
    });
    children.push(app);
    const appUrl = `http://127.0.0.1:${app.port}${PATH}`;

    // One request to capture the response the bare route will mirror.
    const first = await fetch(appUrl, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${warmKey.token}` },
      body,
    });
    const firstText = await first.text();
    if (first.status !== 200) throw new Error(`the bench case was refused (${first.status}): ${firstText}`);
    const responseBytes = Buffer.byteLength(firstText);
    const bodyFile = path.join(dir, 'single-effect-response.json');
    fs.writeFileSync(bodyFile, firstText);

    const startBare = async (mode: 'fixed' | 'calculation') => {
      const child = await startChild([path.join(ROOT, 'tests/bench/bare-server.ts')], {
        BARE_BODY_FILE: bodyFile,
        BARE_MODE: mode,
      });
      children.push(child);
      const url = `http://127.0.0.1:${child.port}/bare`;
      const check = await fetch(url, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body,
      });
      const text = await check.text();
      if (check.status !== 200 || Buffer.byteLength(text) !== responseBytes)
        throw new Error(
          `bare ${mode} route answered ${check.status} with ${Buffer.byteLength(text)} bytes, want 200 and ${responseBytes}`,
        );
      return { child, url };
    };
    const { child: bare, url: bareUrl } = await startBare('fixed');
    const { child: calc, url: calcUrl } = await startBare('calculation');

    console.log(
      `server children: real app, bare Express 5 route and bare calculation route, one process each; load generator in the parent; ` +
        `${CONNECTIONS} connections; response body ${responseBytes} bytes; request body ${Buffer.byteLength(body)} bytes; ` +
        `node flags of all three (as npm start): ${serverNodeFlags().join(' ') || 'none'}`,
    );
    await cannon(appUrl, { authorization: `Bearer ${warmKey.token}` }, body, { duration: WARMUP_S });
    await cannon(bareUrl, {}, body, { duration: WARMUP_S });
    await cannon(calcUrl, {}, body, { duration: WARMUP_S });

    const measure = async (child: Child, run: () => Promise<autocannon.Result>) => {
      const cpu0 = await child.cpuMicros();
      const result = await run();
      return { result, cpuMicros: (await child.cpuMicros()) - cpu0 };
    };
    const rounds = {
      metered: [] as Awaited<ReturnType<typeof measure>>[],
      bare: [] as Awaited<ReturnType<typeof measure>>[],
      calc: [] as Awaited<ReturnType<typeof measure>>[],
    };
    for (let round = 0; round < ROUNDS; round++) {
      rounds.metered.push(
        await measure(app, () => cannon(appUrl, { authorization: `Bearer ${runKey.token}` }, body, {})),
      );
      rounds.bare.push(await measure(bare, () => cannon(bareUrl, {}, body, {})));
      rounds.calc.push(await measure(calc, () => cannon(calcUrl, {}, body, {})));
    }
    const metered = figures(rounds.metered);
    const bareFig = figures(rounds.bare);
    const calcFig = figures(rounds.calc);
    const exactRun = await cannon(appUrl, { authorization: `Bearer ${exactKey.token}` }, body, {
      amount: EXACT_AMOUNT,
    });

    await stopChild(app);
    children.splice(children.indexOf(app), 1);
    const durationRows = rowsForKey(dbFile, runKey.key.id);
    const exactRows = rowsForKey(dbFile, exactKey.key.id);
    const ratio = metered.requestsPerSecond / bareFig.requestsPerSecond;

    const line = (label: string, f: RunFigures) =>
      `${label.padEnd(34)} ${fmt(f.requestsPerSecond).padStart(8)} req/s   p50 ${fmt(f.p50Ms, 1).padStart(5)} ms   ` +
      `p99 ${fmt(f.p99Ms, 1).padStart(5)} ms   2xx ${f.ok2xx}, non-2xx ${f.non2xx}, errors ${f.errors}`;
    console.log(
      `${ROUNDS} interleaved rounds of ${ROUND_S} s per server after a ${WARMUP_S} s warm-up (p50/p99: median of the rounds):`,
    );
    console.log(line('metered POST ' + PATH, metered));
    console.log(line('bare Express 5 POST /bare', bareFig));
    console.log(line('same calculation, no key/metering', calcFig));
    console.log(`throughput ratio metered / bare: ${ratio.toFixed(2)} (target ≥ 0.6)`);
    const calculationCeiling = calcFig.requestsPerSecond / bareFig.requestsPerSecond;
    const meteredVsCalculation = metered.requestsPerSecond / calcFig.requestsPerSecond;
    console.log(
      `  of which: the calculation route alone / bare ${calculationCeiling.toFixed(2)} (the ceiling for any metered ` +
        `calculation here: CPU per request ${fmt(calcFig.serverCpuMicrosPerRequest)} µs); ` +
        `metered / same calculation unmetered ${meteredVsCalculation.toFixed(2)} (what keys, metering and rate limit leave)`,
    );
    const cpuRatio = bareFig.serverCpuMicrosPerRequest / metered.serverCpuMicrosPerRequest;
    console.log(
      `server CPU per request: metered ${fmt(metered.serverCpuMicrosPerRequest)} µs, bare ${fmt(bareFig.serverCpuMicrosPerRequest)} µs; ` +
        `CPU-bound throughput ratio bare/metered cost ${cpuRatio.toFixed(2)} (what the ratio would be with a core to spare; ` +
        `load average ${os.loadavg()[0]!.toFixed(2)} on ${os.cpus().length} cores)`,
    );
    console.log(
      `duration run: usage rows 2xx ${durationRows.ok2xx} (all rows ${durationRows.all}) vs 2xx received ${metered.ok2xx}; ` +
        `requests abandoned in flight when autocannon stopped: ${metered.abandoned} ` +
        `over the ${ROUNDS} rounds (rows − 2xx = ${durationRows.ok2xx - metered.ok2xx}, allowed 0…${metered.abandoned})`,
    );
    const exact = {
      ok2xx: exactRun['2xx'],
      non2xx: exactRun.non2xx,
      errors: exactRun.errors,
      rows2xx: exactRows.ok2xx,
      rowsAll: exactRows.all,
    };
    console.log(
      `exact run (${EXACT_AMOUNT} requests, every response awaited): usage rows 2xx ${exact.rows2xx} (all rows ${exact.rowsAll}) ` +
        `vs 2xx received ${exact.ok2xx}, non-2xx ${exact.non2xx}, errors ${exact.errors} → ` +
        (exact.rows2xx === exact.ok2xx ? 'equal (target met)' : 'NOT EQUAL'),
    );
    if (metered.non2xx > 0 || exact.non2xx > 0)
      console.log('note: non-2xx responses seen (rate limit or quota?); the figures above include them');
    return {
      responseBytes,
      metered,
      bare: bareFig,
      calculation: calcFig,
      ratio,
      calculationCeiling,
      meteredVsCalculation,
      cpuRatio,
      durationRows,
      exact,
    };
  } finally {
    for (const c of children) await stopChild(c);
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv.includes('--serve-app')) {
  serveApp();
} else if (process.argv[1] && path.resolve(process.argv[1]) === SELF) {
  await runApiBench();
}
