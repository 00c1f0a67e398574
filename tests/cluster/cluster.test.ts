// Ebullio on three nodes behind HAProxy, sharing PostgreSQL and Redis (tests/support/cluster.ts,
// the layout of `npm run cluster`). What a customer of a several-node installation relies on:
// every 2xx is metered exactly once whichever node answered it, a quota holds across nodes, a rate
// limit is one limit, a revoked key is refused at once everywhere, a node killed under load loses
// no acknowledged request while the proxy routes around it, and a console session works on any node.
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startCluster, type Cluster } from '../support/cluster.js';
import { ensureConsoleBuilt } from '../support/console-build.js';
import { ConsoleSession } from '../support/console-session.js';
import { testPool } from '../support/postgres-server.js';

const ADMIN_EMAIL = 'cluster-admin@ebullio.invalid';
const ADMIN_PASSWORD = 'invented-cluster-password-2026';
/** One steam state costs 1 unit (shared/operations.ts). */
const STEAM_BODY = JSON.stringify({ pressure: 101.325, temperature: 80 });

let cluster: Cluster;
let db: pg.Pool;

let admin: ConsoleSession;

function newAccount(name: string, quota: number): Promise<number> {
  return admin.createAccount(name, quota);
}

function newKey(accountId: number, rateLimitPerMinute = 100_000): Promise<{ id: number; secret: string }> {
  return admin.createKey(accountId, ['steam'], rateLimitPerMinute);
}

function steam(base: string, secret: string, requestId?: string): Promise<Response> {
  return fetch(`${base}/v1/steam/state`, {
    method: 'POST',
    headers: {
      authorization: `Bearer ${secret}`,
      'content-type': 'application/json',
      ...(requestId ? { 'x-request-id': requestId } : {}),
    },
    body: STEAM_BODY,
  });
}

async function meteredRows(accountId: number): Promise<{ ok: number; units: number }> {
  const { rows } = await db.query<{ ok: string; units: string }>(
    `SELECT count(*) FILTER (WHERE status BETWEEN 200 AND 299) AS ok, coalesce(sum(units), 0) AS units
       FROM usage_events WHERE account_id = $1`,
    [accountId],
  );
  return { ok: Number(rows[0]!.ok), units: Number(rows[0]!.units) };
}

beforeAll(async () => {
  ensureConsoleBuilt();
  cluster = await startCluster({
    nodes: 3,
    env: { BOOTSTRAP_ADMIN_EMAIL: ADMIN_EMAIL, BOOTSTRAP_ADMIN_PASSWORD: ADMIN_PASSWORD },
  });
  db = testPool(cluster.databaseUrl, 2);
  admin = new ConsoleSession(cluster.url);
  await admin.signIn(ADMIN_EMAIL, ADMIN_PASSWORD);
}, 180_000);

afterAll(async () => {
  await db?.end();
  await cluster?.stop();
}, 60_000);

describe('three nodes behind HAProxy on PostgreSQL and Redis', () => {
  it('meters every 2xx of 32 concurrent clients exactly once, whichever node answered', async () => {
    const accountId = await newAccount('Invented Cluster Dairy', 1_000_000);
    const key = await newKey(accountId);
    const served = new Map<string, number>();
    let ok = 0;
    await Promise.all(
      Array.from({ length: 32 }, async () => {
        for (let i = 0; i < 10; i++) {
          const res = await steam(cluster.url, key.secret);
          await res.arrayBuffer();
          expect(res.status).toBe(200);
          ok += 1;
          const node = res.headers.get('x-ebullio-node') ?? 'unknown';
          served.set(node, (served.get(node) ?? 0) + 1);
        }
      }),
    );
    expect(ok).toBe(320);
    // Every node took a share (round robin), and the database holds one row per answer.
    expect([...served.keys()].sort()).toEqual(['node1', 'node2', 'node3']);
    expect(await meteredRows(accountId)).toEqual({ ok: 320, units: 320 });
  }, 120_000);

  it('never lets an account overshoot its quota across nodes', async () => {
    const quota = 40;
    const accountId = await newAccount('Invented Cluster Sugar Works', quota);
    const key = await newKey(accountId);
    const statuses: number[] = [];
    await Promise.all(
      Array.from({ length: 32 }, async () => {
        for (let i = 0; i < 4; i++) {
          const res = await steam(cluster.url, key.secret);
          await res.arrayBuffer();
          statuses.push(res.status);
        }
      }),
    );
    const accepted = statuses.filter((s) => s === 200).length;
    const refused = statuses.filter((s) => s === 429).length;
    expect(accepted + refused).toBe(128);
    // Exactly the quota was sold: none beyond it, and none refused while units remained.
    expect(accepted).toBe(quota);
    expect((await meteredRows(accountId)).units).toBe(quota);
  }, 120_000);

  it('enforces one rate limit for a key whichever node its requests reach', async () => {
    const accountId = await newAccount('Invented Cluster Brine Co', 1_000_000);
    const key = await newKey(accountId, 30);
    const statuses: number[] = [];
    // Spread evenly over the nodes directly, not through the proxy, so each node sees 20.
    for (let i = 0; i < 60; i++) {
      const res = await steam(cluster.nodes[i % 3]!.url, key.secret);
      await res.arrayBuffer();
      statuses.push(res.status);
    }
    expect(statuses.filter((s) => s === 200).length).toBe(30);
    expect(statuses.filter((s) => s === 429).length).toBe(30);
  }, 60_000);

  it('refuses a key revoked through one node at once on the others', async () => {
    const accountId = await newAccount('Invented Cluster Pulp Mill', 1_000_000);
    const key = await newKey(accountId);
    // Every node has seen (and cached) the key before the revocation.
    for (const node of cluster.nodes) expect((await steam(node.url, key.secret)).status).toBe(200);
    const revoked = await admin.call(
      'POST',
      `/console-api/keys/${key.id}/revoke`,
      undefined,
      cluster.nodes[0]!.url,
    );
    expect(revoked.status, await revoked.clone().text()).toBe(200);
    for (const node of cluster.nodes.slice(1)) expect((await steam(node.url, key.secret)).status).toBe(401);
  }, 60_000);

  it('keeps every acknowledged request when a node is killed under load, and routes around it', async () => {
    const accountId = await newAccount('Invented Cluster Caustic Plant', 1_000_000);
    const key = await newKey(accountId);
    const victim = cluster.nodes[1]!;
    const acknowledged = new Set<string>();
    const failed = new Set<string>();
    let sent = 0;
    let stop = false;
    const clients = Array.from({ length: 16 }, async () => {
      while (!stop) {
        const id = `kill-test-${++sent}`;
        try {
          const res = await steam(cluster.url, key.secret, id);
          await res.arrayBuffer();
          (res.status === 200 ? acknowledged : failed).add(id);
        } catch {
          failed.add(id);
        }
      }
    });
    await new Promise((r) => setTimeout(r, 1500));
    await cluster.kill(victim);
    const killedAt = acknowledged.size + failed.size;
    await new Promise((r) => setTimeout(r, 2500));
    stop = true;
    await Promise.all(clients);
    const counts = `acknowledged ${acknowledged.size}, failed ${failed.size}, at the kill ${killedAt}`;
    // Load kept flowing after the kill.
    expect(acknowledged.size + failed.size, counts).toBeGreaterThan(killedAt + 50);
    const { rows } = await db.query<{ request_id: string }>(
      'SELECT request_id FROM usage_events WHERE account_id = $1 AND status BETWEEN 200 AND 299',
      [accountId],
    );
    const metered = new Set(rows.map((r) => r.request_id));
    // Every 200 a client saw is metered; a metered request a client did not see answered can only
    // be one that failed for it (the node was killed between its commit and its answer).
    expect(
      [...acknowledged].filter((id) => !metered.has(id)),
      counts,
    ).toEqual([]);
    expect(
      [...metered].filter((id) => !acknowledged.has(id) && !failed.has(id)),
      counts,
    ).toEqual([]);
    // Only requests caught on the dying node may fail (HAProxy retries refused connections).
    expect(failed.size, counts).toBeLessThanOrEqual(16);
    // After the kill the proxy no longer sends anything to the dead node.
    for (let i = 0; i < 12; i++) {
      const res = await steam(cluster.url, key.secret);
      await res.arrayBuffer();
      expect(res.status).toBe(200);
      expect(res.headers.get('x-ebullio-node')).not.toBe(victim.name);
    }
  }, 120_000);

  it('serves the console through the proxy with a session valid on every node', async () => {
    const session = new ConsoleSession(cluster.url);
    await session.signIn(ADMIN_EMAIL, ADMIN_PASSWORD);
    const nodes = new Set<string>();
    for (let i = 0; i < 9; i++) {
      const res = await session.call('GET', '/console-api/accounts');
      expect(res.status).toBe(200);
      nodes.add(res.headers.get('x-ebullio-node') ?? 'unknown');
    }
    // Two nodes are alive after the previous test: the session worked on both.
    expect(nodes.size).toBeGreaterThanOrEqual(2);
    const page = await fetch(`${cluster.url}/console/`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('<div id="app"');
  }, 60_000);
});
