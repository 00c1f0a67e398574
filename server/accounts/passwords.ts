/**
 * Console password hashing with bcrypt (the `bcryptjs` package: pure JavaScript, so nothing is
 * compiled or downloaded at install), cost factor 11.
 *
 * bcrypt reads at most 72 bytes of its input, so the password (NFC-normalised) is first hashed
 * with SHA-256 and base64-encoded (44 characters). That is the usual way around the limit, and
 * no part of a long passphrase is ignored. Stored form: the standard `$2b$11$<salt><hash>` string,
 * with a per-user random salt inside.
 *
 * Hashes written by an earlier version (`scrypt$N$r$p$salt$hash`, node:crypto scrypt, RFC 7914)
 * still verify, so existing users can sign in. `needsRehash` tells the caller to store a bcrypt
 * hash after such a sign-in.
 *
 * Cost factor: OWASP's Password Storage Cheat Sheet asks for a bcrypt work factor of 10 or more
 * (from memory). 11 keeps a sign-in near 100 ms on this project's 2-core machines.
 *
 * Off the event loop, and capped. bcryptjs computes on the calling thread, even through its async
 * API, so every bcrypt computation runs in one of {@link HASH_MAX_RUNNING} worker threads
 * (node:worker_threads, each running bcryptjs); legacy scrypt runs on libuv's thread pool. The
 * same gate admits at most {@link HASH_MAX_RUNNING} computations at once with at most
 * {@link HASH_MAX_WAITING} more waiting; beyond that the call fails at once with
 * {@link HashingBusyError} (the HTTP layer answers 503 with Retry-After). This gate protects the
 * calculation API's CPU; fairness between clients is the job of the per-address rate limits of
 * the unauthenticated routes that hash (server/console/auth/routes.ts).
 */
import crypto from 'node:crypto';
import { createRequire } from 'node:module';
import { promisify } from 'node:util';
import { Worker } from 'node:worker_threads';
import bcrypt from 'bcryptjs';

const BCRYPT_COST = 11;

/**
 * Computations running at once (= hashing worker threads). Two on a 2-core machine leave the
 * event loop a core even while every slot is busy.
 */
export const HASH_MAX_RUNNING = 2;
/**
 * Computations allowed to wait for a slot. At ~100–200 ms each, 8 waiting is under a second of
 * queueing; a longer queue would only make sign-ins time out instead of failing fast.
 */
export const HASH_MAX_WAITING = 8;
/** Retry-After (seconds) suggested when the queue is full: the queue drains in about a second. */
export const HASH_BUSY_RETRY_AFTER_S = 2;

/** Thrown when {@link HASH_MAX_WAITING} computations are already waiting. */
export class HashingBusyError extends Error {
  override readonly name = 'HashingBusyError';
  readonly retryAfterSeconds = HASH_BUSY_RETRY_AFTER_S;
  constructor() {
    super('Too many password computations are queued; try again shortly.');
  }
}

let running = 0;
let computations = 0;
const waiting: (() => void)[] = [];

/**
 * Takes a computation slot: resolves with its release function when one is free, waits in line
 * while all are busy, and throws {@link HashingBusyError} at once when the line is full.
 * Exported so tests can hold slots deterministically.
 */
export function acquireHashSlot(): Promise<() => void> {
  const release = () => {
    const next = waiting.shift();
    if (next) next();
    else running -= 1;
  };
  if (running < HASH_MAX_RUNNING) {
    running += 1;
    return Promise.resolve(once(release));
  }
  if (waiting.length >= HASH_MAX_WAITING) return Promise.reject(new HashingBusyError());
  return new Promise((resolve) => waiting.push(() => resolve(once(release))));
}

function once(fn: () => void): () => void {
  let done = false;
  return () => {
    if (!done) {
      done = true;
      fn();
    }
  };
}

/** Counters for tests and diagnostics: computations started so far, running and waiting now. */
export function passwordHashingStats(): { computations: number; running: number; waiting: number } {
  return { computations, running, waiting: waiting.length };
}

async function capped<T>(compute: () => Promise<T>): Promise<T> {
  const release = await acquireHashSlot();
  computations += 1;
  try {
    return await compute();
  } finally {
    release();
  }
}

// ---- the hashing workers -------------------------------------------------------------------

/** Plain CommonJS so the worker needs no TypeScript loader (tsx, vitest and plain node alike). */
const WORKER_SOURCE = `
const { parentPort, workerData } = require('node:worker_threads');
const bcrypt = require(workerData.bcryptPath);
parentPort.on('message', (job) => {
  try {
    const result = job.op === 'hash'
      ? bcrypt.hashSync(job.input, job.cost)
      : bcrypt.compareSync(job.input, job.stored);
    parentPort.postMessage({ id: job.id, ok: true, result });
  } catch (err) {
    parentPort.postMessage({ id: job.id, ok: false, message: String((err && err.message) || err) });
  }
});
`;

type Job = { op: 'hash'; input: string; cost: number } | { op: 'compare'; input: string; stored: string };
interface Pending {
  resolve: (value: string | boolean) => void;
  reject: (err: Error) => void;
}

class HashWorker {
  private worker: Worker | undefined;
  private readonly pending = new Map<number, Pending>();
  private nextId = 1;

  get load(): number {
    return this.pending.size;
  }

  run(job: Job): Promise<string | boolean> {
    const worker = this.start();
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      // Keep the process alive only while a job is in flight.
      worker.ref();
      worker.postMessage({ ...job, id });
    });
  }

  private start(): Worker {
    if (this.worker) return this.worker;
    const bcryptPath = createRequire(import.meta.url).resolve('bcryptjs');
    const worker = new Worker(WORKER_SOURCE, { eval: true, workerData: { bcryptPath } });
    worker.unref();
    worker.on('message', (msg: { id: number; ok: boolean; result?: string | boolean; message?: string }) => {
      const p = this.pending.get(msg.id);
      if (!p) return;
      this.pending.delete(msg.id);
      if (this.pending.size === 0) worker.unref();
      if (msg.ok) p.resolve(msg.result as string | boolean);
      else p.reject(new Error(`password hashing failed: ${msg.message ?? 'unknown error'}`));
    });
    const fail = (err: Error) => {
      if (this.worker === worker) this.worker = undefined;
      for (const p of this.pending.values()) p.reject(err);
      this.pending.clear();
    };
    worker.on('error', fail);
    worker.on('exit', (code) => fail(new Error(`password hashing worker exited (code ${code})`)));
    this.worker = worker;
    return worker;
  }
}

const workers = Array.from({ length: HASH_MAX_RUNNING }, () => new HashWorker());

/** Runs a job on the least busy worker; the gate keeps at most HASH_MAX_RUNNING in flight. */
function onWorker(job: Job): Promise<string | boolean> {
  let best = workers[0]!;
  for (const w of workers) if (w.load < best.load) best = w;
  return best.run(job);
}

// ---- the API -------------------------------------------------------------------------------

function prehash(password: string): string {
  return crypto.createHash('sha256').update(password.normalize('NFC'), 'utf8').digest('base64');
}

/** A fresh bcrypt hash of the password, computed in a hashing worker. Throws HashingBusyError. */
export async function hashPassword(password: string): Promise<string> {
  const input = prehash(password);
  return capped(async () => String(await onWorker({ op: 'hash', input, cost: BCRYPT_COST })));
}

/** True when the password matches the stored hash (bcrypt, or the legacy scrypt form). Throws HashingBusyError. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  if (stored.startsWith('$2')) {
    const input = prehash(password);
    return capped(async () => (await onWorker({ op: 'compare', input, stored })) === true);
  }
  if (stored.startsWith('scrypt$')) return capped(() => verifyLegacyScrypt(password, stored));
  return false;
}

/** True when a stored hash is not the current scheme and cost, and should be replaced after a sign-in. */
export function needsRehash(stored: string): boolean {
  return !stored.startsWith('$2') || bcrypt.getRounds(stored) !== BCRYPT_COST;
}

const scrypt = promisify(crypto.scrypt) as (
  password: crypto.BinaryLike,
  salt: crypto.BinaryLike,
  keylen: number,
  options: crypto.ScryptOptions,
) => Promise<Buffer>;

async function verifyLegacyScrypt(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6) return false;
  const [, n, r, p, saltText, hashText] = parts as [string, string, string, string, string, string];
  const expected = Buffer.from(hashText, 'base64url');
  // crypto.scrypt (not scryptSync) runs on libuv's thread pool, off the event loop.
  const actual = await scrypt(
    password.normalize('NFC'),
    Buffer.from(saltText, 'base64url'),
    expected.length,
    {
      N: Number(n),
      r: Number(r),
      p: Number(p),
      maxmem: 64 * 1024 * 1024,
    },
  );
  return actual.length === expected.length && crypto.timingSafeEqual(actual, expected);
}
