// The keys store against a scripted console API: which endpoint each action calls, what it keeps
// (the list, the account choices, loading and error flags) and what it must not keep (a secret).
// Sources: the console API contract (shared/console/keys.ts: GET /keys?accountId=, POST /keys,
// POST /keys/:id/revoke, POST /keys/:id/rotate {overlapSeconds}; the secret only in the create and
// rotate answers) and RFC 9457 problem details.
import { flushPromises } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it } from 'vitest';
import { ApiProblem, createApiClient } from '../../console/src/api/client.js';
import { useKeysClient, useKeysStore } from '../../console/src/stores/keys.js';
import { useSessionStore } from '../../console/src/stores/session.js';
import { fakeFetch, json } from './fake-fetch.js';
import type { ConsoleKey } from '../../shared/console/keys.js';

const SECRET = 'ebk1.RXZhcG9yYXRvclN0b3JlVGVzdDAwMQ';

function key(id: number, over: Partial<ConsoleKey> = {}): ConsoleKey {
  return {
    id,
    publicId: `k${id}`,
    accountId: 2,
    accountName: 'Kettle Works',
    name: `key ${id}`,
    prefix: 'ebk1.RXZ',
    scopes: ['steam'],
    rateLimitPerMinute: 60,
    createdAt: '2031-03-01T10:00:00.000Z',
    expiresAt: null,
    revokedAt: null,
    lastUsedAt: null,
    rotatedFromId: null,
    state: 'active',
    ...over,
  } as ConsoleKey;
}

function storeWith(routes: Parameters<typeof fakeFetch>[0], role: 'admin' | 'developer' = 'developer') {
  const f = fakeFetch(routes);
  useKeysClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
  const session = useSessionStore();
  session.user = { id: 7, email: 'ada@kettleworks.test', name: 'Ada', role, accountIds: [2, 5] };
  session.loaded = true;
  return { f, store: useKeysStore() };
}

beforeEach(() => setActivePinia(createPinia()));

describe('keys store', () => {
  it('asks for one account’s keys and names the developer’s accounts from the keys and the session', async () => {
    const { f, store } = storeWith({ 'GET /console-api/keys': () => json(200, { items: [key(3)] }) });
    await store.loadAccounts(); // a developer may not list accounts: no call
    store.accountId = 2;
    await store.load();
    expect(f.calls.map((c) => c.path)).toEqual(['/console-api/keys']);
    expect(new URL(f.calls[0]!.url, 'http://x').searchParams.get('accountId')).toBe('2');
    expect(store.keys.map((k) => k.id)).toEqual([3]);
    // Account 5 has no key yet: it is still offered, by number.
    expect(store.accountOptions).toEqual([
      { value: 5, title: 'Account 5' },
      { value: 2, title: 'Kettle Works' },
    ]);
    expect(store.loading).toBe(false);
  });

  it('lists an administrator’s accounts by name from GET /accounts', async () => {
    const { f, store } = storeWith(
      { 'GET /console-api/accounts': () => json(200, { items: [{ id: 9, name: 'Dairy Co-op' }] }) },
      'admin',
    );
    await store.loadAccounts();
    expect(f.calls[0]?.path).toBe('/console-api/accounts');
    expect(store.accountOptions).toEqual([{ value: 9, title: 'Dairy Co-op' }]);
  });

  it('keeps the rows it had when a reload fails, and holds the problem with its status', async () => {
    const { store } = storeWith({
      'GET /console-api/keys': (_c, n) =>
        n === 1
          ? json(200, { items: [key(3)] })
          : json(503, { type: '/problems/unavailable', title: 'Service unavailable', status: 503 }),
    });
    await store.load();
    await store.load();
    expect(store.error).toBeInstanceOf(ApiProblem);
    expect(store.error?.status).toBe(503);
    expect(store.keys.map((k) => k.id)).toEqual([3]);
    expect(store.loading).toBe(false);
  });

  it('hands the new secret back from create without keeping it, and reloads the list', async () => {
    let listed = [key(3)];
    const { f, store } = storeWith({
      'GET /console-api/keys': () => json(200, { items: listed }),
      'POST /console-api/keys': () => {
        listed = [key(3), key(11, { name: 'historian export' })];
        return json(201, { key: listed[1], secret: SECRET });
      },
    });
    const body = {
      accountId: 2,
      name: 'historian export',
      scopes: ['steam' as const],
      rateLimitPerMinute: 60,
      expiresAt: null,
    };
    const created = await store.create(body);
    await flushPromises();
    expect(created?.secret).toBe(SECRET);
    expect(f.calls.find((c) => c.method === 'POST')?.body).toEqual(body);
    expect(store.keys.map((k) => k.id)).toEqual([3, 11]);
    expect(store.saving).toBe(false);
    // Shown once means stored nowhere: not in the store's state.
    expect(JSON.stringify(store.$state)).not.toContain(SECRET);
  });

  it('keeps a refused create as a problem that names the field, and returns null', async () => {
    const { store } = storeWith({
      'POST /console-api/keys': () =>
        json(422, {
          type: '/problems/validation-failed',
          title: 'Validation failed',
          status: 422,
          errors: [{ field: 'rateLimitPerMinute', message: 'must be between 1 and 100000' }],
        }),
    });
    const created = await store.create({
      accountId: 2,
      name: 'x',
      scopes: ['steam'],
      rateLimitPerMinute: 0,
      expiresAt: null,
    });
    expect(created).toBeNull();
    expect(store.createError?.fieldMessage('rateLimitPerMinute')).toBe('must be between 1 and 100000');
    expect(store.saving).toBe(false);
  });

  it('revokes through POST /keys/:id/revoke and passes a refusal on to the page', async () => {
    const { f, store } = storeWith({
      'GET /console-api/keys': () => json(200, { items: [] }),
      'POST /console-api/keys/3/revoke': (_c, n) =>
        n === 1
          ? json(200, { key: key(3, { state: 'revoked' }) })
          : json(403, { type: '/problems/forbidden', title: 'Forbidden', status: 403 }),
    });
    await store.revoke(key(3));
    await flushPromises();
    expect(f.calls.filter((c) => c.path === '/console-api/keys')).toHaveLength(1); // the reload
    await expect(store.revoke(key(3))).rejects.toMatchObject({ status: 403 });
    expect(store.revokeBusy).toBe(false);
  });

  it('rotates with the chosen overlap and returns the new secret', async () => {
    const { f, store } = storeWith({
      'GET /console-api/keys': () => json(200, { items: [] }),
      'POST /console-api/keys/3/rotate': () => json(201, { key: key(12), secret: SECRET }),
    });
    const result = await store.rotate(key(3), 86_400);
    expect(result.secret).toBe(SECRET);
    expect(f.calls[0]?.body).toEqual({ overlapSeconds: 86_400 });
    expect(JSON.stringify(store.$state)).not.toContain(SECRET);
  });

  it('forgets the list, the choices and the filter on reset (the next visit, or user, starts empty)', async () => {
    const { store } = storeWith({ 'GET /console-api/keys': () => json(200, { items: [key(3)] }) });
    store.accountId = 2;
    await store.load();
    store.reset();
    expect(store.keys).toEqual([]);
    expect(store.accountOptions).toEqual([]);
    expect(store.accountId).toBeNull();
    expect(store.error).toBeNull();
  });
});
