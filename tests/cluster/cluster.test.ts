// Ebullio on three nodes behind HAProxy, sharing PostgreSQL and Redis (tests/support/cluster.ts,
// the layout of `npm run cluster`). What a customer of a several-node installation relies on:
// every 2xx is metered exactly once whichever node answered it, a quota holds across nodes, a rate
// limit is one limit, a revoked key is refused at once everywhere, a node killed under load loses
// no acknowledged request while the proxy routes around it, and a console session works on any node.
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startCluster, type Cluster } from '../support/cluster.js';
import { ensureConsoleBuilt } from '../support/console-build.js';

const ADMIN_EMAIL = 'cluster-admin@ebullio.invalid';
const ADMIN_PASSWORD = 'invented-cluster-password-2026';
/** One steam state costs 1 unit (shared/operations.ts). */
const STEAM_BODY = JSON.stringify({ pressure: 101.325, temperature: 80 });

let cluster: Cluster;
let db: pg.Pool;

/** A console session through `base`: cookies kept by hand, CSRF token sent on writes. */
class ConsoleSession {
  private cookies = new Map<string, string>();
  private csrf = '';
  constructor(private base: string) {}
  private take(res: Response): void {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair!.indexOf('=');
      this.cookies.set(pair!.slice(0, eq), decodeURIComponent(pair!.slice(eq + 1)));
    }
    const token = this.cookies.get('ebullio_csrf');
    if (token) this.csrf = token;
  }
  private header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${encodeURIComponent(v)}`).join('; ');
  }
  async call(method: string, path: string, body?: unknown, base = this.base): Promise<Response> {
    const res = await fetch(`${base}${path}`, {
      method,
      headers: {
        cookie: this.header(),
        'x-csrf-token': this.csrf,
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    this.take(res);
    return res;
  }
  async signIn(): Promise<void> {
    const csrf = await this.call('GET', '/console-api/auth/csrf');
    this.csrf = ((await csrf.json()) as { csrfToken: string }).csrfToken;
    const res = await this.call('POST', '/console-api/auth/sign-in', {
      email: ADMIN_EMAIL,
      password: ADMIN_PASSWORD,
    });
    expect(res.status, await res.clone().text()).toBe(200);
  }
}

let admin: ConsoleSession;

async function newAccount(name: string, quota: number): Promise<number> {
  const res = await admin.call('POST', '/console-api/accounts', {
    name,
    plan: 'starter',
    monthlyUnitQuota: quota,
  });
  expect(res.status, await res.clone().text()).toBe(201);
  return ((await res.json()) as { id: number }).id;
}

async function newKey(
  accountId: number,
  rateLimitPerMinute = 100_000,
): Promise<{ id: number; secret: string }> {
  const res = await admin.call('POST', '/console-api/keys', {
    accountId,
    name: 'cluster key',
    scopes: ['steam'],
    rateLimitPerMinute,
  });
  expect(res.status, await res.clone().text()).toBe(201);
  const body = (await res.json()) as { key: { id: number }; secret: string };
  return { id: body.key.id, secret: body.secret };
}

function steam(base: string, secret: string): Promise<Response> {
  return fetch(`${base}/v1/steam/state`, {
    method: 'POST',
    headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/json' },
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
  db = new pg.Pool({ connectionString: cluster.databaseUrl, max: 2 });
  admin = new ConsoleSession(cluster.url);
  await admin.signIn();
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
    let acknowledged = 0;
    let failed = 0;
    let stop = false;
    const clients = Array.from({ length: 16 }, async () => {
      while (!stop) {
        try {
          const res = await steam(cluster.url, key.secret);
          await res.arrayBuffer();
          if (res.status === 200) acknowledged += 1;
          else failed += 1;
        } catch {
          failed += 1;
        }
      }
    });
    await new Promise((r) => setTimeout(r, 1500));
    await cluster.kill(victim);
    const killedAt = acknowledged + failed;
    await new Promise((r) => setTimeout(r, 2500));
    stop = true;
    await Promise.all(clients);
    // Load kept flowing after the kill, and every 200 a client saw is in the database.
    expect(acknowledged + failed).toBeGreaterThan(killedAt + 50);
    expect((await meteredRows(accountId)).ok).toBe(acknowledged);
    // Only requests caught on the dying node may fail (HAProxy retries refused connections).
    expect(failed).toBeLessThanOrEqual(16);
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
    await session.signIn();
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
