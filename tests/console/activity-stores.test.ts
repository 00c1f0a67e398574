// The audit-trail, outbox and overview stores against a scripted console API: the page and
// filters each asks for, what it keeps, and that a slow older answer never replaces a newer one.
// Sources: the console API contract (shared/console/users.ts: GET /audit?page&pageSize&action,
// GET /outbox?page&pageSize, GET /outbox/:id; shared/console/overview.ts: GET /overview) and
// RFC 9457 problem details.
import { flushPromises } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it } from 'vitest';
import { createApiClient } from '../../console/src/api/client.js';
import { useAuditLogClient, useAuditLogStore } from '../../console/src/stores/auditLog.js';
import { useOutboxClient, useOutboxStore } from '../../console/src/stores/outbox.js';
import { useOverviewClient, useOverviewStore } from '../../console/src/stores/overview.js';
import { fakeFetch, json, type Recorded } from './fake-fetch.js';

function entry(id: number) {
  return {
    id,
    at: '2031-03-14T10:00:00.000Z',
    actorUserId: 1,
    actorEmail: 'root@kettleworks.test',
    action: 'key.revoke',
    targetType: 'key',
    targetId: String(id),
    detail: null,
    ip: '203.0.113.7',
  };
}
const params = (c: Recorded | undefined) => Object.fromEntries(new URL(c!.url, 'http://x').searchParams);

beforeEach(() => setActivePinia(createPinia()));

describe('audit log store', () => {
  it('asks for the page and size the table chose, with the typed action, and keeps the total', async () => {
    const f = fakeFetch({
      'GET /console-api/audit': () => json(200, { items: [entry(1)], total: 51, page: 3, pageSize: 25 }),
    });
    useAuditLogClient(createApiClient({ fetch: f.fetch }));
    const store = useAuditLogStore();
    store.action = 'key.revoke';
    await store.load({ page: 3, itemsPerPage: 25 });
    expect(params(f.calls[0])).toEqual({ page: '3', pageSize: '25', action: 'key.revoke' });
    expect(store.items.map((e) => e.id)).toEqual([1]);
    expect(store.total).toBe(51);
    expect(store.loading).toBe(false);
  });

  it('starts again at page 1 with the same page size when the action filter changes, and sends no empty action', async () => {
    const f = fakeFetch({
      'GET /console-api/audit': () => json(200, { items: [], total: 0, page: 1, pageSize: 50 }),
    });
    useAuditLogClient(createApiClient({ fetch: f.fetch }));
    const store = useAuditLogStore();
    await store.load({ page: 4, itemsPerPage: 50 });
    store.action = '';
    await store.applyAction();
    expect(params(f.calls[1])).toEqual({ page: '1', pageSize: '50' });
  });

  it('keeps only the newest page when an older request answers last', async () => {
    const pending: Array<(r: Response) => void> = [];
    const f = fakeFetch({ 'GET /console-api/audit': () => new Promise<Response>((r) => pending.push(r)) });
    useAuditLogClient(createApiClient({ fetch: f.fetch }));
    const store = useAuditLogStore();
    const first = store.load({ page: 1, itemsPerPage: 25 });
    const second = store.load({ page: 2, itemsPerPage: 25 });
    await flushPromises();
    pending[1]!(json(200, { items: [entry(26)], total: 30, page: 2, pageSize: 25 }));
    await second;
    pending[0]!(json(200, { items: [entry(1)], total: 30, page: 1, pageSize: 25 }));
    await first;
    expect(store.items.map((e) => e.id)).toEqual([26]);
    expect(store.options.page).toBe(2);
    expect(store.loading).toBe(false);
  });

  it('holds the problem of a refused page for the alert', async () => {
    const f = fakeFetch({
      'GET /console-api/audit': () =>
        json(403, { type: '/problems/forbidden', title: 'Forbidden', status: 403 }),
    });
    useAuditLogClient(createApiClient({ fetch: f.fetch }));
    const store = useAuditLogStore();
    await store.load();
    expect(store.error?.status).toBe(403);
    expect(store.error?.title).toBe('Forbidden');
  });
});

describe('outbox store', () => {
  const summary = {
    id: 5,
    receivedAt: '2031-03-14T10:00:00.000Z',
    from: 'console@ebullio.test',
    to: ['bo@kettleworks.test'],
    subject: 'You are invited',
  };
  const message = { ...summary, text: 'Choose a password: https://example.test/x', html: null };

  it('loads the latest 100 messages and opens one, bare or wrapped in {message}', async () => {
    const f = fakeFetch({
      'GET /console-api/outbox': () => json(200, { items: [summary], total: 1, page: 1, pageSize: 100 }),
      'GET /console-api/outbox/5': (_c, n) =>
        json(200, n === 1 ? message : { message: { ...message, subject: 'Again' } }),
    });
    useOutboxClient(createApiClient({ fetch: f.fetch }));
    const store = useOutboxStore();
    await store.load();
    expect(params(f.calls[0])).toEqual({ page: '1', pageSize: '100' });
    expect(store.total).toBe(1);
    await store.open(5);
    expect(store.selected?.text).toBe(message.text);
    await store.open(5);
    expect(store.selected?.subject).toBe('Again');
    expect(store.detailLoading).toBe(false);
  });

  it('shows a 404 (the outbox is off in this deployment) as the page’s error', async () => {
    const f = fakeFetch({}); // every path answers 404
    useOutboxClient(createApiClient({ fetch: f.fetch }));
    const store = useOutboxStore();
    await store.load();
    expect(store.error?.status).toBe(404);
    expect(store.items).toEqual([]);
  });
});

describe('overview store', () => {
  const overview = (requests: number) => ({
    generatedAt: '2031-03-14T10:00:00.000Z',
    month: '2031-03',
    today: { requests, units: 2 * requests },
    thisMonth: { requests, units: 2 * requests },
    errorRate: null,
    p95LatencyMs: null,
    topOperations: [],
    nearQuota: [],
    daily: [],
  });

  it('keeps the figures and drops an older answer that arrives after a newer one', async () => {
    const pending: Array<(r: Response) => void> = [];
    const f = fakeFetch({ 'GET /console-api/overview': () => new Promise<Response>((r) => pending.push(r)) });
    useOverviewClient(createApiClient({ fetch: f.fetch }));
    const store = useOverviewStore();
    const older = store.load();
    const newer = store.load();
    await flushPromises();
    expect(store.loading).toBe(true);
    pending[1]!(json(200, overview(40)));
    await newer;
    pending[0]!(json(200, overview(10)));
    await older;
    expect(store.overview?.today.requests).toBe(40);
    expect(store.loading).toBe(false);
  });

  it('keeps the last figures under a failed reload, and forgets them on reset', async () => {
    const f = fakeFetch({
      'GET /console-api/overview': (_c, n) =>
        n === 1
          ? json(200, overview(7))
          : json(503, { type: '/problems/unavailable', title: 'Service unavailable', status: 503 }),
    });
    useOverviewClient(createApiClient({ fetch: f.fetch }));
    const store = useOverviewStore();
    await store.load();
    await store.load();
    expect(store.error?.status).toBe(503);
    expect(store.overview?.today.requests).toBe(7);
    store.reset();
    expect(store.overview).toBeNull();
    expect(store.error).toBeNull();
  });
});
