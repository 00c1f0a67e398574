// The stored request log never keeps an API key, wherever the client put it: in the path, the
// query, a JSON property name or value, as the bare secret part of an issued key, in a CSV body,
// in X-Request-Id, or as a key of the other accepted format (a registered bootstrap key: any 32–256
// characters of [A-Za-z0-9_.-], server/config.ts). Each test reads the row back from the database
// and checks that no 8-character piece of the secret survives in any column.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { createKey, KEY_SHAPED_PATTERN, secretPartOf } from '../../server/accounts/keys.js';
import { logBody, REDACTED } from '../../server/accounts/request-log.js';
import { makeHarness, type Harness } from './helpers.js';

/** Invented keys of the bootstrap form (not real): mixed text, and 64 hex digits. */
const BOOTSTRAP_KEYS = [
  'Boot.Strap-Key_q7Zk3Lw9Xv2Rt8Yp4Nm6Hs1Jd5Fg0Ca',
  '9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08',
];

async function loggedRows(h: Harness): Promise<string> {
  return JSON.stringify(
    await h.store.rows(sql`SELECT request_id, method, path, request_body, response_body FROM request_log`),
  );
}

/** True if any 8-character piece of `secret` appears in `text`. */
function leaks(text: string, secret: string): boolean {
  for (let i = 0; i + 8 <= secret.length; i++) if (text.includes(secret.slice(i, i + 8))) return true;
  return false;
}

async function expectNoSecret(h: Harness, secret: string): Promise<void> {
  const rows = await loggedRows(h);
  expect(rows).not.toBe('[]');
  expect(leaks(rows, secret)).toBe(false);
}

describe('request log redaction of an issued key', () => {
  const setup = async () => {
    const h = await makeHarness({ retain: true });
    const secret = secretPartOf(h.token)!;
    expect(secret).toHaveLength(32); // format documented in server/accounts/keys.ts
    return { h, secret, auth: `Bearer ${h.token}` };
  };

  it('keeps no key sent in the URL path, in the log or in the problem instance', async () => {
    const { h, secret, auth } = await setup();
    const res = await request(h.app).get(`/v1/liquors/${h.token}`).set('Authorization', auth);
    expect(res.status).toBe(422); // not a liquor id: too long for the id pattern
    expect(res.body.instance).toBe(`/v1/liquors/${REDACTED}`);
    await expectNoSecret(h, secret);
    expect(await h.store.rows(sql`SELECT path FROM request_log`)).toEqual([
      { path: `/v1/liquors/${REDACTED}` },
    ]);
  });

  it('keeps no key sent in the query string', async () => {
    const { h, secret, auth } = await setup();
    const res = await request(h.app)
      .get(`/v1/steam/saturation?pressure=${h.token}`)
      .set('Authorization', auth);
    expect(res.status).toBe(422);
    await expectNoSecret(h, secret);
  });

  it('keeps no key sent as a JSON property name', async () => {
    const { h, secret, auth } = await setup();
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', auth)
      .send({ pressure: '100 kPa', temperature: 20, [h.token]: 1 });
    expect(res.status).toBe(422);
    await expectNoSecret(h, secret);
  });

  it('keeps no key sent as a JSON value', async () => {
    const { h, secret, auth } = await setup();
    await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', auth)
      .send({ pressure: h.token, temperature: 20 });
    await expectNoSecret(h, secret);
  });

  it('keeps no bare secret part, as a value or as a property name', async () => {
    const { h, secret, auth } = await setup();
    await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', auth)
      .send({ pressure: `${secret} kPa`, temperature: 20, [secret]: secret });
    await expectNoSecret(h, secret);
  });

  it('keeps no key sent in a CSV body', async () => {
    const { h, secret, auth } = await setup();
    await request(h.app)
      .post('/v1/batch?operation=steam-state')
      .set('Authorization', auth)
      .set('Content-Type', 'text/csv')
      .send(`pressure,temperature\n${h.token},20\n`);
    await expectNoSecret(h, secret);
  });

  it('replaces an X-Request-Id that carries the key, and keeps a UUID the client chose', async () => {
    const { h, secret, auth } = await setup();
    const res = await request(h.app)
      .get('/v1/usage')
      .set('Authorization', auth)
      .set('X-Request-Id', `trace-${secret}`);
    expect(res.status).toBe(200);
    expect(leaks(res.headers['x-request-id'] as string, secret)).toBe(false);
    await expectNoSecret(h, secret);
    const uuid = '0f8fad5b-d9cb-469f-a165-70867728950e';
    const kept = await request(h.app).get('/v1/usage').set('Authorization', auth).set('X-Request-Id', uuid);
    expect(kept.headers['x-request-id']).toBe(uuid);
  });
});

describe.each(BOOTSTRAP_KEYS)('request log redaction of the bootstrap-format key %s', (bootKey) => {
  const setup = async () => {
    const h = await makeHarness({ retain: true });
    await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'Bootstrap key (BOOTSTRAP_API_KEY)',
      scopes: ['steam', 'liquors', 'usage'],
      now: h.clock.now,
      token: bootKey,
    });
    return h;
  };

  it('keeps no trace of it when it is the presented key, in the path, a name and a value', async () => {
    const h = await setup();
    const auth = `Bearer ${bootKey}`;
    const byPath = await request(h.app).get(`/v1/liquors/${bootKey}`).set('Authorization', auth);
    expect([404, 422]).toContain(byPath.status);
    // The answer may echo the caller's own input back to it; its instance and the log may not.
    expect(byPath.body.instance).toBe(`/v1/liquors/${REDACTED}`);
    await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', auth)
      .send({ pressure: bootKey, temperature: 20, [bootKey]: 1 });
    await expectNoSecret(h, bootKey);
  });

  it('keeps no trace of it when another key sends it in a body (known only by its shape)', async () => {
    const h = await setup();
    await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .send({ pressure: `${bootKey} kPa`, temperature: 20, note: { [bootKey]: [bootKey] } });
    await expectNoSecret(h, bootKey);
  });
});

describe('the key-shape pattern', () => {
  it('matches every key format accepted: issued keys, their bare secrets, and bootstrap-form keys', async () => {
    const h = await makeHarness();
    for (const key of [h.token, secretPartOf(h.token)!, ...BOOTSTRAP_KEYS]) {
      expect(key.replace(KEY_SHAPED_PATTERN, '')).toBe('');
    }
  });

  it('matches both issued formats whole, the current ebk1. and the first ebl_<kind>_, inside text', () => {
    // Invented keys (not real): the current format, a later version, and the first format.
    const keys = [
      `ebk1.${'P'.repeat(12)}.${'s'.repeat(32)}`,
      `ebk2.${'P'.repeat(12)}.${'s'.repeat(40)}`,
      `ebl_live_${'P'.repeat(12)}_${'s'.repeat(32)}`,
      `ebl_test_${'P'.repeat(12)}_${'s'.repeat(32)}`,
    ];
    for (const key of keys) {
      expect(`see ${key}, then`.replace(KEY_SHAPED_PATTERN, 'X')).toBe('see X, then');
    }
    expect(secretPartOf(keys[0]!)).toBe('s'.repeat(32));
    expect(secretPartOf(keys[2]!)).toBe('s'.repeat(32));
  });

  it('keeps no key of the first issued format that its holder sends in the path and body', async () => {
    const h = await makeHarness({ retain: true });
    const legacy = `ebl_live_FirstFormat1_${'Rq7'.repeat(10)}Zx`; // invented, not real
    await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'first format',
      scopes: ['steam', 'liquors'],
      now: h.clock.now,
      token: legacy,
    });
    await request(h.app).get(`/v1/liquors/${legacy}`).set('Authorization', `Bearer ${legacy}`);
    await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${legacy}`)
      .send({ pressure: `${secretPartOf(legacy)!} kPa`, temperature: 20, [legacy]: 1 });
    await expectNoSecret(h, secretPartOf(legacy)!);
  });

  it('keeps long message codes and field names, and still removes a key-length run of mixed characters', () => {
    const body = {
      warnings: [{ code: 'caustic-stress-corrosion-cracking' }],
      condensateFilmReynoldsNumberAtBottom: 1800,
      // Invented bootstrap-form secret (not real): digits and capitals, 36 characters.
      note: 'kQ7rT2xW9pL4mZ8vB3nH6jF1dS5gA0cE-yUu',
    };
    expect(JSON.parse(logBody(body, 8192)!)).toEqual({
      warnings: [{ code: 'caustic-stress-corrosion-cracking' }],
      condensateFilmReynoldsNumberAtBottom: 1800,
      note: REDACTED,
    });
  });

  it('logs a body it cannot serialise as a note instead of throwing', () => {
    const cyclic: Record<string, unknown> = { pressure: '1 bar' };
    cyclic.self = { again: cyclic };
    const arr: unknown[] = [];
    let node = arr;
    for (let i = 0; i < 100_000; i++) node = (node[0] = []) as unknown[];
    expect(logBody(cyclic, 8192)).toMatch(/^\{"pressure":"1 bar"/);
    expect(() => logBody(arr, 8192)).not.toThrow();
  });
});
