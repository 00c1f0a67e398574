/**
 * The body of one engine worker thread (loaded by ./engine-worker.mjs, which registers tsx first):
 * Piscina calls the default export with one task of plain data and sends its plain outcomes back.
 *
 * Test hooks: when the pool was created with `testHooks` (tests only; workerData says so), the
 * task names `test.hang` (a loop that never returns: the pool's time limit must end it) and
 * `test.crash` (the thread exits: the pool must replace it) exist. Without the flag they are
 * unknown tasks like any other name, so no request can reach them in production.
 */
import { workerData } from 'node:worker_threads';
import { runEngineTasks, type EngineWorkerTask, type TaskOutcome } from './engine-tasks.js';

const testHooks = (workerData as { testHooks?: unknown } | null)?.testHooks === true;

export default function runTask(task: EngineWorkerTask): TaskOutcome[] {
  if (testHooks && task.name === 'test.hang') {
    for (;;) {
      // Busy forever, as a calculation that never converges would be.
    }
  }
  if (testHooks && task.name === 'test.crash') process.exit(70);
  return runEngineTasks(task.name, task.inputs);
}
