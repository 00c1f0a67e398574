// Console key routes: list, create (secret once, stored first), revoke, rotate with overlap;
// developer scoping by membership; mail to the account's billing e-mail.
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { authenticateToken, createKey } from '../../server/accounts/keys.js';
import { scopes as serverScopes } from '../../server/accounts/operations.js';
import { KEY_SCOPES } from '../../shared/console/keys.js';
import { makeConsoleHarness, type ConsoleHarness } from './data-harness.js';

let h: ConsoleHarness;
beforeAll(async () => {
  h = await makeConsoleHarness();
});
afterAll(async () => {
  await h.close();
});

const body = (accountId: number) => ({
  accountId,
  name: 'plant historian',
  scopes: ['steam', 'liquors'],
  rateLimitPerMinute: 120,
});

describe('POST /console-api/keys', () => {
  it('returns the secret once, after the key is stored: the secret authenticates at once', async () => {
    const res = await h.developer.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.developer.csrf)
      .send(body(h.alphaId))
      .expect(201);
    const secret = res.body.secret as string;
    // Key format documented in server/accounts/keys.ts: ebk1.<12 base62>.<32 base62>.
    expect(secret).toMatch(/^ebk1\.[A-Za-z0-9]{12}\.[A-Za-z0-9]{32}$/);
    expect(res.body.key).toMatchObject({
      accountId: h.alphaId,
      state: 'active',
      scopes: ['steam', 'liquors'],
      rateLimitPerMinute: 120,
    });
    expect(secret.startsWith(res.body.key.prefix)).toBe(true);
    const auth = await authenticateToken(h.deps.store, h.deps.config.secret, secret, h.clock.now);
    expect(auth.ok).toBe(true);
    // The secret itself is not stored anywhere in the row (only its HMAC).
    const { apiKeys } = h.deps.store.t;
    const [row] = await h.deps.store.db.select().from(apiKeys).where(eq(apiKeys.id, res.body.key.id));
    expect(JSON.stringify(row)).not.toContain(secret.slice(-32));
    // Listing never shows it again.
    const list = await h.developer.agent.get(`/console-api/keys?accountId=${h.alphaId}`).expect(200);
    expect(JSON.stringify(list.body)).not.toContain(secret.slice(-32));
  });

  it('mails key-created to the account’s billing e-mail without the secret', async () => {
    const res = await h.admin.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.admin.csrf)
      .send(body(h.alphaId))
      .expect(201);
    const logged = (await h.deps.store.db.select().from(h.deps.store.t.mailLog)).filter(
      (m) => m.kind === 'key-created',
    );
    expect(logged.length).toBeGreaterThanOrEqual(1);
    expect(logged.at(-1)).toMatchObject({ to: 'ops@alpha.invalid', status: 'sent' });
    const captured = (await h.deps.store.db.select().from(h.deps.store.t.capturedMail)).at(-1)!;
    expect(captured.to).toContain('ops@alpha.invalid');
    expect(captured.raw).not.toContain((res.body.secret as string).slice(-32));
  });

  it('sends no mail when the account has no billing e-mail', async () => {
    const before = (await h.deps.store.db.select().from(h.deps.store.t.mailLog)).length;
    await h.admin.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.admin.csrf)
      .send(body(h.betaId))
      .expect(201);
    expect((await h.deps.store.db.select().from(h.deps.store.t.mailLog)).length).toBe(before);
  });

  it('refuses a developer for an account they are not a member of, and billing users', async () => {
    const dev = await h.developer.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.developer.csrf)
      .send(body(h.betaId));
    expect(dev.status).toBe(403);
    await h.billing.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.billing.csrf)
      .send(body(h.alphaId))
      .expect(403);
  });

  it('rejects an unknown scope, a rate limit of 0 and an expiry in the past with field paths', async () => {
    const res = await h.admin.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ ...body(h.alphaId), scopes: ['steam', 'root'], rateLimitPerMinute: 0 })
      .expect(422);
    const fields = (res.body.errors as { field: string }[]).map((e) => e.field).sort();
    expect(fields).toEqual(['rateLimitPerMinute', 'scopes[1]']);
    const past = await h.admin.agent
      .post('/console-api/keys')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ ...body(h.alphaId), expiresAt: '2031-03-14T09:00:00Z' })
      .expect(422);
    expect(past.body.errors[0].field).toBe('expiresAt');
  });

  it('offers exactly the scopes of the server’s operation catalogue', () => {
    expect([...KEY_SCOPES]).toEqual([...serverScopes]);
  });
});

describe('GET /console-api/keys', () => {
  it('shows a developer only the keys of accounts they are a member of', async () => {
    const res = await h.developer.agent.get('/console-api/keys').expect(200);
    const accounts = new Set((res.body.items as { accountId: number }[]).map((k) => k.accountId));
    expect([...accounts]).toEqual([h.alphaId]);
    await h.developer.agent.get(`/console-api/keys?accountId=${h.betaId}`).expect(403);
    const all = await h.billing.agent.get('/console-api/keys').expect(200);
    expect(new Set((all.body.items as { accountId: number }[]).map((k) => k.accountId)).size).toBe(2);
  });
});

describe('POST /console-api/keys/:id/revoke', () => {
  it('revokes at once (the next authentication says revoked), audits and mails, and is idempotent', async () => {
    const { key, token } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'to revoke',
      scopes: ['steam'],
      now: h.clock.now,
    });
    const mails = (await h.deps.store.db.select().from(h.deps.store.t.mailLog)).length;
    const res = await h.developer.agent
      .post(`/console-api/keys/${key.id}/revoke`)
      .set('X-CSRF-Token', h.developer.csrf)
      .expect(200);
    expect(res.body.key.state).toBe('revoked');
    expect(await authenticateToken(h.deps.store, h.deps.config.secret, token, h.clock.now)).toMatchObject({
      ok: false,
      reason: 'revoked',
    });
    expect(
      (await h.deps.store.db.select().from(h.deps.store.t.auditLog)).filter(
        (a) => a.action === 'key.revoke' && a.targetId === String(key.id),
      ),
    ).toHaveLength(1);
    expect(
      (await h.deps.store.db.select().from(h.deps.store.t.mailLog)).filter((m) => m.kind === 'key-revoked'),
    ).toHaveLength(1);
    await h.developer.agent
      .post(`/console-api/keys/${key.id}/revoke`)
      .set('X-CSRF-Token', h.developer.csrf)
      .expect(200);
    expect((await h.deps.store.db.select().from(h.deps.store.t.mailLog)).length).toBe(mails + 1);
  });

  it('answers 403 for another account’s key and 404 for an unknown key', async () => {
    const { key } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.betaId,
      name: 'beta',
      scopes: ['steam'],
      now: h.clock.now,
    });
    await h.developer.agent
      .post(`/console-api/keys/${key.id}/revoke`)
      .set('X-CSRF-Token', h.developer.csrf)
      .expect(403);
    await h.admin.agent.post('/console-api/keys/99999/revoke').set('X-CSRF-Token', h.admin.csrf).expect(404);
  });
});

describe('POST /console-api/keys/:id/rotate', () => {
  it('issues a successor now and keeps the old key valid until the overlap ends', async () => {
    const { key, token } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'rotating',
      scopes: ['steam'],
      now: h.clock.now,
    });
    const res = await h.developer.agent
      .post(`/console-api/keys/${key.id}/rotate`)
      .set('X-CSRF-Token', h.developer.csrf)
      .send({ overlapSeconds: 3600 })
      .expect(201);
    expect(res.body.key.rotatedFromId).toBe(key.id);
    // 10:00 + 3600 s = 11:00 (arithmetic on the harness clock).
    expect(res.body.previous).toMatchObject({
      id: key.id,
      state: 'expiring',
      expiresAt: '2031-03-14T11:00:00.000Z',
    });
    const secret = res.body.secret as string;
    expect((await authenticateToken(h.deps.store, h.deps.config.secret, secret, h.clock.now)).ok).toBe(true);
    expect(
      (await authenticateToken(h.deps.store, h.deps.config.secret, token, new Date('2031-03-14T10:59:59Z')))
        .ok,
    ).toBe(true);
    expect(
      await authenticateToken(h.deps.store, h.deps.config.secret, token, new Date('2031-03-14T11:00:00Z')),
    ).toMatchObject({ ok: false, reason: 'rotated' });
  });

  it('refuses to rotate a revoked key (409) and an overlap beyond 30 days (422)', async () => {
    const { key } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'r',
      scopes: ['steam'],
      now: h.clock.now,
    });
    await h.admin.agent
      .post(`/console-api/keys/${key.id}/rotate`)
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ overlapSeconds: 30 * 86400 + 1 })
      .expect(422);
    await h.admin.agent
      .post(`/console-api/keys/${key.id}/revoke`)
      .set('X-CSRF-Token', h.admin.csrf)
      .expect(200);
    await h.admin.agent
      .post(`/console-api/keys/${key.id}/rotate`)
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ overlapSeconds: 60 })
      .expect(409);
  });
});
