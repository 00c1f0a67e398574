// Builds the console for the browser tests and the bundle benchmark: once when console/dist is
// missing, and again whenever a console or shared source is newer than the build, so a local run
// never tests a stale build (CI always starts without one). Test files run in parallel workers and
// each asks for the build: a lock directory lets one build while the others wait and then find the
// build fresh. (Two builds at once would empty console/dist under a server that is serving it.)
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

const ROOT = path.resolve(import.meta.dirname, '../..');
const DIST_INDEX = path.join(ROOT, 'console', 'dist', 'index.html');
const SOURCES = ['console/src', 'console/public', 'console/index.html', 'console/vite.config.ts', 'shared'];

function newestMtime(entry: string): number {
  const stat = fs.statSync(entry, { throwIfNoEntry: false });
  if (!stat) return 0;
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = 0;
  for (const name of fs.readdirSync(entry)) newest = Math.max(newest, newestMtime(path.join(entry, name)));
  return newest;
}

const LOCK = path.join(ROOT, 'console', '.build-lock');
const BUILD_TIMEOUT_MS = 180_000;

function isStale(): boolean {
  const built = fs.statSync(DIST_INDEX, { throwIfNoEntry: false })?.mtimeMs;
  return built === undefined || Math.max(...SOURCES.map((s) => newestMtime(path.join(ROOT, s)))) > built;
}

/** Holds the build lock while `fn` runs (mkdir is atomic); a lock older than a build is taken over. */
function withBuildLock<T>(fn: () => T): T {
  const deadline = Date.now() + 2 * BUILD_TIMEOUT_MS;
  for (;;) {
    try {
      fs.mkdirSync(LOCK);
      break;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
      const since = fs.statSync(LOCK, { throwIfNoEntry: false })?.mtimeMs;
      if (since !== undefined && Date.now() - since > BUILD_TIMEOUT_MS)
        fs.rmSync(LOCK, { recursive: true, force: true });
      if (Date.now() > deadline) throw new Error(`waited too long for the console build lock ${LOCK}`);
      Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 250);
    }
  }
  try {
    return fn();
  } finally {
    fs.rmSync(LOCK, { recursive: true, force: true });
  }
}

/** Runs `npm run build` when the build is missing, older than its sources, or `force` is set. */
export function ensureConsoleBuilt(options: { force?: boolean } = {}): { built: boolean; present: boolean } {
  if (!fs.existsSync(path.join(ROOT, 'console', 'vite.config.ts'))) return { built: false, present: false };
  if (!isStale() && !options.force) return { built: false, present: true };
  return withBuildLock(() => {
    // Another worker may have built it while this one waited.
    if (!isStale() && !options.force) return { built: false, present: true };
    // A production build whatever the caller's NODE_ENV: vitest sets it to "test", and Vite keeps
    // an existing NODE_ENV, which would ship Vue's development code (48 kB gzipped more).
    const out = spawnSync('npm', ['run', 'build'], {
      cwd: ROOT,
      encoding: 'utf8',
      timeout: BUILD_TIMEOUT_MS,
      env: { ...process.env, NODE_ENV: 'production' },
    });
    if (out.status !== 0) throw new Error(`console build failed:\n${out.stdout}\n${out.stderr}`);
    return { built: true, present: fs.existsSync(DIST_INDEX) };
  });
}
