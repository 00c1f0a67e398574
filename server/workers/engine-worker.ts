/**
 * The body of one engine worker thread (loaded by ./engine-worker.mjs, which registers tsx first):
 * Piscina calls the default export with one task of plain data and sends its plain outcomes back.
 *
 * Test hooks: when the pool was created with `testHooks` (tests only; workerData says so), the
 * task names `test.hang` (a loop that never returns: the pool's time limit must end it) and
 * `test.crash` (the thread exits: the pool must replace it) exist. Without the flag they are
 * unknown tasks like any other name, so no request can reach them in production.
 */
import fs from 'node:fs';
import os from 'node:os';
import { workerData } from 'node:worker_threads';
import { runEngineTasks, type EngineWorkerTask, type TaskOutcome } from './engine-tasks.js';

const data = (workerData ?? {}) as { testHooks?: unknown; niceIncrement?: unknown };

/**
 * Lowers this thread's scheduling priority by `increment` (ENGINE_WORKER_NICE, default 10). With
 * as many threads as cores, the main thread would otherwise wait for the kernel to give it a core
 * back while the threads calculate, and /healthz and light calls would wait with it; at a lower
 * priority the threads take what the main thread leaves. (Linux: setpriority on a thread id
 * renices that thread alone. Elsewhere, or if refused, the thread keeps its priority.)
 */
function lowerThreadPriority(increment: number): void {
  if (!(increment > 0)) return;
  try {
    const tid = Number(fs.readlinkSync('/proc/thread-self').split('/').pop());
    if (Number.isInteger(tid) && tid > 0) {
      os.setPriority(tid, Math.min(19, os.getPriority(tid) + increment));
    }
  } catch {
    // Not Linux, or not permitted: the thread runs at the process's priority.
  }
}
lowerThreadPriority(typeof data.niceIncrement === 'number' ? data.niceIncrement : 0);

const testHooks = data.testHooks === true;

export default function runTask(task: EngineWorkerTask): TaskOutcome[] {
  if (testHooks && task.name === 'test.hang') {
    for (;;) {
      // Busy forever, as a calculation that never converges would be.
    }
  }
  if (testHooks && task.name === 'test.crash') process.exit(70);
  return runEngineTasks(task.name, task.inputs);
}
