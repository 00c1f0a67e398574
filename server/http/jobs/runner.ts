/**
 * The job runner of one node: takes queued jobs (server/http/jobs/repo.ts) and runs their points
 * a chunk at a time through the operation's declaration (`jobs.open(input).run`, the same code as
 * the synchronous answer, heavy points in the worker pool).
 *
 * Each chunk commits in ONE transaction: its rows (job_chunks), the job's progress and units, and
 * its metering (a usage event, the daily roll-up and a request-log row of the chunk's units:
 * server/accounts/metering.ts `commitWithRecords`). A crash loses at most the chunk being run,
 * which is run again (and charged once) when the job resumes.
 *
 * Claims. A job is claimed with a conditional UPDATE (`WHERE state = 'queued' OR the lease ran
 * out`), so of several nodes (PostgreSQL) one wins; the claim is a token held until
 * `lease_until`, renewed by a heartbeat and by each chunk's commit, which also checks the token
 * and the state: a node whose job was cancelled or taken over (its lease ran out) finds no row to
 * update, and its chunk rolls back, uncharged. On SQLite one process owns the file, so at start
 * the jobs left running by the last process are queued again at once; on PostgreSQL another
 * node's job is taken over once its lease has run out.
 *
 * Quota. Before a chunk runs, its points' costs are set aside (in order, as far as the account's
 * quota reaches, counting the units committed this month, the requests in flight and other jobs'
 * chunks on this node); a job the quota cannot take one more point of ends `failed` with the
 * quota problem, and its result refuses the remaining points with it, as a sweep does. On
 * PostgreSQL the commit decides again across nodes and a chunk it refuses ends the job the same way.
 *
 * Shutdown (`stop`): after the current chunk the job is queued again, to be resumed here or on
 * another node. Callbacks are sent after a job ends, retried with backoff, never awaited by the run;
 * one left pending by a process that stopped is sent by the next start (at least once: a receiver
 * tells repeats apart by the job id).
 */
import { randomUUID } from 'node:crypto';
import { setTimeout as sleep } from 'node:timers/promises';
import { and, eq, inArray, lt, lte, or, sql } from 'drizzle-orm';
import { getAccount } from '../../accounts/accounts.js';
import {
  commitWithRecords,
  committedUnitsThisMonth,
  QuotaSpentElsewhere,
  releaseReserved,
  reservedUnits,
  reserveUnits,
  type RequestRecord,
} from '../../accounts/metering.js';
import { signingSecretOf } from '../../accounts/signing-secrets.js';
import { jobSettings } from '../../config.js';
import type { AppDeps, JobRunnerHandle } from '../../deps.js';
import { unitsInFlight } from '../middleware/metering.js';
import { problem, problemFields } from '../problem.js';
import type { AnyOperation, JobPart, JobWork, OperationContext, ProblemBody } from '../v1/operation.js';
import { EngineCallError } from '../../workers/engine-pool.js';
import { sendCallback } from './callback.js';
import { jobResource, type JobRow } from './repo.js';

/** Waits before the callback's attempts (the first at once): four attempts in about half a minute. */
const CALLBACK_DELAYS_MS = [0, 1_000, 5_000, 25_000];
const CALLBACK_TIMEOUT_MS = 10_000;
/** A pending callback of a job ended this long ago is no longer being tried by any live node. */
const CALLBACK_ORPHANED_AFTER_MS = 120_000;
/** Pruning runs at most this often. */
const PRUNE_EVERY_MS = 60_000;

/** The chunk found the job no longer its own (cancelled, or taken over): rolled back. */
class LostClaim extends Error {}

export function createJobRunner(
  deps: AppDeps,
  operations: readonly AnyOperation[],
): JobRunnerHandle & { start(): void } {
  const settings = jobSettings(deps.config);
  const { store } = deps;
  const { jobs } = store.t;
  const parts = new Map<string, { part: JobPart; operationId: string }>();
  for (const decl of operations)
    if (decl.jobs) parts.set(decl.jobs.kind, { part: decl.jobs, operationId: decl.operation.id });

  let stopping = false;
  let timer: NodeJS.Timeout | undefined;
  let busy: Promise<void> | undefined;
  let wakeAgain = false;
  let lastPrune = 0;
  const deliveries = new Set<Promise<void>>();
  /** Ends the callbacks' waits between attempts on stop. */
  const stopped = new AbortController();

  const fail = async (row: JobRow, claim: string, p: ProblemBody): Promise<void> => {
    const now = deps.clock();
    const ended = await store.db
      .update(jobs)
      .set({
        state: 'failed',
        problem: JSON.stringify(p),
        finishedAt: now,
        expiresAt: new Date(now.getTime() + settings.retentionMs),
        claim: null,
        leaseUntil: null,
      })
      .where(and(eq(jobs.id, row.id), eq(jobs.state, 'running'), eq(jobs.claim, claim)))
      .returning({ id: jobs.id });
    if (ended.length > 0) notify(row.id);
  };

  /** The quota stopped the job before point `done`. */
  const quotaStop = async (row: JobRow, claim: string, done: number, quota: number): Promise<void> => {
    await fail(
      row,
      claim,
      problemFields(
        problem(
          'quota-exceeded',
          `The monthly quota of ${quota} units ran out after ${done} of ${row.total} points: the rest were not run. ` +
            'The result refuses them with this problem; the points done are charged.',
        ),
      ),
    );
  };

  const runJob = async (row: JobRow, claim: string): Promise<void> => {
    const entry = parts.get(row.operation);
    let work: JobWork;
    try {
      if (!entry) throw new Error(`no operation runs jobs of kind "${row.operation}"`);
      work = entry.part.open(JSON.parse(row.input) as unknown);
    } catch (err) {
      console.error(`[jobs] job ${row.id} cannot be rebuilt:`, err);
      await fail(
        row,
        claim,
        problemFields(
          problem(
            'internal',
            `The job's stored request could not be read again (${(err as Error).message}).`,
          ),
        ),
      );
      return;
    }
    const heartbeat = setInterval(
      () => {
        store.db
          .update(jobs)
          .set({ leaseUntil: new Date(deps.clock().getTime() + settings.leaseMs) })
          .where(and(eq(jobs.id, row.id), eq(jobs.claim, claim), eq(jobs.state, 'running')))
          .then(
            () => undefined,
            (err: unknown) => console.error(`[jobs] heartbeat of ${row.id} failed:`, err),
          );
      },
      Math.max(100, Math.floor(settings.leaseMs / 3)),
    );
    heartbeat.unref();
    const accountId = row.accountId;
    let done = row.done;
    let units = row.units;
    try {
      while (done < work.total) {
        if (stopping) {
          // Resumable: queued again with its progress, for this node's next start or another node.
          await store.db
            .update(jobs)
            .set({ state: 'queued', claim: null, leaseUntil: null })
            .where(and(eq(jobs.id, row.id), eq(jobs.claim, claim), eq(jobs.state, 'running')));
          return;
        }
        const account = await getAccount(store, accountId);
        if (!account) return;
        const now = deps.clock();
        const used =
          (await committedUnitsThisMonth(store, accountId, now)) +
          unitsInFlight(store, accountId) +
          reservedUnits(store, accountId);
        const last = Math.min(done + settings.chunkPoints, work.total);
        let end = done;
        let reserved = 0;
        while (end < last && used + reserved + work.cost(end) <= account.monthlyUnitQuota) {
          reserved += work.cost(end);
          end += 1;
        }
        if (end === done) {
          await quotaStop(row, claim, done, account.monthlyUnitQuota);
          return;
        }
        reserveUnits(store, accountId, reserved);
        let chunkUnits = 0;
        try {
          const started = performance.now();
          const ctx: OperationContext = {
            accountId,
            store,
            engineVersion: deps.engineVersion,
            clock: deps.clock,
            ...(deps.enginePool ? { enginePool: deps.enginePool } : {}),
          };
          let ran: { rows: unknown[]; ok: boolean[] };
          try {
            ran = await work.run(done, end, ctx);
          } catch (err) {
            const p =
              err instanceof EngineCallError
                ? problem(
                    err.kind === 'timeout' ? 'calculation-timeout' : 'calculation-failed',
                    `${err.message} The points before ${done} are kept and charged; the rest were not run.`,
                  )
                : problem('internal', `The job stopped at point ${done}: ${(err as Error).message}`);
            console.error(`[jobs] job ${row.id} failed at point ${done}:`, err);
            await fail(row, claim, problemFields(p));
            return;
          }
          ran.ok.forEach((ok, i) => {
            if (ok) chunkUnits += work.cost(done + i);
          });
          const at = deps.clock();
          const record: RequestRecord = {
            at,
            accountId,
            keyId: row.keyId,
            operation: entry!.operationId,
            status: 200,
            units: chunkUnits,
            latencyMs: Math.round(performance.now() - started),
            requestId: `${row.id}:${done}`,
            engineVersion: deps.engineVersion,
            method: 'JOB',
            path: `/v1/jobs/${row.id}`,
            requestBody: null,
            responseBody: null,
          };
          const start = done;
          const newUnits = units + chunkUnits;
          await commitWithRecords(store, [record], async (tx) => {
            const mine = await tx.db
              .update(tx.t.jobs)
              .set({ done: end, units: newUnits, leaseUntil: new Date(at.getTime() + settings.leaseMs) })
              .where(
                and(eq(tx.t.jobs.id, row.id), eq(tx.t.jobs.claim, claim), eq(tx.t.jobs.state, 'running')),
              )
              .returning({ id: tx.t.jobs.id });
            if (mine.length === 0) throw new LostClaim();
            await tx.db
              .insert(tx.t.jobChunks)
              .values({ jobId: row.id, start, rows: JSON.stringify(ran.rows) });
          });
        } catch (err) {
          if (err instanceof LostClaim) return;
          if (err instanceof QuotaSpentElsewhere) {
            await quotaStop(row, claim, done, err.quota);
            return;
          }
          throw err;
        } finally {
          releaseReserved(store, accountId, reserved);
        }
        done = end;
        units += chunkUnits;
        if (settings.chunkPauseMs > 0) await sleep(settings.chunkPauseMs);
      }
      const now = deps.clock();
      const ended = await store.db
        .update(jobs)
        .set({
          state: 'succeeded',
          finishedAt: now,
          expiresAt: new Date(now.getTime() + settings.retentionMs),
          claim: null,
          leaseUntil: null,
        })
        .where(and(eq(jobs.id, row.id), eq(jobs.claim, claim), eq(jobs.state, 'running')))
        .returning({ id: jobs.id });
      if (ended.length > 0) notify(row.id);
    } finally {
      clearInterval(heartbeat);
    }
  };

  /** Claims the oldest job that is queued or whose node's lease ran out (one node wins it). */
  const claimNext = async (): Promise<{ row: JobRow; claim: string } | undefined> => {
    const now = deps.clock();
    const open = or(eq(jobs.state, 'queued'), and(eq(jobs.state, 'running'), lt(jobs.leaseUntil, now)));
    const candidates = await store.db
      .select({ id: jobs.id })
      .from(jobs)
      .where(open)
      .orderBy(jobs.createdAt)
      .limit(8);
    for (const { id } of candidates) {
      const claim = randomUUID();
      const [row] = await store.db
        .update(jobs)
        .set({
          state: 'running',
          claim,
          leaseUntil: new Date(now.getTime() + settings.leaseMs),
          startedAt: sql`coalesce(${jobs.startedAt}, ${store.instant(now)})`,
        })
        .where(and(eq(jobs.id, id), open))
        .returning();
      if (row) return { row, claim };
    }
    return undefined;
  };

  const prune = async (): Promise<number> => {
    const now = deps.clock();
    const expired = await store.db
      .select({ id: jobs.id })
      .from(jobs)
      .where(lt(jobs.expiresAt, now))
      .limit(1000);
    if (expired.length === 0) return 0;
    const ids = expired.map((j) => j.id);
    await store.transaction(async (tx) => {
      await tx.db.delete(tx.t.jobChunks).where(inArray(tx.t.jobChunks.jobId, ids));
      await tx.db.delete(tx.t.jobs).where(inArray(tx.t.jobs.id, ids));
    });
    return ids.length;
  };

  /** The database was closed under the runner (an app never closed with closeApp, in tests). */
  const storeClosed = (): boolean =>
    store.sqlite ? !store.sqlite.open : Boolean((store.pool as { ending?: boolean } | undefined)?.ending);

  const tick = async (): Promise<void> => {
    if (storeClosed()) {
      stopping = true;
      return;
    }
    try {
      if (Date.now() - lastPrune >= PRUNE_EVERY_MS) {
        lastPrune = Date.now();
        await prune();
      }
      while (!stopping) {
        wakeAgain = false;
        const next = await claimNext();
        if (!next) break;
        await runJob(next.row, next.claim);
      }
    } catch (err) {
      console.error('[jobs] the runner failed:', err);
    }
  };

  const schedule = (delay: number): void => {
    if (stopping) return;
    clearTimeout(timer);
    timer = setTimeout(() => {
      timer = undefined;
      busy = tick().finally(() => {
        busy = undefined;
        schedule(wakeAgain ? 0 : settings.pollMs);
      });
    }, delay);
    timer.unref();
  };

  /** Sends the callback of an ended job, retried with backoff; the outcome is stored on the job. */
  const deliver = async (jobId: string): Promise<void> => {
    for (let attempt = 0; attempt < CALLBACK_DELAYS_MS.length; attempt++) {
      if (attempt > 0) {
        try {
          await sleep(CALLBACK_DELAYS_MS[attempt]!, undefined, { ref: false, signal: stopped.signal });
        } catch {
          return; // stopping: the callback stays pending
        }
      }
      const [row] = await store.db.select().from(jobs).where(eq(jobs.id, jobId)).limit(1);
      if (!row?.callbackUrl || row.callbackState !== 'pending') return;
      const secret = await signingSecretOf(store, deps.config.secret, row.accountId);
      const result = secret
        ? await sendCallback({
            url: row.callbackUrl,
            jobId,
            body: JSON.stringify(jobResource(row)),
            secret,
            allowLoopback: settings.allowLoopbackCallbacks,
            timeoutMs: CALLBACK_TIMEOUT_MS,
            now: new Date(),
          })
        : { delivered: false, outcome: 'not sent: the account has no readable signing secret' };
      const lastAttempt = attempt === CALLBACK_DELAYS_MS.length - 1 || !secret;
      await store.db
        .update(jobs)
        .set({
          callbackAttempts: row.callbackAttempts + 1,
          callbackOutcome: result.outcome,
          callbackState: result.delivered ? 'delivered' : lastAttempt ? 'failed' : 'pending',
        })
        .where(eq(jobs.id, jobId));
      if (result.delivered || lastAttempt) return;
    }
  };

  const notify = (jobId: string): void => {
    const sending = deliver(jobId)
      .catch((err: unknown) => console.error(`[jobs] callback of ${jobId} failed:`, err))
      .finally(() => deliveries.delete(sending));
    deliveries.add(sending);
  };

  return {
    start() {
      const begin = async () => {
        // SQLite: one process serves the file, so a job still "running" was the last process's.
        if (store.sqlite) {
          await store.db
            .update(jobs)
            .set({ state: 'queued', claim: null, leaseUntil: null })
            .where(eq(jobs.state, 'running'));
        }
        // Callbacks an earlier process left pending: on SQLite every one (that process is gone);
        // on PostgreSQL those of jobs ended long enough ago that no live node is still trying them.
        const settled = new Date(deps.clock().getTime() - (store.sqlite ? 0 : CALLBACK_ORPHANED_AFTER_MS));
        const orphans = await store.db
          .select({ id: jobs.id })
          .from(jobs)
          .where(
            and(
              eq(jobs.callbackState, 'pending'),
              inArray(jobs.state, ['succeeded', 'failed', 'cancelled']),
              lte(jobs.finishedAt, settled),
            ),
          )
          .limit(1000);
        for (const { id } of orphans) notify(id);
      };
      busy = begin()
        .catch((err: unknown) => console.error('[jobs] could not requeue interrupted jobs:', err))
        .finally(() => {
          busy = undefined;
          schedule(0);
        });
    },
    wake() {
      if (busy) wakeAgain = true;
      else schedule(0);
    },
    ended: notify,
    prune,
    async stop() {
      stopping = true;
      stopped.abort();
      clearTimeout(timer);
      await busy;
      await Promise.all([...deliveries]);
    },
  };
}
