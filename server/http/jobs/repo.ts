/**
 * The jobs table (server/db/schema.ts `jobs`, `job_chunks`): creating a job, reading it for its
 * account, and the job resource the API answers. The runner (./runner.ts) claims and advances
 * jobs; nothing here runs one.
 */
import { randomBytes } from 'node:crypto';
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { jobs as jobsTable } from '../../db/schema.js';
import type { Store } from '../../db/store.js';

export type JobState = 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';
export type JobRow = typeof jobsTable.$inferSelect;

/** An opaque id: 120 random bits, URL-safe. */
export function newJobId(): string {
  return `job_${randomBytes(15).toString('base64url')}`;
}

export async function createJob(
  store: Store,
  job: {
    id: string;
    accountId: number;
    keyId: number | null;
    operation: string;
    input: unknown;
    total: number;
    callbackUrl: string | undefined;
    now: Date;
  },
): Promise<JobRow> {
  const { jobs } = store.t;
  const [row] = await store.db
    .insert(jobs)
    .values({
      id: job.id,
      accountId: job.accountId,
      keyId: job.keyId,
      operation: job.operation,
      state: 'queued',
      input: JSON.stringify(job.input),
      total: job.total,
      callbackUrl: job.callbackUrl ?? null,
      callbackState: job.callbackUrl ? 'pending' : null,
      createdAt: job.now,
    })
    .returning();
  return row!;
}

/** The account's job (undefined for another account's or an unknown id). */
export async function getJob(store: Store, accountId: number, id: string): Promise<JobRow | undefined> {
  const { jobs } = store.t;
  const [row] = await store.db
    .select()
    .from(jobs)
    .where(and(eq(jobs.id, id), eq(jobs.accountId, accountId)))
    .limit(1);
  return row;
}

/** Every committed row of a job, in order. */
export async function jobRows(store: Store, id: string): Promise<unknown[]> {
  const { jobChunks } = store.t;
  const chunks = await store.db
    .select({ rows: jobChunks.rows })
    .from(jobChunks)
    .where(eq(jobChunks.jobId, id))
    .orderBy(asc(jobChunks.start));
  return chunks.flatMap((c) => JSON.parse(c.rows) as unknown[]);
}

/** Whether the job's results may be read: it succeeded, or the quota stopped it (its rows say so). */
export function hasResult(row: JobRow): boolean {
  if (row.state === 'succeeded') return true;
  if (row.state !== 'failed' || row.problem === null) return false;
  return (JSON.parse(row.problem) as { type?: string }).type === '/problems/quota-exceeded';
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** The job as the API answers it (the contract's job resource). */
export function jobResource(row: JobRow): Record<string, unknown> {
  const self = `/v1/jobs/${row.id}`;
  return {
    id: row.id,
    operation: row.operation,
    state: row.state,
    progress: { done: row.done, total: row.total },
    unitsCharged: row.units,
    createdAt: row.createdAt.toISOString(),
    startedAt: iso(row.startedAt),
    finishedAt: iso(row.finishedAt),
    expiresAt: iso(row.expiresAt),
    ...(row.problem !== null ? { problem: JSON.parse(row.problem) as unknown } : {}),
    ...(row.callbackUrl !== null
      ? {
          callback: {
            url: row.callbackUrl,
            state: row.callbackState,
            attempts: row.callbackAttempts,
            ...(row.callbackOutcome !== null ? { outcome: row.callbackOutcome } : {}),
          },
        }
      : {}),
    links: {
      self,
      ...(hasResult(row) ? { result: `${self}/result`, resultCsv: `${self}/result.csv` } : {}),
    },
  };
}

/**
 * Cancels a queued or running job at once: a running job's runner finds it cancelled when it
 * commits its next chunk, which then rolls back (uncharged), so the points already committed stay
 * charged and nothing after them is. Undefined when the job had already ended.
 */
export async function cancelJob(
  store: Store,
  row: JobRow,
  now: Date,
  retentionMs: number,
): Promise<JobRow | undefined> {
  const { jobs } = store.t;
  const [done] = await store.db
    .update(jobs)
    .set({
      state: 'cancelled',
      finishedAt: now,
      expiresAt: new Date(now.getTime() + retentionMs),
      claim: null,
      leaseUntil: null,
    })
    .where(and(eq(jobs.id, row.id), inArray(jobs.state, ['queued', 'running'])))
    .returning();
  return done;
}
