/**
 * Billing in the console: amounts arrive in the currency's minor unit and must be shown in the
 * major unit with the currency's own number of decimals (ISO 4217), formatted by Intl (CLDR).
 */
import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import type { StatementDetail } from '../../shared/console/billing.js';
import { createApiClient } from '../../console/src/api/client.js';
import { formatMonth } from '../../console/src/composables/dates.js';
import { formatMinor, minorDigits } from '../../console/src/composables/money.js';
import StatementDetailCard from '../../console/src/components/billing/StatementDetailCard.vue';
import {
  monthIsOver,
  previousUtcMonth,
  useBillingClient,
  useBillingStore,
} from '../../console/src/stores/billing.js';

/** Intl puts a no-break space (U+00A0) or narrow no-break space between number and symbol. */
const spaces = (s: string) => s.replace(/[\u00a0\u202f]/g, ' ');

describe('minor-unit amounts', () => {
  it('uses the ISO 4217 minor unit of each currency: 2 for EUR and USD, 0 for JPY, 3 for BHD and KWD', () => {
    // Source: ISO 4217 currency code list, "minor unit" column (from memory)
    expect(minorDigits('EUR')).toBe(2);
    expect(minorDigits('USD')).toBe(2);
    expect(minorDigits('JPY')).toBe(0);
    expect(minorDigits('BHD')).toBe(3);
    expect(minorDigits('KWD')).toBe(3);
  });

  it('shows 123456 euro cents as €1,234.56 in English and 1.234,56 € in German', () => {
    // Source: CLDR number patterns for en (¤#,##0.00) and de (#,##0.00 ¤, "." grouping, "," decimal) — from memory
    expect(formatMinor(123456, 'eur', 'en-US')).toBe('€1,234.56');
    expect(spaces(formatMinor(123456, 'eur', 'de-DE'))).toBe('1.234,56 €');
  });

  it('does not divide yen by 100, and gives dinars three decimals', () => {
    // Source: ISO 4217 minor units (JPY 0, BHD 3), from memory; CLDR en pattern for the symbols
    expect(formatMinor(1234, 'jpy', 'en-US')).toBe('¥1,234');
    expect(spaces(formatMinor(1234, 'bhd', 'en-US'))).toBe('BHD 1.234');
  });

  it('writes months as YYYY-MM in UTC, so the first of a month never slips into the one before', () => {
    // Source: ISO 8601 calendar month YYYY-MM (from memory)
    expect(formatMonth('2031-03')).toBe('2031-03');
    expect(formatMonth('2031-03-01T00:00:00Z')).toBe('2031-03');
    // Source: calendar arithmetic — the month before January 2032 is December 2031 (from memory)
    expect(previousUtcMonth(new Date('2032-01-15T00:00:00Z'))).toBe('2031-12');
  });
});

describe('finalizing only a month that is over', () => {
  it('treats December as running until midnight UTC on 1 January, and over from then', () => {
    // Source: UTC calendar — a month ends at 00:00:00Z on the first of the next; the year rolls over after December (from memory)
    expect(monthIsOver('2026-12', new Date('2026-12-31T23:59:59.999Z'))).toBe(false);
    expect(monthIsOver('2026-12', new Date('2027-01-01T00:00:00.000Z'))).toBe(true);
    // 1 January 00:30 in Berlin (UTC+1) is still 31 December in UTC
    expect(monthIsOver('2026-12', new Date('2027-01-01T00:30:00+01:00'))).toBe(false);
  });
});

describe('statement detail', () => {
  const vuetify = createVuetify({ components });
  // An invented statement; its numbers follow the rule printed in shared/console/billing.ts:
  // 23 456 units, 10 000 included → 13 456 overage → ceil(13 456 / 1000) = 14 blocks.
  const statement: StatementDetail = {
    id: 7,
    accountId: 3,
    accountName: 'Saltmarsh Cooperative (invented)',
    month: '2031-03',
    planName: 'process',
    planDisplayName: 'Process',
    units: 23456,
    includedUnits: 10000,
    overageUnits: 13456,
    overageBlocks: 14,
    amountMinor: 4900 + 14 * 250,
    currency: 'eur',
    status: 'finalized',
    providerInvoiceId: 'in_fake_123',
    createdAt: '2031-04-01T00:00:00.000Z',
    finalizedAt: '2031-04-02T09:00:00.000Z',
    paidAt: null,
    billingEmail: 'accounts@saltmarsh.example',
    monthlyFeeMinor: 4900,
    pricePer1000UnitsMinor: 250,
    lineItems: [
      {
        code: 'monthly-fee',
        description: 'Process plan, March 2031',
        quantity: 1,
        unitAmountMinor: 4900,
        amountMinor: 4900,
      },
      {
        code: 'overage',
        description: 'Blocks of 1000 units beyond the plan',
        quantity: 14,
        unitAmountMinor: 250,
        amountMinor: 3500,
      },
    ],
  };

  it('shows the total in euros with two decimals and the provider invoice id', () => {
    const wrapper = mount(StatementDetailCard, {
      props: {
        statement,
        csvUrl: '/console-api/statements/7/export.csv',
        canFinalize: true,
        monthOver: true,
      },
      global: { plugins: [vuetify] },
    });
    // Source: ceil(13456/1000) = 14 (arithmetic); 4900 + 14 × 250 = 8400 cents = €84.00 (ISO 4217: EUR has 2 decimals) (from memory)
    expect(wrapper.get('[data-test="statement-total"]').text()).toBe(formatMinor(8400, 'eur'));
    expect(spaces(formatMinor(8400, 'eur', 'en-US'))).toBe('€84.00');
    expect(wrapper.get('[data-test="invoice-id"]').text()).toBe('in_fake_123');
    // A finalized statement cannot be finalized again.
    expect(wrapper.find('[data-test="finalize"]').exists()).toBe(false);
  });

  it('shows stored states in the console’s words: an invoiced statement reads Issued, never finalized', () => {
    const wrapper = mount(StatementDetailCard, {
      props: { statement, csvUrl: '/x.csv', canFinalize: true, monthOver: true },
      global: { plugins: [vuetify] },
    });
    const text = wrapper.text();
    expect(text).toContain('Issued');
    expect(text).toContain('Payment reference');
    expect(text.toLowerCase()).not.toContain('finaliz');
  });

  it('offers a draft the action “Issue statement”', () => {
    const wrapper = mount(StatementDetailCard, {
      props: {
        statement: { ...statement, status: 'draft', providerInvoiceId: null, finalizedAt: null },
        csvUrl: '/x.csv',
        canFinalize: true,
        monthOver: true,
      },
      global: { plugins: [vuetify] },
    });
    expect(wrapper.get('[data-test="finalize"]').text()).toBe('Issue statement');
    expect(wrapper.text()).toContain('Draft');
  });

  it('has a close button that asks its dialog to close', async () => {
    const wrapper = mount(StatementDetailCard, {
      props: { statement, csvUrl: '/x.csv', canFinalize: false, monthOver: true },
      global: { plugins: [vuetify] },
    });
    await wrapper.get('[data-test="close-statement"]').trigger('click');
    expect(wrapper.emitted('close')).toHaveLength(1);
  });

  it('writes unit counts with the locale’s thousands separator', () => {
    const wrapper = mount(StatementDetailCard, {
      props: { statement, csvUrl: '/x.csv', canFinalize: false, monthOver: true },
      global: { plugins: [vuetify] },
    });
    const text = wrapper.text();
    // The count formatter of the console (Intl.NumberFormat with grouping), applied to 23 456.
    expect(text).toContain(new Intl.NumberFormat().format(23456));
    expect(text).not.toContain('23456');
  });
});

describe('billing store', () => {
  beforeEach(() => setActivePinia(createPinia()));

  it('asks for the statements of the chosen month and account, and posts the finalize with the CSRF header', async () => {
    const calls: { url: string; init: RequestInit }[] = [];
    const fetch = vi.fn(async (url: string, init: RequestInit) => {
      calls.push({ url, init });
      const body = url.includes('/finalize')
        ? { statement: { id: 7, status: 'finalized', providerInvoiceId: 'in_1' }, mailedTo: null }
        : { items: [] };
      return new Response(JSON.stringify(body), {
        status: 200,
        headers: { 'content-type': 'application/json' },
      });
    });
    useBillingClient(
      createApiClient({ fetch: fetch as unknown as typeof globalThis.fetch, readCookie: () => 'tok' }),
    );
    const store = useBillingStore();
    await store.applyFilters({ month: '2031-03', accountId: 3 });
    // Source: WHATWG URL Standard, application/x-www-form-urlencoded serializer (URLSearchParams) (from memory)
    expect(calls[0]!.url).toBe('/console-api/statements?month=2031-03&accountId=3');
    await store.finalize(7);
    const post = calls[1]!;
    expect(post.url).toBe('/console-api/statements/7/finalize');
    expect(post.init.method).toBe('POST');
    // Source: OWASP CSRF Prevention Cheat Sheet, double-submit cookie (header equals cookie) (from memory)
    expect((post.init.headers as Record<string, string>)['X-CSRF-Token']).toBe('tok');
  });
});
