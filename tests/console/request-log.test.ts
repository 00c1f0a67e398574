/**
 * The request log page's server conversation: filters, paging and sorting become one query
 * string (shared by the table and the CSV export), times are sent as UTC instants, and logged
 * bodies are shown as text, never as markup.
 */
import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import type { RequestLogDetail } from '../../shared/console/request-log.js';
import { createApiClient } from '../../console/src/api/client.js';
import RequestLogDetailPanel from '../../console/src/components/request-log/RequestLogDetailPanel.vue';
import {
  emptyFilters,
  localToInstant,
  statusClass,
} from '../../console/src/composables/request-log-query.js';
import { useRequestLogClient, useRequestLogStore } from '../../console/src/stores/requestLog.js';

function fakeServer() {
  const urls: string[] = [];
  const fetch = vi.fn(async (url: string) => {
    urls.push(url);
    return new Response(JSON.stringify({ items: [], total: 0, page: 1, pageSize: 25 }), {
      status: 200,
      headers: { 'content-type': 'application/json' },
    });
  });
  useRequestLogClient(
    createApiClient({ fetch: fetch as unknown as typeof globalThis.fetch, readCookie: () => 't' }),
  );
  return urls;
}

const savedTz = process.env.TZ;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  process.env.TZ = savedTz;
});

describe('request log query', () => {
  it('sends the table’s page, page size and sort column as the server’s page, pageSize, sort and order', async () => {
    const urls = fakeServer();
    const store = useRequestLogStore();
    await store.setOptions({ page: 3, itemsPerPage: 50, sortBy: [{ key: 'latencyMs', order: 'asc' }] });
    const q = new URL(urls[0]!, 'http://x').searchParams;
    // Source: shared/console/request-log.ts RequestLogQuerySchema (sort ∈ at|latency|status)
    expect(q.get('page')).toBe('3');
    expect(q.get('pageSize')).toBe('50');
    expect(q.get('sort')).toBe('latency');
    expect(q.get('order')).toBe('asc');
  });

  it('starts again at page 1 when a filter changes, and leaves empty filters out', async () => {
    const urls = fakeServer();
    const store = useRequestLogStore();
    await store.setOptions({ page: 4, itemsPerPage: 25, sortBy: [] });
    await store.applyFilters({ accountId: 2, status: '4XX', operation: '  ', requestId: 'req 7/8' });
    const last = urls.at(-1)!;
    // Source: WHATWG URL Standard, application/x-www-form-urlencoded serializer: space → "+", "/" → %2F (from memory)
    expect(last).toBe(
      '/console-api/request-log?accountId=2&status=4xx&requestId=req+7%2F8&page=1&pageSize=25&sort=at&order=desc',
    );
  });

  it('exports exactly the filtered rows: the CSV link carries the filters but no paging', async () => {
    fakeServer();
    const store = useRequestLogStore();
    await store.applyFilters({ keyId: 9, status: '5xx' });
    expect(store.exportUrl).toBe('/console-api/request-log/export.csv?keyId=9&status=5xx');
  });

  it('sends a time typed in New York in March as the UTC instant four hours later (daylight time)', () => {
    // Source: US daylight saving time starts the second Sunday of March (Energy Policy Act of 2005, (from memory)
    // tz database America/New_York): on 14 March 2031 New York is at UTC−4.
    process.env.TZ = 'America/New_York';
    expect(localToInstant('2031-03-14T10:00')).toBe('2031-03-14T14:00:00.000Z');
    // …and in January (standard time, UTC−5)
    expect(localToInstant('2031-01-14T10:00')).toBe('2031-01-14T15:00:00.000Z');
    expect(localToInstant('')).toBeUndefined();
  });

  it('classes statuses by their first digit', () => {
    // Source: RFC 9110 §15 — the first digit of the status code defines its class (from memory)
    expect(statusClass(204)).toBe('2xx');
    expect(statusClass(429)).toBe('4xx');
    expect(statusClass(503)).toBe('5xx');
    expect(statusClass(99)).toBe('other');
    expect(emptyFilters().status).toBeNull();
  });
});

describe('request detail', () => {
  const vuetify = createVuetify({ components });
  const detail: RequestLogDetail = {
    id: 1,
    requestId: 'req-1',
    at: '2031-03-14T10:00:00.120Z',
    accountId: 2,
    keyId: 5,
    accountName: 'Brine Works',
    keyName: 'nightly brine check',
    method: 'POST',
    path: '/v1/liquors/sodium-hydroxide/boiling-point',
    operation: 'liquors.boiling-point',
    status: 200,
    latencyMs: 120,
    units: 1,
    idempotentReplay: false,
    engineVersion: '0.1.0',
    bodiesRetained: true,
    requestBody: '{"massFraction":0.3,"note":"<img src=x onerror=alert(1)>"}',
    responseBody: 'not json <b>bold</b>',
    timings: {
      receivedAt: '2031-03-14T10:00:00.000Z',
      completedAt: '2031-03-14T10:00:00.120Z',
      latencyMs: 120,
    },
  };

  it('pretty-prints a JSON body and shows markup in bodies as text, not as elements', () => {
    const wrapper = mount(RequestLogDetailPanel, {
      props: { detail },
      global: { plugins: [vuetify] },
    });
    const req = wrapper.get('[data-test="request-body"]');
    // Source: ECMA-262 JSON.stringify with an indent of 2 (one member per line) (from memory)
    expect(req.text()).toContain('"massFraction": 0.3,\n  "note"');
    // Source: OWASP XSS Prevention Cheat Sheet — untrusted data goes into text, never into HTML (from memory)
    expect(req.find('img').exists()).toBe(false);
    expect(req.element.innerHTML).toContain('&lt;img');
    const res = wrapper.get('[data-test="response-body"]');
    expect(res.find('b').exists()).toBe(false);
    expect(res.text()).toBe('not json <b>bold</b>');
  });

  it('names the account and the key instead of their numbers', () => {
    const wrapper = mount(RequestLogDetailPanel, { props: { detail }, global: { plugins: [vuetify] } });
    const text = wrapper.text();
    expect(text).toContain('Brine Works');
    expect(text).toContain('nightly brine check');
    expect(text).not.toContain('Key 5');
    expect(text).not.toContain('Account 2');
  });

  it('puts request and response side by side from the md breakpoint and stacks them below it', () => {
    const wrapper = mount(RequestLogDetailPanel, { props: { detail }, global: { plugins: [vuetify] } });
    for (const body of ['request-body', 'response-body']) {
      const column = wrapper.get(`[data-test="${body}"]`).element.closest('.v-col');
      // Vuetify grid: cols=12 is a full row on a phone, md=6 half a row from 960 px (vuetifyjs.com, grid)
      expect([...(column?.classList ?? [])]).toEqual(
        expect.arrayContaining(['v-col--cols-12', 'v-col--cols-md-6']),
      );
    }
  });

  it('lists the request’s facts as labelled pairs: account, key, operation, units, times, engine', () => {
    const wrapper = mount(RequestLogDetailPanel, { props: { detail }, global: { plugins: [vuetify] } });
    const labels = wrapper.findAll('[data-test="facts"] dt').map((d) => d.text());
    expect(labels).toEqual([
      'Account',
      'Key',
      'Operation',
      'Units',
      'Received',
      'Completed',
      'Latency',
      'Engine',
    ]);
    expect(wrapper.get('[data-test="detail-request-id"]').text()).toBe(detail.requestId);
  });

  it('names the operation by its catalogue title, with the id beside it', () => {
    const wrapper = mount(RequestLogDetailPanel, {
      props: { detail: { ...detail, operation: 'evaporators.mechanical-vapor-recompression' } },
      global: { plugins: [vuetify] },
    });
    const values = wrapper.findAll('[data-test="facts"] dd').map((d) => d.text());
    expect(values).toContain('MVR evaporator (evaporators.mechanical-vapor-recompression)');
  });

  it('says so when the account keeps no bodies', () => {
    const wrapper = mount(RequestLogDetailPanel, {
      props: {
        detail: { ...detail, bodiesRetained: false, requestBody: null, responseBody: null },
      },
      global: { plugins: [vuetify] },
    });
    expect(wrapper.find('[data-test="request-body"]').exists()).toBe(false);
    expect(wrapper.text()).toContain('does not keep request bodies');
  });
});
