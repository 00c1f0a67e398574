/**
 * "Run again" in the request-log detail: it posts the shown entry's replay and shows what
 * differs as a table (field, logged, today, difference), or says that nothing differs, or that
 * there was no logged response to compare, or the server's refusal.
 */
import { mount, flushPromises } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import type { ReplayResult, RequestLogDetail } from '../../shared/console/request-log.js';
import { createApiClient } from '../../console/src/api/client.js';
import RequestLogReplay from '../../console/src/components/request-log/RequestLogReplay.vue';
import { useRequestLogClient, useRequestLogStore } from '../../console/src/stores/requestLog.js';

const vuetify = createVuetify({ components });

const detail: RequestLogDetail = {
  id: 7,
  requestId: 'req-7',
  at: '2031-03-14T10:00:00.120Z',
  accountId: 2,
  keyId: 5,
  accountName: 'Invented Brine Works',
  keyName: 'nightly',
  method: 'POST',
  path: '/v1/steam/state',
  operation: 'steam.state',
  status: 200,
  latencyMs: 12,
  idempotentReplay: false,
  units: 1,
  engineVersion: '0.1.0',
  bodiesRetained: true,
  requestBody: '{"pressure":"10 bar","temperature":250}',
  responseBody: '{"temperature":249.5}',
  timings: { receivedAt: '2031-03-14T10:00:00.108Z', completedAt: '2031-03-14T10:00:00.120Z', latencyMs: 12 },
};

function answer(over: Partial<ReplayResult> = {}): ReplayResult {
  return {
    entryId: 7,
    operation: 'steam.state',
    unitsCharged: 1,
    requestId: 'replay-1',
    responseStored: true,
    logged: { engineVersion: '0.1.0', result: { temperature: 249.5 } },
    today: { engineVersion: '0.2.0', result: { temperature: 250 } },
    differences: [
      {
        field: 'temperature',
        change: 'changed',
        logged: 249.5,
        today: 250,
        absolute: 0.5,
        relative: 0.5 / 249.5,
      },
      { field: 'note', change: 'added', today: '<b>new</b>' },
    ],
    modelSources: [{ id: 'iapws-if97', change: 'changed', logged: 'Old citation', today: 'New citation' }],
    ...over,
  };
}

/** A server answering the replay with `status` and `body`; records what was called. */
function server(status: number, body: unknown) {
  const calls: { url: string; method: string }[] = [];
  const fetch = vi.fn(async (url: string, init?: RequestInit) => {
    calls.push({ url, method: init?.method ?? 'GET' });
    return new Response(JSON.stringify(body), {
      status,
      headers: { 'content-type': status < 400 ? 'application/json' : 'application/problem+json' },
    });
  });
  useRequestLogClient(
    createApiClient({ fetch: fetch as unknown as typeof globalThis.fetch, readCookie: () => 't' }),
  );
  return calls;
}

async function runAgain() {
  const store = useRequestLogStore();
  store.detail = detail;
  const wrapper = mount(RequestLogReplay, { props: { detail }, global: { plugins: [vuetify] } });
  await wrapper.get('[data-test="run-again"]').trigger('click');
  await flushPromises();
  return wrapper;
}

beforeEach(() => setActivePinia(createPinia()));

describe('run again', () => {
  it('posts the entry’s replay and lists each difference with logged, today and the change', async () => {
    const calls = server(200, answer());
    const wrapper = await runAgain();
    expect(calls).toEqual([{ url: '/console-api/request-log/7/replay', method: 'POST' }]);
    const rows = wrapper
      .findAll('[data-test="replay-differences"] tbody tr')
      .map((r) => r.findAll('td').map((c) => c.text()));
    // 0.5 / 249.5 = 0.2004 %, shown to three significant digits.
    expect(rows).toEqual([
      ['temperature', '249.5', '250', '+0.5 (+0.2 %)'],
      ['note', '—', '<b>new</b>', 'added'],
    ]);
    // Markup in a value stays text.
    expect(wrapper.find('[data-test="replay-differences"] b').exists()).toBe(false);
    expect(wrapper.get('[data-test="replay-summary"]').text()).toContain('Engine 0.1.0 → 0.2.0');
    expect(wrapper.get('[data-test="replay-summary"]').text()).toContain('1 unit charged');
    expect(wrapper.get('[data-test="replay-models"]').text()).toContain(
      'iapws-if97 (changed): Old citation → New citation',
    );
  });

  it('says the results agree when nothing differs', async () => {
    server(200, answer({ differences: [], modelSources: [] }));
    const wrapper = await runAgain();
    expect(wrapper.get('[data-test="replay-same"]').text()).toContain('same as the logged one');
    expect(wrapper.find('[data-test="replay-differences"]').exists()).toBe(false);
  });

  it('says why there is no comparison when no response was stored', async () => {
    server(
      200,
      answer({
        responseStored: false,
        note: 'No response was stored for this entry: today’s result is shown alone.',
        logged: { engineVersion: '0.1.0', result: null },
        differences: [],
        modelSources: [],
      }),
    );
    const wrapper = await runAgain();
    expect(wrapper.get('[data-test="replay-note"]').text()).toContain('No response was stored');
  });

  it('shows the server’s refusal', async () => {
    server(422, {
      type: '/problems/not-replayable',
      title: 'Not replayable',
      status: 422,
      detail: 'Request-log entry 7 cannot be replayed: its request body was cut at the log limit.',
    });
    const wrapper = await runAgain();
    expect(wrapper.get('[data-test="replay-error"]').text()).toContain('cut at the log limit');
    expect(wrapper.find('[data-test="replay-differences"]').exists()).toBe(false);
  });
});
