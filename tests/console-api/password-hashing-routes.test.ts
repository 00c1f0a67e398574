// The public routes that hash a password (sign-in, password-reset confirmation, invitation
// acceptance) must not let anonymous callers spend the server's CPU: tokens are checked before
// hashing, each route is limited per client address, and a full hashing queue answers 503.
// Sources: OWASP Denial of Service cheat sheet and Authentication cheat sheet (rate-limit
// expensive unauthenticated operations; common practice); RFC 9110 §10.2.3 (Retry-After);
// RFC 9457 (problem details).
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import {
  acquireHashSlot,
  HASH_MAX_RUNNING,
  HASH_MAX_WAITING,
  hashPassword,
  passwordHashingStats,
} from '../../server/accounts/passwords.js';
import { Jar, csrf, makeConsoleHarness, signIn } from './auth-harness.js';
import type { ConsoleHarness } from './auth-harness.js';

const NEW_PASSWORD = 'a long new password for the test';

async function post(h: ConsoleHarness, path: string, body: object) {
  const jar = new Jar();
  const token = await csrf(h, jar);
  return request(h.app)
    .post(`/console-api${path}`)
    .set('Cookie', jar.header())
    .set('X-CSRF-Token', token)
    .send(body);
}

describe('password hashing on public routes', () => {
  it('refuses an invitation acceptance with an unknown token (422 naming token) without hashing the password', async () => {
    const h = await makeConsoleHarness();
    const before = passwordHashingStats().computations;
    const res = await post(h, '/auth/invitations/accept', {
      token: 'not-a-real-invitation-token',
      name: 'Nobody',
      password: NEW_PASSWORD,
    });
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([{ field: 'token', message: 'unknown, used or expired' }]);
    expect(passwordHashingStats().computations).toBe(before);
  });

  it('refuses a password-reset confirmation with an unknown token (422 naming token) without hashing the password', async () => {
    const h = await makeConsoleHarness();
    const before = passwordHashingStats().computations;
    const res = await post(h, '/auth/password-reset/confirm', {
      token: 'not-a-real-reset-token',
      password: NEW_PASSWORD,
    });
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([{ field: 'token', message: 'unknown, used or expired' }]);
    expect(passwordHashingStats().computations).toBe(before);
  });

  it.each([
    ['/auth/invitations/accept', { token: 'bogus', name: 'Nobody', password: NEW_PASSWORD }],
    ['/auth/password-reset/confirm', { token: 'bogus', password: NEW_PASSWORD }],
  ])('limits %s per address with a 429 problem carrying Retry-After', async (path, body) => {
    const h = await makeConsoleHarness({ consoleSignInLimit: 2 });
    const statuses: number[] = [];
    let last;
    for (let i = 0; i < 3; i++) {
      last = await post(h, path, body);
      statuses.push(last.status);
    }
    expect(statuses).toEqual([422, 422, 429]);
    expect(last!.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(last!.body.type).toBe('/problems/rate-limited');
    // Retry-After is delay-seconds (RFC 9110 §10.2.3), within the 15-minute window.
    const retryAfter = Number(last!.headers['retry-after']);
    expect(Number.isInteger(retryAfter)).toBe(true);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(15 * 60);
    // draft-ietf-httpapi-ratelimit-headers-07 fields, as the rest of the service sends.
    expect(last!.headers['ratelimit-policy']).toBe('2;w=900');
  });

  it('answers sign-in with a 503 busy problem and Retry-After while the hashing queue is full, then signs in once it drains', async () => {
    const h = await makeConsoleHarness();
    // Hold every slot and fill the line, so the queue is full for certain while we ask.
    const held = await Promise.all(Array.from({ length: HASH_MAX_RUNNING }, () => acquireHashSlot()));
    const queued = Array.from({ length: HASH_MAX_WAITING }, (_, i) => hashPassword(`filler ${i}`));
    try {
      const busy = await signIn(h, 'admin@ebullio.invalid');
      expect(busy.res.status).toBe(503);
      expect(busy.res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(busy.res.body.type).toBe('/problems/busy');
      expect(Number(busy.res.headers['retry-after'])).toBeGreaterThan(0);
    } finally {
      for (const release of held) release();
      await Promise.all(queued);
    }
    expect((await signIn(h, 'admin@ebullio.invalid')).res.status).toBe(200);
  });
});
