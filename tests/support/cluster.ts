// Several Ebullio nodes on one machine, as `npm run cluster` and the cluster suite run them:
// a throw-away PostgreSQL (shared database), a throw-away Redis (rate limits, key-cache
// invalidation), N server processes (`server/main.ts`, one per loopback port) and HAProxy in front.
// Everything listens on loopback ports and lives in temporary folders; `stop()` ends it all.
//
// The first node starts alone (it applies the migrations and seeds an empty database); the others
// start once it is ready, so two nodes never seed at the same time.
import crypto from 'node:crypto';
import pg from 'pg';
import { freeLoopbackPort, startHaproxy, type Proxy } from './haproxy.js';
import { startPostgres, type PostgresServer } from './postgres-server.js';
import { startTestRedis, type TestRedis } from './redis-server.js';
import { startServerProcess, type ServerProcess } from './server-process.js';

export interface ClusterNode {
  name: string;
  port: number;
  url: string;
  process: ServerProcess;
}

export interface Cluster {
  /** The proxy's URL: what clients use. */
  url: string;
  nodes: ClusterNode[];
  databaseUrl: string;
  redisUrl: string;
  postgres: PostgresServer;
  redis: TestRedis;
  proxy: Proxy;
  /** The environment every node was started with (DATABASE_URL, REDIS_URL, the shared secret…). */
  env: Record<string, string>;
  /** Ends a node with SIGKILL (no drain) and waits for the exit. */
  kill(node: ClusterNode): Promise<void>;
  stop(): Promise<void>;
}

export interface ClusterOptions {
  nodes?: number;
  /** Extra environment for every node (e.g. BOOTSTRAP_ADMIN_EMAIL). */
  env?: Record<string, string>;
  /** Called with each line a node writes (default: kept, shown only when a start fails). */
  onLog?: (node: string, line: string) => void;
}

async function readyz(url: string, deadlineMs: number): Promise<void> {
  const deadline = Date.now() + deadlineMs;
  let last = '';
  while (Date.now() < deadline) {
    try {
      const res = await fetch(`${url}/readyz`);
      if (res.ok) return;
      last = `${res.status} ${await res.text()}`;
    } catch (err) {
      last = (err as Error).message;
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`${url}/readyz not ready within ${deadlineMs} ms: ${last}`);
}

export async function startCluster(options: ClusterOptions = {}): Promise<Cluster> {
  const count = options.nodes ?? 3;
  const postgres = await startPostgres();
  const stops: (() => Promise<void>)[] = [() => postgres.stop()];
  const stopAll = async () => {
    for (const stop of stops.reverse()) await stop().catch(() => undefined);
  };
  try {
    const admin = new pg.Client({ connectionString: postgres.url });
    await admin.connect();
    await admin.query('CREATE DATABASE ebullio');
    await admin.end();
    const url = new URL(postgres.url);
    url.pathname = '/ebullio';
    const databaseUrl = url.toString();
    const redis = await startTestRedis();
    stops.push(() => redis.close());

    const env: Record<string, string> = {
      DATABASE_URL: databaseUrl,
      REDIS_URL: redis.url,
      // Every node signs sessions and hashes keys with the same secret.
      EBULLIO_SECRET: crypto.randomBytes(32).toString('base64url'),
      // One mail capture and one payment fake would be per node; the cluster runs without them.
      MAIL_CAPTURE: '0',
      FAKE_PAYMENTS: '0',
      ...options.env,
    };
    const ports: number[] = [];
    for (let i = 0; i < count; i++) ports.push(await freeLoopbackPort());
    const nodes: ClusterNode[] = [];
    const startNode = async (i: number) => {
      const name = `node${i + 1}`;
      const proc = startServerProcess({ ...env, PORT: String(ports[i]) }, { detached: true });
      if (options.onLog) {
        const forward = (d: Buffer) => {
          for (const line of d.toString().split('\n')) if (line) options.onLog!(name, line);
        };
        proc.child.stdout?.on('data', forward);
        proc.child.stderr?.on('data', forward);
      }
      stops.push(async () => {
        if (proc.child.exitCode === null && proc.child.signalCode === null) {
          proc.child.kill('SIGTERM');
          await proc.exited;
        }
      });
      const port = await proc.port;
      const node: ClusterNode = { name, port, url: `http://127.0.0.1:${port}`, process: proc };
      await readyz(node.url, 60_000);
      nodes[i] = node;
    };
    await startNode(0);
    await Promise.all(Array.from({ length: count - 1 }, (_, i) => startNode(i + 1)));

    const proxy = await startHaproxy(ports);
    stops.push(() => proxy.stop());
    await readyz(proxy.url, 10_000);
    return {
      url: proxy.url,
      nodes,
      databaseUrl,
      redisUrl: redis.url,
      postgres,
      redis,
      proxy,
      env,
      async kill(node) {
        if (node.process.child.exitCode !== null || node.process.child.signalCode !== null) return;
        node.process.child.kill('SIGKILL');
        await node.process.exited;
      },
      stop: stopAll,
    };
  } catch (err) {
    await stopAll();
    throw err;
  }
}
