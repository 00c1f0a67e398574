/**
 * Key-lookup benchmark: why authentication keeps a synchronous SQLite path beside the portable
 * one. On one SQLite file it times, per call, the prepared-statement path
 * (`authenticateTokenOnSqlite`), the async `authenticateToken` that dispatches to it, and the
 * portable path (raw SQL through the store, as PostgreSQL runs it) on the same connection, both
 * with the key remembered (the usual case) and with the memory cleared before every call (a
 * lookup each time). Run alone: `npx tsx tests/bench/key-lookup.ts`.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createAccount } from '../../server/accounts/accounts.js';
import {
  authenticateToken,
  authenticateTokenOnSqlite,
  createKey,
  forgetKnownKeys,
} from '../../server/accounts/keys.js';
import { scopes } from '../../server/accounts/operations.js';
import { openSqliteStore, type Store } from '../../server/db/store.js';

const CALLS = 20_000;
const REPEATS = 5;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? NaN;
}

/** Median microseconds per call, after a warm-up pass. */
async function perCall(fn: () => unknown): Promise<number> {
  for (let i = 0; i < 1000; i++) await fn();
  const runs: number[] = [];
  for (let r = 0; r < REPEATS; r++) {
    const start = process.hrtime.bigint();
    for (let i = 0; i < CALLS; i++) await fn();
    runs.push(Number(process.hrtime.bigint() - start) / 1000 / CALLS);
  }
  return median(runs);
}

export interface KeyLookupBenchResult {
  rememberedSync: number;
  rememberedAsync: number;
  rememberedPortable: number;
  lookupSync: number;
  lookupPortable: number;
}

export async function runKeyLookupBench(): Promise<KeyLookupBenchResult> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-key-lookup-'));
  const store = openSqliteStore(path.join(dir, 'bench.db'));
  try {
    await store.migrate();
    const secret = crypto.randomBytes(32);
    const now = new Date();
    const account = await createAccount(store, { name: 'Bench Lookup Works (invented)', now });
    const { token } = await createKey(store, secret, { accountId: account.id, name: 'bench', scopes, now });
    const sqlite = store.sqlite!;
    // The same connection without its SQLite handle: the store takes the portable path.
    const portable: Store = { ...store, sqlite: undefined };
    const check = (ok: boolean) => {
      if (!ok) throw new Error('the bench key was refused');
    };
    const result: KeyLookupBenchResult = {
      rememberedSync: await perCall(() => check(authenticateTokenOnSqlite(sqlite, secret, token, now).ok)),
      rememberedAsync: await perCall(async () =>
        check((await authenticateToken(store, secret, token, now)).ok),
      ),
      rememberedPortable: await perCall(async () =>
        check((await authenticateToken(portable, secret, token, now)).ok),
      ),
      lookupSync: await perCall(() => {
        forgetKnownKeys(store);
        check(authenticateTokenOnSqlite(sqlite, secret, token, now).ok);
      }),
      lookupPortable: await perCall(async () => {
        forgetKnownKeys(portable);
        check((await authenticateToken(portable, secret, token, now)).ok);
      }),
    };
    const f = (x: number) => `${x.toFixed(2)} µs`;
    console.log(`key remembered:   sync SQLite path ${f(result.rememberedSync)} per call`);
    console.log(`                  async dispatch to it ${f(result.rememberedAsync)}`);
    console.log(`                  portable path on the same file ${f(result.rememberedPortable)}`);
    console.log(`lookup each call: sync SQLite path ${f(result.lookupSync)}`);
    console.log(
      `                  portable path ${f(result.lookupPortable)} (${(result.lookupPortable / result.lookupSync).toFixed(1)}×)`,
    );
    return result;
  } finally {
    await store.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  await runKeyLookupBench();
}
