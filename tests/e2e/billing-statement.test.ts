// Browser flow 2 (billing): generate last month's statements, finalize one (the server creates the
// invoice through the provider SDK at the local fake), and see the statement turn paid once the
// fake provider's signed invoice.paid webhook has reached /webhooks/payments.
import { describe, expect, it } from 'vitest';
import {
  DEMO_BILLING_EMAIL,
  DEMO_CONSOLE_PASSWORD,
  openFromDrawer,
  screenshot,
  setUpConsoleFlow,
  signIn,
} from './harness.js';

const flow = setUpConsoleFlow();

/** The previous calendar month in UTC, "YYYY-MM" (a month that is over, so it may be finalized). */
function previousUtcMonth(now = new Date()): string {
  const d = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1));
  return `${d.getUTCFullYear()}-${String(d.getUTCMonth() + 1).padStart(2, '0')}`;
}

/** server/seed/demo.ts: the account the demo usage is metered on. */
const DEMO_ACCOUNT = 'Saltmarsh Chlor-Alkali Works';

describe('billing: statement generated, finalized, paid through the provider webhook', () => {
  const month = previousUtcMonth();
  let invoiceId = '';

  async function showMonth() {
    const { page } = flow.browser;
    await page.getByLabel('Month (UTC)').fill(month);
    await flow.browser.settle(300, 3000);
  }

  it('signs in as billing and generates the drafts of last month', async () => {
    const { page } = flow.browser;
    await signIn(page, flow.server.origin, DEMO_BILLING_EMAIL, DEMO_CONSOLE_PASSWORD);
    await openFromDrawer(page, 'Billing');
    await showMonth();
    await page.getByRole('button', { name: 'Generate drafts' }).click();
    const row = page.locator('.v-data-table tbody tr', { hasText: DEMO_ACCOUNT });
    await row.first().waitFor();
    expect(await row.first().textContent()).toContain('Draft');
  }, 60_000);

  it('finalizes the statement, which creates the provider invoice', async () => {
    const { page } = flow.browser;
    await page.locator('.v-data-table tbody tr', { hasText: DEMO_ACCOUNT }).first().click();
    await page.locator('[data-test="finalize"]').click();
    await page.locator('[data-test="confirm-finalize"]').click();
    const invoice = page.locator('[data-test="invoice-id"]');
    await invoice.waitFor();
    invoiceId = ((await invoice.textContent()) ?? '').trim();
    // The local fake gives invoice ids of its own shape, "inv-…" (fake-provider.ts randomId).
    expect(invoiceId).toMatch(/^inv-/);
  }, 60_000);

  it('shows the statement paid after a reload, once the signed webhook has arrived', async () => {
    const { page } = flow.browser;
    let text = '';
    for (let attempt = 0; attempt < 20 && !text.includes('Settled'); attempt++) {
      await page.reload();
      await page.getByRole('heading', { level: 1, name: 'Billing' }).waitFor();
      await showMonth();
      text =
        (await page.locator('.v-data-table tbody tr', { hasText: DEMO_ACCOUNT }).first().textContent()) ?? '';
      if (!text.includes('Settled')) await page.waitForTimeout(500);
    }
    expect(text).toContain('Settled'); // the console's word for a paid statement
    expect(text).toContain(invoiceId);
    await screenshot(page, 'billing');
  }, 60_000);

  it('agrees with the provider: the invoice is paid at the fake provider too', async () => {
    const res = await fetch(`http://127.0.0.1:${flow.server.paymentsPort}/v1/invoices/${invoiceId}`, {
      headers: { Authorization: 'Bearer ebpay_dev_key_local' },
    });
    expect(res.status).toBe(200);
    const invoice = (await res.json()) as { status: string; amount_remaining: number };
    // Stripe API reference, "The Invoice object": status "paid" with nothing remaining.
    expect(invoice.status).toBe('paid');
    expect(invoice.amount_remaining).toBe(0);
  });

  it('made no request outside the server origin', () => {
    expect(flow.browser.foreignRequests()).toEqual([]);
    expect(flow.browser.pageErrors).toEqual([]);
  });
});
