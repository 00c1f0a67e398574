// A request refused with 401 for a known key (revoked, expired, rotated) is logged, unmetered,
// under the key's account, so a developer debugging the 401 finds it in the console's request
// log; an unknown key names no account and is not logged.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKey, revokeKey } from '../../server/accounts/keys.js';
import { makeConsoleHarness, type ConsoleHarness } from '../console-api/data-harness.js';

let h: ConsoleHarness;
beforeAll(async () => {
  h = await makeConsoleHarness();
});
afterAll(async () => {
  await h.close();
});

async function key(accountId: number, expiresAt?: Date) {
  return await createKey(h.deps.store, h.deps.config.secret, {
    accountId,
    name: 'k',
    scopes: ['steam'],
    now: h.clock.now,
    ...(expiresAt ? { expiresAt } : {}),
  });
}

const logRows = () =>
  h.deps.store.rows<{ account_id: number | null; key_id: number | null; status: number; path: string }>(
    sql`SELECT account_id, key_id, status, path FROM request_log ORDER BY id`,
  );
const usageCount = async () =>
  Number(
    (await h.deps.store.rows<{ n: number | string }>(sql`SELECT COUNT(*) AS n FROM usage_events`))[0]!.n,
  );

describe('401 for a known key', () => {
  it('logs a revoked key’s 401 under its account with no usage event, and the console shows it to the account’s developer', async () => {
    const { key: k, token } = await key(h.alphaId);
    await revokeKey(h.deps.store, k.id, h.clock.now);
    const before = (await logRows()).length;
    const res = await request(h.app)
      .post('/v1/steam/saturation')
      .set('Authorization', `Bearer ${token}`)
      .send({ pressure: 100 });
    expect(res.status).toBe(401);
    const rows = (await logRows()).slice(before);
    expect(rows).toEqual([
      { account_id: h.alphaId, key_id: k.id, status: 401, path: '/v1/steam/saturation' },
    ]);
    expect(await usageCount()).toBe(0);

    const page = await h.developer.agent.get('/console-api/request-log?status=401').expect(200);
    const items = page.body.items as { status: number; accountId: number; units: number | null }[];
    expect(items).toContainEqual(expect.objectContaining({ status: 401, accountId: h.alphaId }));
    // Unmetered: no units beside it.
    expect(items.find((i) => i.status === 401)?.units ?? 0).toBe(0);
  });

  it('logs an expired key’s 401 too', async () => {
    const { key: k, token } = await key(h.alphaId, new Date(h.clock.now.getTime() + 1000));
    h.clock.now = new Date(h.clock.now.getTime() + 2000);
    const res = await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${token}`);
    expect(res.status).toBe(401);
    expect(res.body.detail).toContain('expired');
    expect((await logRows()).at(-1)).toMatchObject({ key_id: k.id, status: 401 });
  });

  it('does not show another account’s refused key to a developer of this account', async () => {
    const { key: k, token } = await key(h.betaId);
    await revokeKey(h.deps.store, k.id, h.clock.now);
    await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${token}`).expect(401);
    expect((await logRows()).at(-1)).toMatchObject({ account_id: h.betaId, status: 401 });
    const page = await h.developer.agent.get('/console-api/request-log?status=401').expect(200);
    for (const item of page.body.items as { accountId: number }[]) expect(item.accountId).toBe(h.alphaId);
  });

  it('keeps a key-shaped path segment out of the logged 401', async () => {
    const { key: k, token } = await key(h.alphaId);
    await revokeKey(h.deps.store, k.id, h.clock.now);
    await request(h.app)
      .post(`/v1/liquors/${token}/boiling-point`)
      .set('Authorization', `Bearer ${token}`)
      .send({ massFraction: 0.1, pressure: 100 })
      .expect(401);
    const row = (await logRows()).at(-1)!;
    expect(row.status).toBe(401);
    expect(row.path).not.toContain(token);
    expect(row.path).not.toContain(token.slice(-20));
  });
});

describe('401 for an unknown key', () => {
  it('logs nothing: the key names no account to show it to', async () => {
    // A well-formed token no key has: an issued token with its last character changed.
    const { token } = await key(h.alphaId);
    const unknown = token.slice(0, -1) + (token.endsWith('A') ? 'B' : 'A');
    const before = (await logRows()).length;
    const res = await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${unknown}`);
    expect(res.status).toBe(401);
    expect(res.body.detail).toContain('not recognised');
    expect(await logRows()).toHaveLength(before);
  });
});
