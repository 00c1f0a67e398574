// The keys view shows a new key's secret once: in the create answer's dialog, with a copy button
// and a "store it now" note, and nowhere after the dialog is closed.
// Sources: the console API contract (POST /console-api/keys → {key, secret}, "secret once"),
// OWASP Secrets Management Cheat Sheet (show a generated secret once; do not keep it around;
// from memory).
import { flushPromises, mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import * as directives from 'vuetify/directives';
import KeysView from '../../console/src/views/KeysView.vue';
import { useSessionStore } from '../../console/src/stores/session.js';
import { fakeFetch, json } from './fake-fetch.js';

const SECRET = 'ebk1.Qm9pbGluZ1BvaW50RWxldmF0aW9uMDAx';

function key(id: number, over: Record<string, unknown> = {}) {
  return {
    id,
    publicId: `k${id}`,
    accountId: 2,
    accountName: 'Kettle Works',
    name: `key ${id}`,
    prefix: 'ebk1.Qm9',
    scopes: ['steam'],
    rateLimitPerMinute: 60,
    createdAt: '2031-03-01T10:00:00.000Z',
    expiresAt: null,
    revokedAt: null,
    lastUsedAt: null,
    rotatedFromId: null,
    state: 'active',
    ...over,
  };
}

// ResizeObserver / clipboard are not in every happy-dom build; Vuetify's overlays need the former.
class NoopResizeObserver {
  observe() {}
  unobserve() {}
  disconnect() {}
}

let writeText: ReturnType<typeof vi.fn>;
beforeEach(() => {
  setActivePinia(createPinia());
  vi.stubGlobal('ResizeObserver', NoopResizeObserver);
  // Vuetify's menu positioning reads window.visualViewport (CSSOM View), absent in happy-dom.
  vi.stubGlobal('visualViewport', {
    width: 1280,
    height: 800,
    scale: 1,
    offsetLeft: 0,
    offsetTop: 0,
    addEventListener() {},
    removeEventListener() {},
  });
  writeText = vi.fn().mockResolvedValue(undefined);
  Object.defineProperty(navigator, 'clipboard', { value: { writeText }, configurable: true });
  document.cookie = 'ebullio_csrf=tok-keys';
  document.body.innerHTML = '';
});
afterEach(() => vi.unstubAllGlobals());

async function mountAsDeveloper(f: ReturnType<typeof fakeFetch>) {
  vi.stubGlobal('fetch', f.fetch);
  const session = useSessionStore();
  session.user = { id: 7, email: 'ada@kettleworks.test', name: 'Ada', role: 'developer', accountIds: [2] };
  session.loaded = true;
  const vuetify = createVuetify({ components, directives });
  const wrapper = mount(
    { components: { KeysView }, template: '<v-app><KeysView /></v-app>' },
    { global: { plugins: [vuetify] }, attachTo: document.body },
  );
  await flushPromises();
  return wrapper;
}

async function settle() {
  for (let i = 0; i < 5; i++) {
    await flushPromises();
    await new Promise((r) => setTimeout(r, 0));
  }
}

function button(label: string): HTMLButtonElement {
  const b = [...document.querySelectorAll('button')].find((el) => el.textContent?.trim() === label);
  if (!b) throw new Error(`no button "${label}" in ${document.body.textContent}`);
  return b;
}

describe('KeysView', () => {
  it('shows the new secret once with a copy button and a store-it-now note, then forgets it', async () => {
    const created = key(11, { name: 'historian export' });
    let listed = [key(3)];
    const f = fakeFetch({
      'GET /console-api/keys': () => json(200, { items: listed }),
      'POST /console-api/keys': () => {
        listed = [key(3), created];
        return json(201, { key: created, secret: SECRET });
      },
    });
    const wrapper = await mountAsDeveloper(f);
    expect(document.body.textContent).toContain('key 3');

    button('New key').click();
    await settle();
    const nameInput = [...document.querySelectorAll<HTMLInputElement>('input')].find((i) =>
      i.closest('.v-input')?.textContent?.includes('Name'),
    );
    expect(nameInput).toBeDefined();
    nameInput!.value = 'historian export';
    nameInput!.dispatchEvent(new Event('input'));
    await settle();
    button('Create key').click();
    await settle();

    // The create call: contract body fields, CSRF header equal to the cookie.
    const post = f.calls.find((c) => c.method === 'POST');
    expect(post?.body).toMatchObject({ accountId: 2, name: 'historian export', rateLimitPerMinute: 60 });
    expect(post?.headers['x-csrf-token']).toBe('tok-keys');

    const dialog = document.querySelector('[data-test="secret-dialog"]');
    expect(dialog).not.toBeNull();
    expect(dialog!.textContent).toContain('Store it now');
    expect(dialog!.textContent).toContain('only time');
    const field = dialog!.querySelector<HTMLInputElement>('[data-test="secret-value"] input');
    expect(field?.value).toBe(SECRET);
    expect(field?.readOnly).toBe(true);

    dialog!.querySelector<HTMLButtonElement>('[data-test="copy-secret"]')!.click();
    await settle();
    expect(writeText).toHaveBeenCalledWith(SECRET);

    dialog!.querySelector<HTMLButtonElement>('[data-test="close-secret"]')!.click();
    await settle();
    // Gone from the page: neither the table (which shows only the prefix) nor any input holds it.
    expect(document.body.innerHTML).not.toContain(SECRET);
    expect([...document.querySelectorAll('input')].some((i) => i.value === SECRET)).toBe(false);
    expect(document.body.textContent).toContain('historian export');
    wrapper.unmount();
  });

  it('lets a billing user read keys but offers no way to create, rotate or revoke', async () => {
    const f = fakeFetch({
      'GET /console-api/accounts': () => json(200, { items: [] }),
      'GET /console-api/keys': () => json(200, { items: [key(3)] }),
    });
    vi.stubGlobal('fetch', f.fetch);
    const session = useSessionStore();
    session.user = { id: 8, email: 'bo@kettleworks.test', name: 'Bo', role: 'billing', accountIds: [] };
    session.loaded = true;
    const wrapper = mount(
      { components: { KeysView }, template: '<v-app><KeysView /></v-app>' },
      { global: { plugins: [createVuetify({ components, directives })] }, attachTo: document.body },
    );
    await settle();
    // Contract roles: billing is read-only on keys.
    expect(document.body.textContent).toContain('key 3');
    expect([...document.querySelectorAll('button')].some((b) => b.textContent?.trim() === 'New key')).toBe(
      false,
    );
    expect(document.querySelector('[aria-label="Revoke key 3"]')).toBeNull();
    wrapper.unmount();
  });
});
