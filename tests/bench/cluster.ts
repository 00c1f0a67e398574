/**
 * Cluster benchmark: the throughput of three nodes behind HAProxy (PostgreSQL and Redis shared,
 * tests/support/cluster.ts) against one node of the same cluster reached directly, with the same
 * metered request (a steam state, 1 unit) and the same number of connections. Each node is one
 * process with one main thread, so nodes scale with the cores left free by PostgreSQL, Redis and
 * the proxy: the figure printed per core says how much of a core each node turns into requests.
 * Run alone: `npx tsx tests/bench/cluster.ts`.
 */
import os from 'node:os';
import { pathToFileURL } from 'node:url';
import autocannon from 'autocannon';
import { startCluster } from '../support/cluster.js';
import { ConsoleSession } from '../support/console-session.js';

const CONNECTIONS = 32;
const ROUND_S = 6;
const ADMIN_EMAIL = 'bench-admin@ebullio.invalid';
const ADMIN_PASSWORD = 'invented-bench-password-2026';

async function rate(url: string, secret: string): Promise<{ rps: number; p99: number; non2xx: number }> {
  const result = await autocannon({
    url: `${url}/v1/steam/state`,
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${secret}` },
    body: JSON.stringify({ pressure: 101.325, temperature: 80 }),
    connections: CONNECTIONS,
    duration: ROUND_S,
  });
  return { rps: result.requests.average, p99: result.latency.p99, non2xx: result.non2xx + result.errors };
}

export interface ClusterBenchResult {
  oneNodeRps: number;
  clusterRps: number;
  cores: number;
}

export async function runClusterBench(): Promise<ClusterBenchResult> {
  const cores = os.availableParallelism();
  const cluster = await startCluster({
    nodes: 3,
    env: {
      BOOTSTRAP_ADMIN_EMAIL: ADMIN_EMAIL,
      BOOTSTRAP_ADMIN_PASSWORD: ADMIN_PASSWORD,
      ENGINE_WORKERS: '0',
    },
  });
  try {
    const admin = new ConsoleSession(cluster.url);
    await admin.signIn(ADMIN_EMAIL, ADMIN_PASSWORD);
    const accountId = await admin.createAccount('Invented Bench Refinery', 100_000_000);
    const key = await admin.createKey(accountId, ['steam']);
    // Warm every node (JIT, key cache, month totals) before measuring.
    await rate(cluster.url, key.secret);
    const one = await rate(cluster.nodes[0]!.url, key.secret);
    const three = await rate(cluster.url, key.secret);
    const usable = Math.min(cluster.nodes.length, cores);
    console.log(
      `one node, direct:            ${one.rps.toFixed(0)} req/s, p99 ${one.p99} ms, ${one.non2xx} non-2xx (${CONNECTIONS} connections, ${ROUND_S} s)`,
    );
    console.log(
      `three nodes through HAProxy: ${three.rps.toFixed(0)} req/s, p99 ${three.p99} ms, ${three.non2xx} non-2xx`,
    );
    console.log(
      `cluster / one node: ${(three.rps / one.rps).toFixed(2)} on ${cores} core(s) shared by 3 nodes, PostgreSQL, Redis, HAProxy and the load generator`,
    );
    console.log(
      `per-core efficiency: ${((three.rps / one.rps / usable) * 100).toFixed(0)} % of one node per core the nodes could use (${usable})`,
    );
    console.log(
      `expected on a larger machine: about nodes × ${one.rps.toFixed(0)} req/s while each node has a core of its own and PostgreSQL keeps up (every metered request is one group-committed transaction there)`,
    );
    return { oneNodeRps: one.rps, clusterRps: three.rps, cores };
  } finally {
    await cluster.stop();
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runClusterBench();
}
