// Refused API keys are limited per client address: after KEY_FAILURE_LIMIT refused keys in a
// window, the address gets 429 'rate-limited' with Retry-After until the window ends. Only
// failures count. Sources: OWASP Authentication cheat sheet (limit failed authentication attempts;
// common practice); RFC 6585 §4 (429) and RFC 9110 §10.2.3 (Retry-After); RFC 9457.
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { KEY_FAILURE_LIMIT, KEY_FAILURE_WINDOW_MS } from '../../server/http/middleware/auth.js';
import { makeHarness } from './helpers.js';

const WRONG = `Bearer ebl_live_AAAAAAAAAAAA_${'B'.repeat(32)}`;

describe('refused API keys per client address', () => {
  it('answers 429 with Retry-After once an address has presented too many refused keys, and again 401 after the window', async () => {
    const h = await makeHarness({ config: { trustProxy: true } });
    const from = (ip: string, auth: string) =>
      request(h.app).get('/v1/usage').set('X-Forwarded-For', ip).set('Authorization', auth);
    for (let i = 0; i < KEY_FAILURE_LIMIT; i++) {
      expect((await from('203.0.113.5', WRONG)).status).toBe(401);
      // A valid key from the same address in between does not count towards the limit.
      if (i % 10 === 0) expect((await from('203.0.113.5', `Bearer ${h.token}`)).status).toBe(200);
    }
    const blocked = await from('203.0.113.5', WRONG);
    expect(blocked.status).toBe(429);
    expect(blocked.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(blocked.body.type).toBe('/problems/rate-limited');
    const retryAfter = Number(blocked.headers['retry-after']);
    expect(Number.isInteger(retryAfter)).toBe(true);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(KEY_FAILURE_WINDOW_MS / 1000);

    // Another address is not affected, neither with a wrong key nor with a valid one.
    expect((await from('198.51.100.7', WRONG)).status).toBe(401);
    expect((await from('198.51.100.7', `Bearer ${h.token}`)).status).toBe(200);

    // After the window the address is heard again: a valid key works, a wrong one is 401.
    h.clock.now = new Date(h.clock.now.getTime() + KEY_FAILURE_WINDOW_MS + 1000);
    expect((await from('203.0.113.5', `Bearer ${h.token}`)).status).toBe(200);
    expect((await from('203.0.113.5', WRONG)).status).toBe(401);
  });

  it('never limits an address that only presents a valid key', async () => {
    const h = await makeHarness();
    for (let i = 0; i < KEY_FAILURE_LIMIT + 5; i++) {
      expect((await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${h.token}`)).status).toBe(
        200,
      );
    }
  });
});
