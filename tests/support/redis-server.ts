// A throw-away redis-server for tests: a free loopback port, a temporary folder, no persistence.
// Started and stopped by the tests themselves (like the SMTP capture and the payment fake). When
// the binary is missing the caller fails with the package to install: under CI nothing skips.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net, { type AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';

export const REDIS_SERVER_BINARY = process.env.REDIS_SERVER_BIN ?? 'redis-server';
export const REDIS_SERVER_MISSING =
  `${REDIS_SERVER_BINARY} was not found on PATH: the shared-state tests need a local Redis. ` +
  'Install it with: apt-get install -y redis-server';

export interface TestRedis {
  port: number;
  url: string;
  /** Stops the server (SIGTERM, then waits for the exit); the port stays reserved for `start`. */
  stop(): Promise<void>;
  /** Starts it again on the same port (after `stop`), empty. */
  start(): Promise<void>;
  /** Stops it and removes its folder. */
  close(): Promise<void>;
}

export function redisServerAvailable(): boolean {
  const r = spawnSync(REDIS_SERVER_BINARY, ['--version'], { encoding: 'utf8' });
  return r.status === 0;
}

async function freePort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', resolve);
  });
  const { port } = server.address() as AddressInfo;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

async function waitForPort(port: number, child: ChildProcess, output: () => string): Promise<void> {
  const deadline = Date.now() + 10_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`redis-server exited (${child.exitCode}): ${output()}`);
    const ok = await new Promise<boolean>((resolve) => {
      const socket = net.connect(port, '127.0.0.1');
      socket.once('connect', () => {
        socket.end('PING\r\n');
        socket.once('data', (d) => resolve(d.toString().startsWith('+PONG')));
      });
      socket.once('error', () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`redis-server did not answer on port ${port} within 10 s: ${output()}`);
}

/** Starts redis-server on a free loopback port; throws {@link REDIS_SERVER_MISSING} without the binary. */
export async function startTestRedis(): Promise<TestRedis> {
  if (!redisServerAvailable()) throw new Error(REDIS_SERVER_MISSING);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-redis-'));
  const port = await freePort();
  let child: ChildProcess | undefined;
  const start = async () => {
    let log = '';
    const proc = spawn(
      REDIS_SERVER_BINARY,
      ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir],
      { stdio: ['ignore', 'pipe', 'pipe'] },
    );
    proc.stdout?.on('data', (d: Buffer) => (log += d.toString()));
    proc.stderr?.on('data', (d: Buffer) => (log += d.toString()));
    child = proc;
    await waitForPort(port, proc, () => log.slice(-2000));
  };
  const stop = async () => {
    const proc = child;
    child = undefined;
    if (!proc || proc.exitCode !== null) return;
    await new Promise<void>((resolve) => {
      proc.once('exit', () => resolve());
      proc.kill('SIGTERM');
    });
  };
  await start();
  return {
    port,
    url: `redis://127.0.0.1:${port}`,
    stop,
    start,
    async close() {
      await stop();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
