/**
 * The pool of engine worker threads (Piscina): heavy calculations (batches, long trains; later
 * sweeps and studies) run here so that the main thread stays free for HTTP, metering and light
 * calls. HTTP-free: tasks are plain data keyed by operation (./engine-tasks.ts), outcomes come
 * back as plain data, and the caller formats them.
 *
 * - `workers` threads (ENGINE_WORKERS, default the machine's available parallelism); 0 runs every
 *   task inline on the calling thread (tests may use it; no thread is started).
 * - A call still unanswered `taskTimeoutMs` after a thread took it (ENGINE_TASK_TIMEOUT_MS,
 *   default 30 s) counts as hung: it is aborted (Piscina terminates its thread and starts
 *   another) and rejects with {@link EngineCallError} 'timeout'. Calls wait their turn here, one
 *   per thread, so time spent queueing behind other batches does not count (the start of a
 *   replacement thread, about a second, does). A thread that dies mid-task is replaced too, and
 *   its call rejects with 'failed'.
 * - `runMany` splits a batch into small chunks, several per thread, so every thread has work, one
 *   slow chunk does not leave the others idle, and reading one chunk's results is a short pause
 *   for the main thread.
 * - `destroy()` ends the threads (after the HTTP drain, server/app.ts `closeApp`).
 */
import { Piscina } from 'piscina';
import { runEngineTasks, SINGLE_EFFECT, type EngineWorkerTask, type TaskOutcome } from './engine-tasks.js';

export interface EnginePoolOptions {
  /** Worker threads; 0: inline on the calling thread. */
  workers: number;
  /** Limit of one call, from the moment a thread takes it to its answer, ms. */
  taskTimeoutMs: number;
  /** Start every thread now (a server), rather than at the first task (tests, short-lived apps). */
  eager?: boolean;
  /** How much lower the threads' scheduling priority is than the main thread's (nice; default 10, 0 = the same). */
  niceIncrement?: number;
  /** Tests only: the worker's `test.hang` / `test.crash` tasks exist, and `divertNext` works. */
  testHooks?: boolean;
}

/** A call the pool could not answer: it ran past its limit, or its thread died. */
export class EngineCallError extends Error {
  override readonly name = 'EngineCallError';
  constructor(
    readonly kind: 'timeout' | 'failed',
    message: string,
  ) {
    super(message);
  }
}

export interface EnginePool {
  /** Threads (0: inline). */
  readonly workers: number;
  readonly taskTimeoutMs: number;
  readonly destroyed: boolean;
  /** One case of a task. */
  run(name: string, input: unknown): Promise<TaskOutcome>;
  /** Many cases of one task, spread over the threads; outcomes in input order. */
  runMany(name: string, inputs: readonly unknown[]): Promise<TaskOutcome[]>;
  /** Tests only (pool made with `testHooks`): the next call runs `test.hang` or `test.crash` instead. */
  divertNext(kind: 'hang' | 'crash'): void;
  destroy(): Promise<void>;
}

/** Chunks per thread in `runMany` at least: enough to balance uneven cases. */
const CHUNKS_PER_WORKER = 4;
/**
 * Cases per chunk at most. The main thread reads each chunk's results in one piece (structured
 * clone: about 35–80 µs per ten-effect result measured), so a small chunk keeps that pause short
 * (≈ 1–3 ms); a message costs ≈ 0.1 ms, small beside 32 cases of any evaporator.
 */
const MAX_CHUNK = 32;
/** Idle threads beyond `minThreads` end after this, ms. */
const IDLE_TIMEOUT_MS = 60_000;

/** How long `destroy` waits for eager threads still booting, ms. */
const BOOT_WAIT_MS = 10_000;

/** ENGINE_WORKER_NICE's default: see engine-worker.ts. */
export const DEFAULT_NICE_INCREMENT = 10;

const WORKER_FILE = new URL('./engine-worker.mjs', import.meta.url).href;

export function createEnginePool(options: EnginePoolOptions): EnginePool {
  const { workers, taskTimeoutMs } = options;
  if (!Number.isInteger(workers) || workers < 0) throw new RangeError('workers must be an integer ≥ 0');
  let destroyed = false;
  let diverted: 'hang' | 'crash' | undefined;
  const piscina =
    workers > 0
      ? new Piscina<EngineWorkerTask, TaskOutcome[]>({
          filename: WORKER_FILE,
          maxThreads: workers,
          minThreads: options.eager ? workers : 0,
          idleTimeout: IDLE_TIMEOUT_MS,
          workerData: {
            testHooks: options.testHooks === true,
            niceIncrement: options.niceIncrement ?? DEFAULT_NICE_INCREMENT,
          },
          // No inherited flags (a parent's --eval or --input-type would break the thread): the
          // bootstrap registers tsx itself, under `node --import tsx` and a test runner alike.
          execArgv: [],
        })
      : undefined;

  // Eager threads boot now (each registers tsx and loads the engine). One empty call per thread
  // settles once every thread has booted: `destroy` waits for it, because ending a thread while it
  // is still loading its modules through the loader hooks can abort the whole process (Node 20).
  const booted: Promise<unknown> =
    piscina && options.eager
      ? Promise.allSettled(
          Array.from({ length: workers }, () => piscina.run({ name: SINGLE_EFFECT, inputs: [] })),
        )
      : Promise.resolve();

  // One task per thread is handed to Piscina at a time; the rest wait here, in order. So the time
  // limit starts when a thread takes the task, not while it queues behind other batches.
  let running = 0;
  const waiting: (() => void)[] = [];
  const acquire = async (): Promise<void> => {
    if (running < workers) {
      running++;
      return;
    }
    await new Promise<void>((resolve) => waiting.push(resolve));
  };
  // The slot passes straight to the next waiter, so no newcomer can slip in between.
  const release = (): void => {
    const next = waiting.shift();
    if (next) next();
    else running--;
  };

  async function call(name: string, inputs: unknown[]): Promise<TaskOutcome[]> {
    if (diverted) {
      name = `test.${diverted}`;
      diverted = undefined;
    }
    if (destroyed) throw new EngineCallError('failed', 'The calculation pool has been shut down.');
    if (!piscina) return runEngineTasks(name, inputs);
    await acquire();
    try {
      if (destroyed) throw new EngineCallError('failed', 'The calculation pool has been shut down.');
      return await piscina.run({ name, inputs }, { signal: AbortSignal.timeout(taskTimeoutMs) });
    } catch (err) {
      if (err instanceof EngineCallError) throw err;
      const e = err as Error;
      if (e.name === 'AbortError' || e.name === 'TimeoutError') {
        throw new EngineCallError('timeout', `The calculation did not finish within ${taskTimeoutMs} ms.`);
      }
      throw new EngineCallError('failed', `The calculation's worker thread failed: ${e.message}`);
    } finally {
      release();
    }
  }

  return {
    workers,
    taskTimeoutMs,
    get destroyed() {
      return destroyed;
    },
    async run(name, input) {
      const [outcome] = await call(name, [input]);
      return outcome!;
    },
    async runMany(name, inputs) {
      if (inputs.length === 0) return [];
      const size = Math.min(MAX_CHUNK, Math.ceil(inputs.length / Math.max(1, workers * CHUNKS_PER_WORKER)));
      const parts: Promise<TaskOutcome[]>[] = [];
      for (let i = 0; i < inputs.length; i += size) parts.push(call(name, inputs.slice(i, i + size)));
      // Every chunk settles before the answer, so a failed batch leaves no chunk running for it.
      const settled = await Promise.allSettled(parts);
      const failed = settled.find((s) => s.status === 'rejected');
      if (failed) throw failed.reason;
      return settled.flatMap((s) => (s as PromiseFulfilledResult<TaskOutcome[]>).value);
    },
    divertNext(kind) {
      if (!options.testHooks) throw new Error('divertNext needs a pool made with testHooks');
      diverted = kind;
    },
    async destroy() {
      if (destroyed) return;
      destroyed = true;
      // Calls still waiting for a thread wake, find the pool shut and fail.
      for (const wake of waiting.splice(0)) wake();
      await Promise.race([booted, new Promise((resolve) => setTimeout(resolve, BOOT_WAIT_MS).unref())]);
      await piscina?.destroy();
    },
  };
}
