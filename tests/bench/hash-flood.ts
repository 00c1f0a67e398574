/**
 * Hash-flood benchmark: the metered calculation route's median latency while anonymous clients
 * flood the console's password-hashing routes. Target: flooded p50 ≤ 5 × quiet p50.
 *
 *   npx tsx tests/bench/hash-flood.ts
 *
 * The real app runs in a child process (as tests/bench/api.ts starts it, with the flags of
 * `npm start`); the load generators run in this parent. One connection measures
 * `POST /v1/evaporators/single-effect` with a valid key; FLOOD_CONNECTIONS connections at the same
 * time send, as fast as they are answered, either
 * - sign-ins with unknown e-mails (each still verifies a bcrypt hash, for timing parity), or
 * - invitation acceptances with bogus tokens (refused before any hashing, so no longer a hashing
 *   flood: its figure shows what any cheap request flood costs the shared event loop).
 * The target applies to the sign-in flood.
 * The per-address sign-in limit is raised for the run (CONSOLE_SIGN_IN_LIMIT), so the floods reach
 * the hashing queue instead of being answered 429 — the limit is what stops one real attacker,
 * the worker threads and the queue what this run measures. Quiet and flooded runs alternate in
 * ROUNDS rounds so that drift of a shared machine weighs on both; p50 is the median of the rounds'.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey } from '../../server/accounts/keys.js';
import { scopes } from '../../server/accounts/operations.js';
import { sqliteStore } from '../../server/db/store.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { BENCH_CASE, startChild, stopChild, type Child } from './api.js';

const ROOT = path.resolve(import.meta.dirname, '../..');
const FLOOD_CONNECTIONS = 8;
const ROUNDS = 3;
const ROUND_S = 4;
const TARGET_RATIO = 5;

const median = (values: number[]) => {
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
};

export interface HashFloodResult {
  quietP50Ms: number;
  signInFloodP50Ms: number;
  acceptFloodP50Ms: number;
  signInRatio: number;
  acceptRatio: number;
}

export async function runHashFloodBench(): Promise<HashFloodResult> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-hash-flood-'));
  const dbFile = path.join(dir, 'bench.db');
  const secretText = crypto.randomBytes(32).toString('hex');
  const opened = openDatabase(dbFile);
  runMigrations(opened.db);
  const setup = { ...opened, store: sqliteStore(opened.sqlite, opened.db) };
  const now = new Date();
  const account = await createAccount(setup.store, {
    name: 'Bench Flood Works (invented)',
    monthlyUnitQuota: 1e8,
    now,
  });
  const key = await createKey(setup.store, Buffer.from(secretText, 'utf8'), {
    accountId: account.id,
    name: 'hash-flood bench',
    scopes,
    rateLimitPerMinute: 100_000,
    now,
  });
  setup.sqlite.close();

  let app: Child | undefined;
  try {
    app = await startChild([path.join(ROOT, 'tests/bench/api.ts'), '--serve-app'], {
      DB_FILE: dbFile,
      EBULLIO_SECRET: secretText,
      PORT: '0',
      CONSOLE_SIGN_IN_LIMIT: '10000',
    });
    const base = `http://127.0.0.1:${app.port}`;
    // One CSRF cookie/token pair serves every anonymous flood request.
    const csrfRes = await fetch(`${base}/console-api/auth/csrf`);
    const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
    const cookie = (csrfRes.headers.get('set-cookie') ?? '').split(';')[0]!;
    const floodHeaders = { 'content-type': 'application/json', cookie, 'x-csrf-token': csrfToken };

    const body = JSON.stringify(BENCH_CASE);
    const meteredUrl = `${base}/v1/evaporators/single-effect`;
    /** Sequential requests on one keep-alive connection for ROUND_S s; the median time, ms. */
    const metered = async (): Promise<number> => {
      const times: number[] = [];
      const end = performance.now() + ROUND_S * 1000;
      while (performance.now() < end) {
        const t0 = performance.now();
        const res = await fetch(meteredUrl, {
          method: 'POST',
          headers: { 'content-type': 'application/json', authorization: `Bearer ${key.token}` },
          body,
        });
        await res.arrayBuffer();
        if (res.status !== 200) throw new Error(`the metered route answered ${res.status}`);
        times.push(performance.now() - t0);
      }
      return median(times);
    };
    const floodStatuses = { 'sign-in': new Map<number, number>(), accept: new Map<number, number>() };
    const flood = (kind: 'sign-in' | 'accept') =>
      new Promise<void>((resolve, reject) => {
        const counts = floodStatuses[kind];
        const instance = autocannon(
          {
            url: `${base}/console-api/auth/${kind === 'sign-in' ? 'sign-in' : 'invitations/accept'}`,
            method: 'POST',
            headers: floodHeaders,
            body:
              kind === 'sign-in'
                ? JSON.stringify({ email: 'nobody@flood.invalid', password: 'not a password at all' })
                : JSON.stringify({
                    token: 'bogus-invitation-token',
                    name: 'Flood',
                    password: 'not a password at all',
                  }),
            connections: FLOOD_CONNECTIONS,
            duration: ROUND_S + 1,
          },
          (err) => (err ? reject(err as Error) : resolve()),
        );
        instance.on('response', (_client, status) => counts.set(status, (counts.get(status) ?? 0) + 1));
      });
    const floodedRun = async (kind: 'sign-in' | 'accept') => {
      const f = flood(kind);
      await new Promise((r) => setTimeout(r, 500)); // let the flood fill the queue first
      const p50 = await metered();
      await f;
      return p50;
    };

    await metered(); // warm-up
    const quiet: number[] = [];
    const signIn: number[] = [];
    const accept: number[] = [];
    for (let round = 0; round < ROUNDS; round++) {
      quiet.push(await metered());
      signIn.push(await floodedRun('sign-in'));
      accept.push(await floodedRun('accept'));
    }
    const result: HashFloodResult = {
      quietP50Ms: median(quiet),
      signInFloodP50Ms: median(signIn),
      acceptFloodP50Ms: median(accept),
      signInRatio: median(signIn) / median(quiet),
      acceptRatio: median(accept) / median(quiet),
    };
    const statuses = (m: Map<number, number>) =>
      [...m]
        .sort(([a], [b]) => a - b)
        .map(([s, n]) => `${s}×${n}`)
        .join(', ');
    console.log(
      `metered single-effect route, sequential requests on 1 connection; floods of ${FLOOD_CONNECTIONS} connections; ` +
        `${ROUNDS} rounds of ${ROUND_S} s (p50: median of the rounds' medians)`,
    );
    console.log(`quiet p50                                  ${result.quietP50Ms.toFixed(1)} ms`);
    console.log(
      `flooded by unknown-e-mail sign-ins, p50    ${result.signInFloodP50Ms.toFixed(1)} ms   ratio ${result.signInRatio.toFixed(2)} ` +
        `(target ≤ ${TARGET_RATIO}: ${result.signInRatio <= TARGET_RATIO ? 'met' : 'NOT MET'}); flood answers ${statuses(floodStatuses['sign-in'])}`,
    );
    console.log(
      `flooded by bogus invitation accepts, p50    ${result.acceptFloodP50Ms.toFixed(1)} ms   ratio ${result.acceptRatio.toFixed(2)} ` +
        `(informative: refused before hashing, so this is a plain request flood sharing the event loop); ` +
        `flood answers ${statuses(floodStatuses.accept)}`,
    );
    console.log(`load average ${os.loadavg()[0]!.toFixed(2)} on ${os.cpus().length} cores`);
    return result;
  } finally {
    if (app) await stopChild(app);
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename)) {
  await runHashFloodBench();
}
