// A throw-away PostgreSQL server for tests: a fresh cluster in a temporary folder, listening on a
// free loopback port (and a socket in that folder), trusted local connections, fsync off. It runs
// as the unprivileged `postgres` user when the tests run as root (initdb and postgres refuse to
// run as root), and as the current user otherwise. `stop()` shuts it down and removes the folder.
//
// The binaries are Debian's (`apt-get install -y postgresql`, found in /usr/lib/postgresql/<v>/bin;
// POSTGRES_BIN_DIR names another folder). When they are missing the harness fails with that
// instruction: a test that needs PostgreSQL never skips silently, under CI or not.
import { execFile, execFileSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';

const run = promisify(execFile);
const PG_ROOT = '/usr/lib/postgresql';
const NEEDED = ['initdb', 'pg_ctl', 'postgres'] as const;
/** The database user the cluster is made with (the superuser of the throw-away cluster). */
export const POSTGRES_TEST_USER = 'ebullio';

export interface PostgresServer {
  /** `postgres://ebullio@127.0.0.1:<port>/postgres` */
  url: string;
  port: number;
  /** The temporary folder (cluster in `data/`, socket and log beside it). */
  dir: string;
  /** Milliseconds from the call to a server accepting connections (initdb + start). */
  startMs: number;
  stop(): Promise<void>;
}

/** The newest /usr/lib/postgresql/<version>/bin holding initdb, pg_ctl and postgres. */
export function findPostgresBinDir(root = PG_ROOT, override = process.env.POSTGRES_BIN_DIR): string {
  const candidates: string[] = [];
  if (override) candidates.push(override);
  if (fs.existsSync(root)) {
    const versions = fs
      .readdirSync(root)
      .filter((v) => /^\d+(\.\d+)?$/.test(v))
      .sort((a, b) => Number(b) - Number(a));
    for (const v of versions) candidates.push(path.join(root, v, 'bin'));
  }
  const found = candidates.find((dir) => NEEDED.every((bin) => fs.existsSync(path.join(dir, bin))));
  if (!found) {
    throw new Error(
      `PostgreSQL server binaries (${NEEDED.join(', ')}) not found in ${root}/<version>/bin. ` +
        'Install them with: apt-get install -y postgresql (or set POSTGRES_BIN_DIR).',
    );
  }
  return found;
}

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0;

/** Runs a PostgreSQL program, as the `postgres` user when we are root. */
async function runPg(bin: string, args: string[]): Promise<void> {
  const [cmd, argv] = isRoot() ? ['runuser', ['-u', 'postgres', '--', bin, ...args]] : [bin, args];
  try {
    await run(cmd, argv, { timeout: 60_000 });
  } catch (err) {
    const e = err as { stderr?: string; stdout?: string; message: string };
    throw new Error(`${path.basename(bin)} failed: ${e.message}\n${e.stdout ?? ''}${e.stderr ?? ''}`);
  }
}

function freeLoopbackPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = net.createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as net.AddressInfo;
      probe.close(() => resolve(port));
    });
  });
}

/** Makes a cluster in a new temporary folder and starts it; resolves once it accepts connections. */
export async function startPostgres(): Promise<PostgresServer> {
  const began = performance.now();
  const binDir = findPostgresBinDir();
  // As root the cluster belongs to `postgres`, which must reach the folder: a TMPDIR under /root
  // would not do, so root uses /tmp (world-traversable on every Debian).
  const dir = fs.mkdtempSync(path.join(isRoot() ? '/tmp' : os.tmpdir(), 'ebullio-pg-'));
  const data = path.join(dir, 'data');
  const log = path.join(dir, 'server.log');
  if (isRoot()) {
    const uid = Number(execFileSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).trim());
    const gid = Number(execFileSync('id', ['-g', 'postgres'], { encoding: 'utf8' }).trim());
    fs.chownSync(dir, uid, gid);
  }
  let started = false;
  const pgCtl = path.join(binDir, 'pg_ctl');
  const stopNow = () => {
    // Synchronous, so it can also run from a process 'exit' handler.
    if (started) {
      started = false;
      const args = ['-D', data, 'stop', '-m', 'fast', '-w'];
      const [cmd, argv] = isRoot() ? ['runuser', ['-u', 'postgres', '--', pgCtl, ...args]] : [pgCtl, args];
      try {
        execFileSync(cmd, argv, { stdio: 'ignore', timeout: 30_000 });
      } catch {
        // Already gone: nothing to stop.
      }
    }
    fs.rmSync(dir, { recursive: true, force: true });
  };
  process.once('exit', stopNow);
  try {
    await runPg(path.join(binDir, 'initdb'), [
      '-D',
      data,
      '-U',
      POSTGRES_TEST_USER,
      '--auth=trust',
      '--encoding=UTF8',
      '--no-locale',
      '--no-sync',
    ]);
    const port = await freeLoopbackPort();
    const options = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c full_page_writes=off`;
    await runPg(pgCtl, ['-D', data, '-l', log, '-o', options, 'start', '-w', '-t', '60']);
    started = true;
    return {
      url: `postgres://${POSTGRES_TEST_USER}@127.0.0.1:${port}/postgres`,
      port,
      dir,
      startMs: performance.now() - began,
      stop: async () => {
        process.removeListener('exit', stopNow);
        stopNow();
      },
    };
  } catch (err) {
    const tail = fs.existsSync(log) ? fs.readFileSync(log, 'utf8').slice(-2000) : '';
    process.removeListener('exit', stopNow);
    stopNow();
    throw tail ? new Error(`${(err as Error).message}\nserver log:\n${tail}`) : err;
  }
}

/**
 * A pool for a test's own queries on the throw-away server. pg-pool's `end()` resolves as soon as
 * its connections are told to close, not once they have; when the server is stopped right after,
 * its "terminating connection" notice reaches a closing connection and, without a listener, is an
 * uncaught 'error' event that fails the whole run. The notice is expected then, so it is ignored.
 */
export function testPool(url: string, max: number): pg.Pool {
  const pool = new pg.Pool({ connectionString: url, max });
  pool.on('error', () => {});
  return pool;
}
