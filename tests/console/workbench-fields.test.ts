// The workbench form as the browser shows it: generated from the single-effect request schema the
// console API serves, it marks optional fields, keeps what is typed ("2." while the body holds 2),
// sends text with a unit as typed, and shows the API's message under the field it names.
import { flushPromises, mount } from '@vue/test-utils';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h, ref } from 'vue';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import * as directives from 'vuetify/directives';
import SchemaForm from '../../console/src/components/workbench/SchemaForm.vue';
import { formFields, setAt, type JsonSchema } from '../../console/src/composables/workbench-form.js';
import { workbenchOperations } from '../../server/http/workbench.js';

const schema = workbenchOperations().find((o) => o.id === 'evaporators.single-effect')!.body as JsonSchema;

class NoopResizeObserver {
  observe() {}
  unobserve() {}
  disconnect() {}
}

beforeEach(() => {
  vi.stubGlobal('ResizeObserver', NoopResizeObserver);
  document.body.innerHTML = '';
});
afterEach(() => vi.unstubAllGlobals());

/** The form around a body it owns, as the view holds it. */
function mountForm(initial: Record<string, unknown>, messages: Record<string, string[]> = {}) {
  const body = ref<Record<string, unknown>>(initial);
  const Host = defineComponent({
    setup: () => () =>
      h(SchemaForm, {
        fields: formFields(schema),
        body: body.value,
        messages,
        onUpdate: (path: string, value: unknown) => (body.value = setAt(body.value, path, value)),
      }),
  });
  const wrapper = mount(Host, {
    global: { plugins: [createVuetify({ components, directives })] },
    attachTo: document.body,
  });
  return { wrapper, body };
}

function input(path: string): HTMLInputElement {
  const el = document.querySelector<HTMLInputElement>(`[data-field="${path}"] input`);
  if (!el) throw new Error(`no input for ${path}`);
  return el;
}

async function type(path: string, text: string): Promise<void> {
  const el = input(path);
  el.value = text;
  el.dispatchEvent(new Event('input'));
  await flushPromises();
}

describe('workbench form', () => {
  it('shows the body’s values in sections and says which fields are optional', async () => {
    const { wrapper } = mountForm({ liquor: 'sodium-hydroxide', feed: { massFlow: '4.5 t/h' } });
    await flushPromises();
    expect(input('liquor').value).toBe('sodium-hydroxide');
    expect(input('feed.massFlow').value).toBe('4.5 t/h');
    const feed = document.querySelector('[data-section="feed"]')!;
    expect(feed.querySelector('legend')?.textContent?.trim()).toBe('Feed');
    expect(document.querySelector('[data-section="product"] legend')?.textContent).toMatch(/\(optional\)/);
    expect(document.querySelector('[data-field="feed.enthalpy"]')?.textContent).toMatch(
      /Enthalpy \(optional\)/,
    );
    wrapper.unmount();
  });

  it('sends a number as a number, keeps "2." as typed, and sends a value with its unit as text', async () => {
    const { wrapper, body } = mountForm({});
    await type('body.pressure', '2.');
    expect(body.value).toEqual({ body: { pressure: 2 } });
    expect(input('body.pressure').value).toBe('2.');
    await type('body.pressure', '20 kPa');
    expect(body.value).toEqual({ body: { pressure: '20 kPa' } });
    await type('body.pressure', '');
    expect(body.value).toEqual({});
    wrapper.unmount();
  });

  it('shows the API’s message under the field it names instead of the field’s hint', async () => {
    const message = 'body.pressure: unknown unit "furlongs" for a pressure';
    const { wrapper } = mountForm({ body: { pressure: '20 furlongs' } }, { 'body.pressure': [message] });
    await flushPromises();
    const field = document.querySelector('[data-field="body.pressure"]')!;
    expect(field.textContent).toContain(message);
    expect(field.querySelector('.v-input--error')).not.toBeNull();
    wrapper.unmount();
  });
});
