// The outbox page of a fresh development server: no captured mail yet.
// Source: the console API contract (shared/console/users.ts: GET /outbox → { items, total }).
import { flushPromises, mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import * as directives from 'vuetify/directives';
import { createApiClient } from '../../console/src/api/client.js';
import { useOutboxClient } from '../../console/src/stores/outbox.js';
import OutboxView from '../../console/src/views/OutboxView.vue';
import { fakeFetch, json } from './fake-fetch.js';

class NoopResizeObserver {
  observe() {}
  unobserve() {}
  disconnect() {}
}

beforeEach(() => {
  setActivePinia(createPinia());
  vi.stubGlobal('ResizeObserver', NoopResizeObserver);
});
afterEach(() => vi.unstubAllGlobals());

describe('outbox page', () => {
  it('says "No messages yet" when nothing was captured, never "the latest 100 of 0"', async () => {
    const f = fakeFetch({
      'GET /console-api/outbox': () => json(200, { items: [], total: 0, page: 1, pageSize: 100 }),
    });
    useOutboxClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    const wrapper = mount(
      { components: { OutboxView }, template: '<v-app><OutboxView /></v-app>' },
      { global: { plugins: [createVuetify({ components, directives })] } },
    );
    await flushPromises();
    const text = wrapper.text();
    expect(text).toContain('No messages yet');
    expect(text).not.toMatch(/of 0\b/);
    expect(text).not.toContain('latest 100');
  });
});
