// The key dialogs take the key as a prop and answer with events: the page decides what a
// confirmation does. Sources: the console API contract (shared/console/keys.ts: rotate takes
// overlapSeconds, 0 to 30 days; the page's default is 24 h) and the Vue style guide (props down,
// events up; from memory).
import { flushPromises, mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import * as directives from 'vuetify/directives';
import KeyRevokeDialog from '../../console/src/components/keys/KeyRevokeDialog.vue';
import KeyRotateDialog from '../../console/src/components/keys/KeyRotateDialog.vue';
import type { ConsoleKey } from '../../shared/console/keys.js';

const apiKey = {
  id: 3,
  publicId: 'k3',
  accountId: 2,
  accountName: 'Kettle Works',
  name: 'plant historian',
  prefix: 'ebk1.Qm9',
  scopes: ['steam'],
  rateLimitPerMinute: 60,
  createdAt: '2031-03-01T10:00:00.000Z',
  expiresAt: null,
  revokedAt: null,
  lastUsedAt: null,
  rotatedFromId: null,
  state: 'active',
} as ConsoleKey;

class NoopResizeObserver {
  observe() {}
  unobserve() {}
  disconnect() {}
}

beforeEach(() => {
  setActivePinia(createPinia());
  vi.stubGlobal('ResizeObserver', NoopResizeObserver);
  // Vuetify's overlays read window.visualViewport (CSSOM View), absent in happy-dom.
  vi.stubGlobal('visualViewport', {
    width: 1280,
    height: 800,
    scale: 1,
    offsetLeft: 0,
    offsetTop: 0,
    addEventListener() {},
    removeEventListener() {},
  });
  document.body.innerHTML = '';
});
afterEach(() => vi.unstubAllGlobals());

function mountDialog(component: typeof KeyRevokeDialog | typeof KeyRotateDialog, key: ConsoleKey | null) {
  return mount(component, {
    props: { apiKey: key, busy: false },
    global: { plugins: [createVuetify({ components, directives })] },
    attachTo: document.body,
  });
}

function button(label: string): HTMLButtonElement {
  const b = [...document.querySelectorAll('button')].find((el) => el.textContent?.trim() === label);
  if (!b) throw new Error(`no button "${label}" in ${document.body.textContent}`);
  return b;
}

describe('key dialogs', () => {
  it('names the key to revoke and answers Revoke with confirm, Keep it with cancel', async () => {
    const wrapper = mountDialog(KeyRevokeDialog, apiKey);
    await flushPromises();
    expect(document.body.textContent).toContain('plant historian');
    expect(document.body.textContent).toContain('ebk1.Qm9…');
    button('Revoke').click();
    button('Keep it').click();
    expect(wrapper.emitted('confirm')).toHaveLength(1);
    expect(wrapper.emitted('cancel')).toHaveLength(1);
    wrapper.unmount();
  });

  it('answers Rotate with the chosen overlap, 24 hours unless changed', async () => {
    const wrapper = mountDialog(KeyRotateDialog, apiKey);
    await flushPromises();
    button('Rotate').click();
    expect(wrapper.emitted('confirm')?.[0]).toEqual([86_400]);
    wrapper.unmount();
  });

  it('shows nothing without a key', async () => {
    const wrapper = mountDialog(KeyRotateDialog, null);
    await flushPromises();
    expect(document.body.textContent).not.toContain('Rotate this key');
    wrapper.unmount();
  });
});
