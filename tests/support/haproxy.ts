// A throw-away HAProxy (Debian's `haproxy` package) in front of several Ebullio nodes, on a free
// loopback port, with its configuration in a temporary folder. Used by `npm run cluster` and the
// cluster suite. When the binary is missing it fails with the package to install.
//
// Routing, and why:
// - round robin over the nodes, each checked with GET /readyz every 250 ms: a node that fails one
//   check (killed, draining, database unreachable) gets nothing new until two checks pass again;
// - `retry-on conn-failure` with `option redispatch`: a request that could not be handed to a node
//   at all (refused connection: the node just died) goes to another node. Nothing is retried once
//   a node has the request — a POST that reached a node may have been calculated and metered there,
//   and sending it again would charge twice; the client gets the 502 and decides (an
//   Idempotency-Key makes that retry safe);
// - no stickiness: console sessions and API keys are valid on every node (shared database).
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net, { type AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';

const CANDIDATES = [process.env.HAPROXY_BIN, '/usr/sbin/haproxy', 'haproxy'].filter(
  (c): c is string => typeof c === 'string' && c !== '',
);

export const HAPROXY_MISSING =
  'haproxy was not found (looked in HAPROXY_BIN, /usr/sbin and PATH): the cluster needs a reverse proxy. ' +
  'Install it with: apt-get install -y haproxy';

export function findHaproxy(): string {
  for (const bin of CANDIDATES) {
    const r = spawnSync(bin, ['-v'], { encoding: 'utf8' });
    if (r.status === 0) return bin;
  }
  throw new Error(HAPROXY_MISSING);
}

export async function freeLoopbackPort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', resolve);
  });
  const { port } = server.address() as AddressInfo;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

export interface Proxy {
  port: number;
  url: string;
  stop(): Promise<void>;
}

/** The HAProxy configuration for nodes on these loopback ports. */
export function haproxyConfig(listenPort: number, nodePorts: readonly number[]): string {
  const servers = nodePorts.map((p, i) => `  server node${i + 1} 127.0.0.1:${p} check`).join('\n');
  return `global
  maxconn 4096

defaults
  mode http
  timeout connect 2s
  timeout client 120s
  timeout server 120s
  timeout http-request 30s
  # Keep-alive on both sides: connections to the nodes are reused (HAProxy's safe reuse).
  retries 3
  option redispatch 1
  retry-on conn-failure

frontend ebullio
  bind 127.0.0.1:${listenPort}
  default_backend nodes

backend nodes
  balance roundrobin
  # Which node answered: for operators reading a trace, and for the cluster suite.
  http-response set-header X-Ebullio-Node %[srv_name]
  option httpchk GET /readyz
  http-check expect status 200
  default-server inter 250ms fastinter 100ms downinter 250ms fall 1 rise 2
${servers}
`;
}

async function waitForPort(port: number, child: ChildProcess, output: () => string): Promise<void> {
  const deadline = Date.now() + 10_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`haproxy exited (${child.exitCode}): ${output()}`);
    const ok = await new Promise<boolean>((resolve) => {
      const socket = net.connect(port, '127.0.0.1');
      socket.once('connect', () => {
        socket.destroy();
        resolve(true);
      });
      socket.once('error', () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`haproxy did not listen on port ${port} within 10 s: ${output()}`);
}

/** Starts HAProxy in the foreground (-db) in front of `nodePorts`. */
export async function startHaproxy(nodePorts: readonly number[]): Promise<Proxy> {
  const bin = findHaproxy();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-proxy-'));
  const port = await freeLoopbackPort();
  const configFile = path.join(dir, 'haproxy.cfg');
  fs.writeFileSync(configFile, haproxyConfig(port, nodePorts));
  const check = spawnSync(bin, ['-c', '-f', configFile], { encoding: 'utf8' });
  if (check.status !== 0)
    throw new Error(`haproxy refused its configuration: ${check.stdout}${check.stderr}`);
  let log = '';
  const child = spawn(bin, ['-db', '-f', configFile], { stdio: ['ignore', 'pipe', 'pipe'] });
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  await waitForPort(port, child, () => log.slice(-2000));
  return {
    port,
    url: `http://127.0.0.1:${port}`,
    async stop() {
      if (child.exitCode === null) {
        await new Promise<void>((resolve) => {
          child.once('exit', () => resolve());
          child.kill('SIGTERM');
        });
      }
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
