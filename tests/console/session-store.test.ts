// The session store: sign-in, lock-out, sign-out, refresh, against a scripted console API.
// Sources: the console API contract (/tmp/prompts/console-common.md: POST /auth/sign-in,
// GET /auth/me, POST /auth/refresh, POST /auth/sign-out) and RFC 9457 problem details.
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it } from 'vitest';
import { createApiClient } from '../../console/src/api/client.js';
import { useSessionClient, useSessionStore } from '../../console/src/stores/session.js';
import { fakeFetch, json } from './fake-fetch.js';

const ada = { id: 7, email: 'ada@kettleworks.test', name: 'Ada', role: 'developer', accountIds: [2, 5] };
const unauthorized = { type: '/problems/unauthorized', title: 'Unauthorized', status: 401 };

beforeEach(() => {
  setActivePinia(createPinia());
  localStorage.clear();
});

describe('session store', () => {
  it('signs in and takes the role and accounts from the answer', async () => {
    const f = fakeFetch({ 'POST /console-api/auth/sign-in': () => json(200, { user: ada }) });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    expect(await session.signIn('ada@kettleworks.test', 'correct horse battery')).toBe(true);
    expect(session.role).toBe('developer');
    expect(session.user?.accountIds).toEqual([2, 5]);
    expect(session.can(['admin'])).toBe(false);
    expect(session.can(['admin', 'developer'])).toBe(true);
    expect(f.calls[0]?.body).toEqual({ email: 'ada@kettleworks.test', password: 'correct horse battery' });
  });

  it('keeps the problem of a refused sign-in for the form to show', async () => {
    const f = fakeFetch({
      'POST /console-api/auth/sign-in': () =>
        json(401, { ...unauthorized, detail: 'The e-mail address or password is wrong.' }),
    });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    expect(await session.signIn('ada@kettleworks.test', 'nope')).toBe(false);
    expect(session.user).toBeNull();
    expect(session.error?.status).toBe(401);
    expect(session.error?.detail).toBe('The e-mail address or password is wrong.');
    expect(session.loading).toBe(false);
  });

  it('treats a 401 from /auth/me after a refused refresh as signed out, not as an error', async () => {
    const f = fakeFetch({
      'GET /console-api/auth/me': () => json(401, unauthorized),
      'POST /console-api/auth/refresh': () => json(401, unauthorized),
    });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    expect(await session.load()).toBeNull();
    expect(session.loaded).toBe(true);
    expect(session.error).toBeNull();
  });

  it('stays signed in through an expired access token when the refresh succeeds', async () => {
    const f = fakeFetch({
      'GET /console-api/auth/me': (_c, n) => (n === 1 ? json(401, unauthorized) : json(200, { user: ada })),
      'POST /console-api/auth/refresh': () => json(200, {}),
    });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    expect((await session.load())?.email).toBe('ada@kettleworks.test');
    expect(f.calls.map((c) => c.path)).toEqual([
      '/console-api/auth/me',
      '/console-api/auth/refresh',
      '/console-api/auth/me',
    ]);
  });

  it('refresh() signs the user out locally when the server refuses', async () => {
    const f = fakeFetch({
      'POST /console-api/auth/sign-in': () => json(200, ada),
      'POST /console-api/auth/refresh': () => json(401, unauthorized),
    });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    await session.signIn('ada@kettleworks.test', 'correct horse battery');
    expect(session.signedIn).toBe(true);
    expect(await session.refresh()).toBe(false);
    expect(session.signedIn).toBe(false);
  });

  it('signs out locally even when the server call fails', async () => {
    const f = fakeFetch({
      'POST /console-api/auth/sign-in': () => json(200, { user: ada }),
      'POST /console-api/auth/sign-out': () => new Response('', { status: 503 }),
    });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    await session.signIn('ada@kettleworks.test', 'correct horse battery');
    await session.signOut();
    expect(session.user).toBeNull();
    expect(f.calls.at(-1)?.headers['x-csrf-token']).toBe('tok');
  });

  it('does not call a first visit an ended session, though /auth/me and the refresh answer 401', async () => {
    const f = fakeFetch({
      'GET /console-api/auth/me': () => json(401, unauthorized),
      'POST /console-api/auth/refresh': () => json(401, unauthorized),
    });
    const session = useSessionStore();
    useSessionClient(
      createApiClient({ fetch: f.fetch, readCookie: () => 'tok', onSessionExpired: () => session.expire() }),
    );
    expect(await session.load()).toBeNull();
    expect(session.ended).toBe(false);
  });

  it('calls it an ended session when this browser was signed in before and the refresh is refused', async () => {
    const signedIn = fakeFetch({ 'POST /console-api/auth/sign-in': () => json(200, { user: ada }) });
    useSessionClient(createApiClient({ fetch: signedIn.fetch, readCookie: () => 'tok' }));
    await useSessionStore().signIn('ada@kettleworks.test', 'correct horse battery');
    // A new page load in the same browser, after the session's cookies have lapsed.
    setActivePinia(createPinia());
    const f = fakeFetch({
      'GET /console-api/auth/me': () => json(401, unauthorized),
      'POST /console-api/auth/refresh': () => json(401, unauthorized),
    });
    const session = useSessionStore();
    useSessionClient(
      createApiClient({ fetch: f.fetch, readCookie: () => 'tok', onSessionExpired: () => session.expire() }),
    );
    expect(await session.load()).toBeNull();
    expect(session.ended).toBe(true);
  });

  it('forgets the earlier session on sign-out, so the next visit is not told its session ended', async () => {
    const f = fakeFetch({
      'POST /console-api/auth/sign-in': () => json(200, { user: ada }),
      'POST /console-api/auth/sign-out': () => new Response(null, { status: 204 }),
    });
    useSessionClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const session = useSessionStore();
    await session.signIn('ada@kettleworks.test', 'correct horse battery');
    await session.signOut();
    expect(session.expire()).toBe(false);
    expect(session.ended).toBe(false);
  });
});
