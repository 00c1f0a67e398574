// The local fake of the payment provider, driven through the official `stripe` SDK over real
// loopback HTTP. What is checked against outside sources:
// - the webhook signature scheme: Stripe's documented "verify signatures manually" steps
//   (docs.stripe.com/webhooks#verify-manually, recalled, and restated in the issue 4 brief):
//   header `t=<unix seconds>,v1=<hex HMAC-SHA256(secret, "<t>.<raw body>")>`;
// - the SDK's own error classes and its `webhooks.constructEvent` (the provider's published SDK);
// - invoice amounts are the sum of the invoice items (Stripe API reference: invoice `amount_due`,
//   from memory).
import crypto from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import Stripe from 'stripe';
import { afterEach, describe, expect, it } from 'vitest';
import { createPaymentsClient } from '../../server/integrations/payments/client.js';
import {
  startFakePaymentProvider,
  type FakePaymentProvider,
} from '../../server/integrations/payments/fake-provider.js';

const apiKey = 'sk_test_fake_provider_test_key';
const webhookSecret = 'whsec_fake_provider_test_secret';

interface Received {
  headers: http.IncomingHttpHeaders;
  body: string;
}

async function receiver(): Promise<{ url: string; received: Received[]; close(): Promise<void> }> {
  const received: Received[] = [];
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      received.push({ headers: req.headers, body: Buffer.concat(chunks).toString('utf8') });
      res.writeHead(200, { 'Content-Type': 'application/json' }).end('{"received":true}');
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/hook`,
    received,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

const cleanups: (() => Promise<void>)[] = [];
afterEach(async () => {
  while (cleanups.length > 0) await cleanups.pop()?.();
});

async function setup(opts: { autoPay?: boolean } = {}) {
  const hook = await receiver();
  const fake: FakePaymentProvider = await startFakePaymentProvider({
    webhookUrl: hook.url,
    webhookSecret,
    apiKey,
    autoPayAfterFinalize: opts.autoPay ?? false,
  });
  cleanups.push(hook.close, fake.close);
  const sdk = createPaymentsClient({ enabled: true, apiKey, apiBase: new URL(fake.url), webhookSecret });
  return { hook, fake, sdk };
}

describe('fake payment provider through the SDK', () => {
  it('creates a customer, a draft invoice with items, and finalizes it to an open invoice', async () => {
    const { fake, sdk } = await setup();
    const customer = await sdk.customers.create({ email: 'billing@works.invalid', name: 'Invented Works' });
    expect(customer.id).toMatch(/^cust-/); // the local fake's own id shapes (fake-provider.ts randomId)
    const again = await sdk.customers.retrieve(customer.id);
    expect(again).toMatchObject({ id: customer.id, email: 'billing@works.invalid' });
    const invoice = await sdk.invoices.create({
      customer: customer.id,
      currency: 'eur',
      collection_method: 'send_invoice',
      days_until_due: 30,
      metadata: { statementId: '7' },
    });
    expect(invoice.id).toMatch(/^inv-/);
    expect(invoice.status).toBe('draft');
    await sdk.invoiceItems.create({
      customer: customer.id,
      invoice: invoice.id,
      amount: 4_900,
      currency: 'eur',
    });
    await sdk.invoiceItems.create({
      customer: customer.id,
      invoice: invoice.id,
      amount: 300,
      currency: 'eur',
    });
    const finalized = await sdk.invoices.finalizeInvoice(invoice.id);
    // amount_due = sum of items: 4900 + 300 = 5200 (hand-computed).
    expect(finalized).toMatchObject({ status: 'open', amount_due: 5_200, metadata: { statementId: '7' } });
    // The SDK sends form-encoded bodies: nested metadata arrives as metadata[statementId].
    const create = fake.state.requests.find((r) => r.path === '/v1/invoices');
    expect(create?.body).toMatchObject({ metadata: { statementId: '7' }, days_until_due: '30' });
  });

  it('answers a wrong API key with the error the SDK maps to its authentication error', async () => {
    const { fake } = await setup();
    const wrong = createPaymentsClient({
      enabled: true,
      apiKey: 'sk_test_wrong',
      apiBase: new URL(fake.url),
      webhookSecret,
    });
    await expect(wrong.customers.create({ email: 'x@y.invalid' })).rejects.toBeInstanceOf(
      Stripe.errors.StripeAuthenticationError,
    );
  });

  it('refuses items on a finalized invoice with an invalid-request error', async () => {
    const { sdk } = await setup();
    const customer = await sdk.customers.create({});
    const invoice = await sdk.invoices.create({ customer: customer.id, currency: 'eur' });
    await sdk.invoiceItems.create({
      customer: customer.id,
      invoice: invoice.id,
      amount: 100,
      currency: 'eur',
    });
    await sdk.invoices.finalizeInvoice(invoice.id);
    await expect(
      sdk.invoiceItems.create({ customer: customer.id, invoice: invoice.id, amount: 1, currency: 'eur' }),
    ).rejects.toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
  });

  it('replays the first response for a repeated Idempotency-Key instead of creating twice', async () => {
    const { fake, sdk } = await setup();
    const a = await sdk.customers.create({ name: 'Once' }, { idempotencyKey: 'same-key-1' });
    const b = await sdk.customers.create({ name: 'Once' }, { idempotencyKey: 'same-key-1' });
    expect(b.id).toBe(a.id);
    expect(fake.state.customers.size).toBe(1);
  });

  it('pays an invoice and delivers invoice.paid signed per the documented scheme', async () => {
    const { hook, fake, sdk } = await setup();
    const customer = await sdk.customers.create({});
    const invoice = await sdk.invoices.create({ customer: customer.id, currency: 'eur' });
    await sdk.invoiceItems.create({
      customer: customer.id,
      invoice: invoice.id,
      amount: 1_234,
      currency: 'eur',
    });
    await sdk.invoices.finalizeInvoice(invoice.id);
    const res = await fetch(`${fake.url}/test/invoices/${invoice.id}/pay`, {
      method: 'POST',
      headers: { Authorization: `Bearer ${apiKey}` },
    });
    expect(res.status).toBe(200);
    expect(hook.received).toHaveLength(1);
    const delivered = hook.received[0]!;
    const header = String(delivered.headers['stripe-signature']);
    // Stripe docs, verify manually: split on ',', take t= and v1=, HMAC-SHA256 over "t.payload".
    const parts = Object.fromEntries(header.split(',').map((kv) => kv.split('=') as [string, string]));
    const expected = crypto
      .createHmac('sha256', webhookSecret)
      .update(`${parts.t}.${delivered.body}`)
      .digest('hex');
    expect(parts.v1).toBe(expected);
    expect(Math.abs(Number(parts.t) - Date.now() / 1000)).toBeLessThan(60);
    // And the provider's SDK accepts it.
    const event = Stripe.webhooks.constructEvent(delivered.body, header, webhookSecret);
    expect(event.type).toBe('invoice.paid');
    expect((event.data.object as { id: string; status: string }).status).toBe('paid');
    expect((event.data.object as { id: string }).id).toBe(invoice.id);
  });

  it('marks a zero-amount invoice paid at finalization and pays others when auto-pay is on', async () => {
    const { hook, fake, sdk } = await setup({ autoPay: true });
    const customer = await sdk.customers.create({});
    const zero = await sdk.invoices.create({ customer: customer.id, currency: 'eur' });
    // Stripe's invoice workflow: an invoice with nothing due is paid on finalization (from memory).
    expect((await sdk.invoices.finalizeInvoice(zero.id)).status).toBe('paid');
    const due = await sdk.invoices.create({ customer: customer.id, currency: 'eur' });
    await sdk.invoiceItems.create({ customer: customer.id, invoice: due.id, amount: 500, currency: 'eur' });
    expect((await sdk.invoices.finalizeInvoice(due.id)).status).toBe('open');
    await new Promise((r) => setTimeout(r, 20));
    await fake.settle();
    expect((await sdk.invoices.retrieve(due.id)).status).toBe('paid');
    expect(hook.received.map((r) => (JSON.parse(r.body) as { type: string }).type)).toEqual([
      'invoice.paid',
      'invoice.paid',
    ]);
  });
});
