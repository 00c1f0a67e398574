// A job survives a hard crash: the real server (node --import tsx server/main.ts) runs a long sweep
// as a job and is SIGKILLed mid-run; started again on the same database, it resumes the job from
// its last committed chunk and finishes it. Its result equals the synchronous answer, and its usage
// is exactly the points' units: nothing lost, nothing charged twice. On SQLite the new process
// queues the interrupted job again at start; on PostgreSQL it takes the job over once the dead
// process's lease has run out.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { openPostgresStore, openSqliteStore, type Store } from '../../server/db/store.js';
import { startServerProcess, type ServerProcess } from '../support/server-process.js';
import { openTestStore, testDatabaseKind } from '../support/test-store.js';

const BOOT_KEY = 'ebl_live_JobRestart_0123456789abcdefghijABCDEFGHIJKLM';
const POINTS = 600;
/** An invented caustic single-effect evaporator (5 units a point), its feed temperature swept. */
const SWEEP = {
  operation: 'single-effect',
  base: {
    liquor: 'sodium-hydroxide',
    feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
    product: { massFraction: 0.3 },
    steam: { pressure: '3 barg' },
    body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
  },
  vary: [{ field: 'feed.temperature', from: 30, to: 80, steps: POINTS }],
};

type Job = { id: string; state: string; progress: { done: number; total: number }; unitsCharged: number };

async function call(
  port: number,
  method: string,
  url: string,
  body?: unknown,
  headers: Record<string, string> = {},
) {
  const res = await fetch(`http://127.0.0.1:${port}${url}`, {
    method,
    headers: { Authorization: `Bearer ${BOOT_KEY}`, 'Content-Type': 'application/json', ...headers },
    ...(body === undefined ? {} : { body: JSON.stringify(body) }),
  });
  return { status: res.status, text: await res.text() };
}

async function poll(port: number, id: string, until: (j: Job) => boolean, ms: number): Promise<Job> {
  const deadline = Date.now() + ms;
  for (;;) {
    const res = await call(port, 'GET', `/v1/jobs/${id}`);
    if (res.status === 200) {
      const job = JSON.parse(res.text) as Job;
      if (until(job)) return job;
    }
    if (Date.now() > deadline) throw new Error(`job ${id} did not get there: ${res.text}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

/** The database the server processes share, and how to open it again from the test. */
async function database(): Promise<{
  env: Record<string, string>;
  open: () => Promise<Store>;
  done: () => void;
}> {
  if (testDatabaseKind() === 'postgres') {
    const store = await openTestStore();
    const url = (store.pool as unknown as { options: { connectionString: string } }).options.connectionString;
    await store.close();
    return {
      env: { DATABASE_URL: url },
      open: async () => openPostgresStore(url, { max: 1 }),
      done: () => undefined,
    };
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-job-restart-'));
  const file = path.join(dir, 'e.db');
  return {
    env: { DB_FILE: file },
    open: async () => openSqliteStore(file),
    done: () => fs.rmSync(dir, { recursive: true, force: true }),
  };
}

describe('a job across a SIGKILL', () => {
  it('resumes from its last committed chunk after a restart and charges every point exactly once', async () => {
    const db = await database();
    const env = {
      PORT: '0',
      BOOTSTRAP_API_KEY: BOOT_KEY,
      ENGINE_WORKERS: '0',
      JOB_CHUNK_POINTS: '20',
      // A pause between chunks stretches the job over seconds, so the kill lands inside it.
      JOB_CHUNK_PAUSE_MS: '100',
      JOB_LEASE_MS: '1500',
      JOB_POLL_MS: '200',
      ...db.env,
    };
    const servers: ServerProcess[] = [];
    try {
      const first = startServerProcess(env, { detached: true });
      servers.push(first);
      const port1 = await first.port;
      const accepted = await call(port1, 'POST', '/v1/sweeps', SWEEP, { Prefer: 'respond-async' });
      expect(accepted.status, accepted.text).toBe(202);
      const id = (JSON.parse(accepted.text) as Job).id;
      const before = await poll(port1, id, (j) => j.progress.done >= 60, 30_000);
      process.kill(-first.child.pid!, 'SIGKILL');
      expect((await first.exited).signal).toBe('SIGKILL');
      expect(before.state).toBe('running');

      const second = startServerProcess(env, { detached: true });
      servers.push(second);
      const port2 = await second.port;
      const job = await poll(port2, id, (j) => j.state !== 'queued' && j.state !== 'running', 60_000);
      expect(job.state).toBe('succeeded');
      expect(job.progress).toEqual({ done: POINTS, total: POINTS });
      expect(job.unitsCharged).toBe(POINTS * 5);

      // The result is the synchronous answer, every point once and in order.
      const result = await call(port2, 'GET', `/v1/jobs/${id}/result`);
      const sync = await call(port2, 'POST', '/v1/sweeps', SWEEP);
      expect(result.status).toBe(200);
      expect(result.text).toBe(sync.text);
      process.kill(-second.child.pid!, 'SIGKILL');
      await second.exited;

      // Usage: one event per committed chunk, each chunk once, their units the points' exactly.
      const store = await db.open();
      try {
        const chunks = await store.rows<{ request_id: string; units: unknown }>(
          sql`SELECT request_id, units FROM usage_events WHERE request_id LIKE ${`${id}:%`}`,
        );
        const starts = chunks.map((c) => Number(c.request_id.slice(id.length + 1))).sort((a, b) => a - b);
        expect(starts).toEqual(Array.from({ length: POINTS / 20 }, (_, i) => i * 20));
        expect(chunks.reduce((sum, c) => sum + Number(c.units), 0)).toBe(POINTS * 5);
      } finally {
        await store.close();
      }
    } finally {
      for (const s of servers) {
        if (s.child.exitCode === null && s.child.signalCode === null) process.kill(-s.child.pid!, 'SIGKILL');
      }
      db.done();
    }
  }, 120_000);
});
