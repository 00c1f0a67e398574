// Builds the console for the browser tests and the bundle benchmark: once when console/dist is
// missing, and again whenever a console or shared source is newer than the build, so a local run
// never tests a stale build (CI always starts without one).
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

/** Runs `npm run build` when the build is missing, older than its sources, or `force` is set. */
export function ensureConsoleBuilt(options: { force?: boolean } = {}): { built: boolean; present: boolean } {
  if (!fs.existsSync(path.join(ROOT, 'console', 'vite.config.ts'))) return { built: false, present: false };
  const built = fs.statSync(DIST_INDEX, { throwIfNoEntry: false })?.mtimeMs;
  const stale =
    built === undefined || Math.max(...SOURCES.map((s) => newestMtime(path.join(ROOT, s)))) > built;
  if (!stale && !options.force) return { built: false, present: true };
  const out = spawnSync('npm', ['run', 'build'], { cwd: ROOT, encoding: 'utf8', timeout: 180_000 });
  if (out.status !== 0) throw new Error(`console build failed:\n${out.stdout}\n${out.stderr}`);
  return { built: true, present: fs.existsSync(DIST_INDEX) };
}
