// `npm run cluster`: Ebullio on several nodes on this machine — a throw-away PostgreSQL and Redis
// (Debian's postgresql and redis-server), three server processes and HAProxy (Debian's haproxy)
// in front, all on loopback ports — until Ctrl-C, which stops everything and removes the
// temporary folders. CLUSTER_NODES sets the number of nodes (1–8). The database starts empty each
// time: the first node seeds the demo data, as `npm start` does.
import { startCluster } from '../tests/support/cluster.js';

const requested = Number(process.env.CLUSTER_NODES ?? 3);
if (!Number.isInteger(requested) || requested < 1 || requested > 8) {
  console.error(`CLUSTER_NODES must be a whole number from 1 to 8, got "${process.env.CLUSTER_NODES}"`);
  process.exit(1);
}

console.log(`[cluster] starting PostgreSQL, Redis, ${requested} node(s) and HAProxy…`);
const cluster = await startCluster({
  nodes: requested,
  onLog: (node, line) => console.log(`[${node}] ${line}`),
});
console.log(`[cluster] PostgreSQL  ${cluster.databaseUrl}`);
console.log(`[cluster] Redis       ${cluster.redisUrl}`);
for (const node of cluster.nodes) console.log(`[cluster] ${node.name.padEnd(11)} ${node.url}`);
console.log(
  `[cluster] ready: ${cluster.url} (console at ${cluster.url}/console, docs at ${cluster.url}/docs)`,
);
console.log('[cluster] Ctrl-C stops everything.');

let stopping = false;
const stop = (signal: string) => {
  if (stopping) return;
  stopping = true;
  console.log(`[cluster] ${signal}: stopping the proxy, the nodes (draining), Redis and PostgreSQL…`);
  void cluster.stop().then(() => {
    console.log('[cluster] stopped');
    process.exit(0);
  });
};
process.on('SIGINT', () => stop('SIGINT'));
process.on('SIGTERM', () => stop('SIGTERM'));
