// API-key authentication: 401 variants (RFC 6750 §3: a 401 carries "WWW-Authenticate: Bearer"),
// 403 for a missing scope (RFC 9110 §15.5.4), revocation, rotation overlap and expiry.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { createKey, hashKey, revokeKey, rotateKey } from '../../server/accounts/keys.js';
import { readInstant } from '../../server/db/store.js';
import { makeHarness, usageRows } from './helpers.js';

const later = (d: Date, seconds: number) => new Date(d.getTime() + seconds * 1000);

describe('401 unauthorized', () => {
  it.each([
    ['missing', undefined, /No API key/],
    ['not a Bearer scheme', 'Basic dXNlcjpwYXNz', /not "Bearer <key>"/],
    ['too short to be a key', 'Bearer short', /not "Bearer <key>"/],
    ['unknown', `Bearer ebl_live_AAAAAAAAAAAA_${'B'.repeat(32)}`, /not recognised/],
  ])('refuses a %s key with 401, WWW-Authenticate: Bearer and a reason', async (_label, header, detail) => {
    const h = await makeHarness();
    const req = request(h.app).get('/v1/usage');
    const res = await (header === undefined ? req : req.set('Authorization', header));
    expect(res.status).toBe(401);
    expect(res.headers['www-authenticate']).toMatch(/^Bearer /); // RFC 6750 §3
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/); // RFC 9457 §3
    expect(res.body.type).toBe('/problems/unauthorized');
    expect(res.body.detail).toMatch(detail);
    expect(await usageRows(h.store)).toHaveLength(0); // no account is known, so nothing is metered
  });

  it('says "unknown", not "wrong secret", when a real public id comes with a wrong secret', async () => {
    const h = await makeHarness();
    const [, publicId] = h.token.split('.');
    const res = await request(h.app)
      .get('/v1/usage')
      .set('Authorization', `Bearer ebk1.${publicId}.${'Z'.repeat(32)}`);
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/not recognised/);
  });
});

describe('403 forbidden', () => {
  it('names the missing scope and is metered with 0 units', async () => {
    const h = await makeHarness({ scopes: ['steam'] });
    const res = await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${h.token}`);
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/forbidden');
    expect(res.body.detail).toContain('"usage"');
    expect(await usageRows(h.store)).toEqual([
      expect.objectContaining({ operation: 'usage.read', status: 403, units: 0 }),
    ]);
  });
});

describe('key lifecycle', () => {
  it('stores only the keyed hash, never the key', async () => {
    const h = await makeHarness();
    const [row] = await h.store.rows<Record<string, unknown>>(
      sql`SELECT * FROM api_keys WHERE id = ${h.keyId}`,
    );
    expect(Object.values(row!)).not.toContain(h.token);
    expect(row!.key_hash).toBe(hashKey(h.config.secret, h.token));
    // The generated format carries ≥ 128 random bits: 32 base62 characters ≈ 190 bits (common practice).
    expect(h.token).toMatch(/^ebk1\.[A-Za-z0-9]{12}\.[A-Za-z0-9]{32}$/);
  });

  it('keeps accepting a key of the first issued format (ebl_live_…) stored before ebk1', async () => {
    const h = await makeHarness();
    // Invented key of the earlier format (not real): stored, as every key is, as a hash of the whole.
    const legacy = `ebl_live_FirstFormat1_${'Q'.repeat(32)}`;
    await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'first format',
      scopes: ['usage'],
      now: h.clock.now,
      token: legacy,
    });
    const res = await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${legacy}`);
    expect(res.status).toBe(200);
  });

  it('refuses a revoked key on the very next request', async () => {
    const h = await makeHarness();
    const auth = `Bearer ${h.token}`;
    expect((await request(h.app).get('/v1/usage').set('Authorization', auth)).status).toBe(200);
    await revokeKey(h.store, h.keyId, h.clock.now);
    const res = await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/revoked/);
  });

  it('refuses a key from its expiry time on', async () => {
    const h = await makeHarness();
    const { token } = await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'short-lived',
      scopes: ['usage'],
      expiresAt: later(h.clock.now, 3600),
      now: h.clock.now,
    });
    const auth = `Bearer ${token}`;
    h.clock.now = later(h.clock.now, 3599);
    expect((await request(h.app).get('/v1/usage').set('Authorization', auth)).status).toBe(200);
    h.clock.now = later(h.clock.now, 1);
    const res = await request(h.app).get('/v1/usage').set('Authorization', auth);
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/expired/);
  });

  it('keeps the old key working during the rotation overlap window, then refuses it', async () => {
    const h = await makeHarness();
    const rotated = await rotateKey(h.store, h.config.secret, h.keyId, {
      now: h.clock.now,
      overlapSeconds: 600,
    });
    expect(rotated.key.rotatedFromId).toBe(h.keyId);
    expect(rotated.key.scopes).toEqual(expect.arrayContaining(['usage', 'steam']));
    const oldAuth = `Bearer ${h.token}`;
    const newAuth = `Bearer ${rotated.token}`;
    h.clock.now = later(h.clock.now, 599);
    expect((await request(h.app).get('/v1/usage').set('Authorization', oldAuth)).status).toBe(200);
    expect((await request(h.app).get('/v1/usage').set('Authorization', newAuth)).status).toBe(200);
    h.clock.now = later(h.clock.now, 1);
    const res = await request(h.app).get('/v1/usage').set('Authorization', oldAuth);
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/rotated/);
    expect((await request(h.app).get('/v1/usage').set('Authorization', newAuth)).status).toBe(200);
  });

  it('updates last_used_at when a key is used', async () => {
    const h = await makeHarness();
    await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${h.token}`);
    const [row] = await h.store.rows<{ last_used_at: unknown }>(
      sql`SELECT last_used_at FROM api_keys WHERE id = ${h.keyId}`,
    );
    expect(readInstant(row!.last_used_at).getTime()).toBe(h.clock.now.getTime());
  });
});
