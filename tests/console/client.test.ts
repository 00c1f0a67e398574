// The console's fetch wrapper: double-submit CSRF token, one refresh on 401, problem details.
// Sources: OWASP Cross-Site Request Forgery Prevention Cheat Sheet ("Double Submit Cookie";
// safe methods carry no token), RFC 9457 (problem details members), RFC 9110 §9.2.1 (safe methods),
// the console API contract in /tmp/prompts/console-common.md (cookie ebullio_csrf, header
// X-CSRF-Token, GET /auth/csrf, POST /auth/refresh). RFC and OWASP section references are from
// memory, not re-read; the contract was read.
import { describe, expect, it, vi } from 'vitest';
import { ApiProblem, createApiClient } from '../../console/src/api/client.js';
import { fakeFetch, json } from './fake-fetch.js';

describe('CSRF double submit', () => {
  it('fetches a token before the first mutating call and sends it as X-CSRF-Token', async () => {
    let cookie: string | undefined;
    const f = fakeFetch({
      'GET /console-api/auth/csrf': () => {
        cookie = 'tok-123';
        return json(200, { csrfToken: 'tok-123' });
      },
      'POST /console-api/accounts': () => json(201, { id: 1 }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => cookie });
    await api.post('/accounts', { name: 'Kettle Works' });
    // Contract: GET /console-api/auth/csrf sets the cookie; mutating calls echo it in the header.
    expect(f.calls.map((c) => `${c.method} ${c.path}`)).toEqual([
      'GET /console-api/auth/csrf',
      'POST /console-api/accounts',
    ]);
    expect(f.calls[1]?.headers['x-csrf-token']).toBe('tok-123');
    expect(f.calls[1]?.body).toEqual({ name: 'Kettle Works' });
  });

  it('sends the cookie value itself when the cookie is already set (the cookie is the truth)', async () => {
    const f = fakeFetch({ 'PATCH /console-api/accounts/4': () => json(200, { id: 4 }) });
    const api = createApiClient({
      fetch: f.fetch,
      readCookie: (n) => (n === 'ebullio_csrf' ? 'from-cookie' : undefined),
    });
    await api.patch('/accounts/4', { name: 'x' });
    // OWASP double submit: the header must equal the cookie; no extra token fetch is needed.
    expect(f.calls).toHaveLength(1);
    expect(f.calls[0]?.headers['x-csrf-token']).toBe('from-cookie');
  });

  it('sends no CSRF header on a GET', async () => {
    const f = fakeFetch({ 'GET /console-api/keys': () => json(200, { items: [] }) });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    await api.get('/keys', { query: { accountId: 3, empty: '' } });
    // RFC 9110 §9.2.1: GET is safe; OWASP: tokens are for state-changing requests only.
    expect(f.calls[0]?.headers['x-csrf-token']).toBeUndefined();
    expect(f.calls[0]?.url).toBe('/console-api/keys?accountId=3');
  });

  it('fetches a fresh token and retries once after a csrf-failed answer', async () => {
    let cookie = 'stale';
    const f = fakeFetch({
      'GET /console-api/auth/csrf': () => {
        cookie = 'fresh';
        return json(200, { csrfToken: 'fresh' });
      },
      'POST /console-api/keys/9/revoke': (_c, n) =>
        n === 1
          ? json(403, { type: '/problems/csrf-failed', title: 'CSRF check failed', status: 403 })
          : json(200, { key: { id: 9 } }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => cookie });
    await expect(api.post('/keys/9/revoke')).resolves.toEqual({ key: { id: 9 } });
    expect(f.calls.map((c) => c.headers['x-csrf-token'] ?? '-')).toEqual(['stale', '-', 'fresh']);
  });
});

describe('session refresh on 401', () => {
  it('refreshes once and repeats the call', async () => {
    const f = fakeFetch({
      'GET /console-api/overview': (_c, n) =>
        n === 1
          ? json(401, { type: '/problems/unauthorized', title: 'Unauthorized', status: 401 })
          : json(200, { ok: 1 }),
      'POST /console-api/auth/refresh': () => json(200, { user: {} }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    await expect(api.get('/overview')).resolves.toEqual({ ok: 1 });
    expect(f.calls.map((c) => `${c.method} ${c.path}`)).toEqual([
      'GET /console-api/overview',
      'POST /console-api/auth/refresh',
      'GET /console-api/overview',
    ]);
    // The refresh is a POST, so it carries the CSRF token too (contract: every mutating call).
    expect(f.calls[1]?.headers['x-csrf-token']).toBe('tok');
  });

  it('gives up after a refused refresh, reports the expiry and throws the 401', async () => {
    const expired = vi.fn();
    const f = fakeFetch({
      'GET /console-api/users': () =>
        json(401, { type: '/problems/unauthorized', title: 'Unauthorized', status: 401 }),
      'POST /console-api/auth/refresh': () =>
        json(401, { type: '/problems/unauthorized', title: 'Unauthorized', status: 401 }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok', onSessionExpired: expired });
    const err = await api.get('/users').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiProblem);
    expect((err as ApiProblem).status).toBe(401);
    expect(expired).toHaveBeenCalledTimes(1);
    expect(f.calls.filter((c) => c.path === '/console-api/auth/refresh')).toHaveLength(1);
  });

  it('does not try to refresh when sign-in itself answers 401', async () => {
    const f = fakeFetch({
      'POST /console-api/auth/sign-in': () =>
        json(401, {
          type: '/problems/unauthorized',
          title: 'Unauthorized',
          status: 401,
          detail: 'Wrong e-mail or password.',
        }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    await expect(api.post('/auth/sign-in', { email: 'a@b.c', password: 'x' })).rejects.toThrow(
      'Wrong e-mail or password.',
    );
    expect(f.calls).toHaveLength(1);
  });

  it('shares one refresh between calls that fail together', async () => {
    const f = fakeFetch({
      'GET /console-api/keys': (_c, n) =>
        n <= 2 ? json(401, { title: 'Unauthorized', status: 401 }) : json(200, { items: [] }),
      'POST /console-api/auth/refresh': () => json(200, {}),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    await Promise.all([api.get('/keys'), api.get('/keys')]);
    expect(f.calls.filter((c) => c.path === '/console-api/auth/refresh')).toHaveLength(1);
  });
});

describe('problem details', () => {
  it('turns application/problem+json into an ApiProblem with every RFC 9457 member and the field errors', async () => {
    const f = fakeFetch({
      'POST /console-api/keys': () =>
        json(422, {
          type: '/problems/validation-failed',
          title: 'Validation failed',
          status: 422,
          detail: '1 field is invalid',
          instance: '/console-api/keys',
          requestId: 'req-77',
          errors: [{ field: 'rateLimitPerMinute', message: 'must be at most 100000' }],
        }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    const err = (await api.post('/keys', {}).catch((e: unknown) => e)) as ApiProblem;
    // RFC 9457 §3.1: type, title, status, detail, instance; "errors" is the documented extension.
    expect(err).toBeInstanceOf(ApiProblem);
    expect(err.status).toBe(422);
    expect(err.slug).toBe('validation-failed');
    expect(err.title).toBe('Validation failed');
    expect(err.detail).toBe('1 field is invalid');
    expect(err.requestId).toBe('req-77');
    expect(err.fieldMessage('rateLimitPerMinute')).toBe('must be at most 100000');
  });

  it('keeps extension members such as lockedUntil', async () => {
    const f = fakeFetch({
      'POST /console-api/auth/sign-in': () =>
        json(429, {
          type: '/problems/rate-limited',
          title: 'Too many attempts',
          status: 429,
          lockedUntil: '2031-01-01T10:15:00Z',
        }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    const err = (await api.post('/auth/sign-in', {}).catch((e: unknown) => e)) as ApiProblem;
    // RFC 9457 §3.2: problem types may add extension members; clients keep what they do not know.
    expect(err.extra.lockedUntil).toBe('2031-01-01T10:15:00Z');
  });

  it('makes a non-JSON failure an ApiProblem with the HTTP status', async () => {
    const f = fakeFetch({
      'GET /console-api/overview': () =>
        new Response('<html>Bad gateway</html>', { status: 502, statusText: 'Bad Gateway' }),
    });
    const api = createApiClient({ fetch: f.fetch, readCookie: () => 'tok' });
    const err = (await api.get('/overview').catch((e: unknown) => e)) as ApiProblem;
    expect(err.status).toBe(502);
    expect(err.title).toBe('Bad Gateway');
  });
});
