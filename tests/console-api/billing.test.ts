// Console billing routes end to end: statements from metered usage, finalize through the official
// `stripe` SDK against the local fake provider over loopback HTTP, the signed webhook, roles,
// CSV export and the statement-ready mail.
//
// Outside references:
// - statement rule and roles: the issue 4 brief (amount = fee + ceil(overage/1000)·price; billing
//   and admin may finalize, developer may not) — expected amounts are hand-computed below;
// - webhook signatures: Stripe's documented scheme (docs.stripe.com/webhooks#verify-manually,
//   recalled): `Stripe-Signature: t=<unix s>,v1=<hex HMAC-SHA256(secret, "<t>.<raw body>")>`,
//   and the SDK's default 300 s tolerance (stripe-node Webhooks.DEFAULT_TOLERANCE);
// - CSV: RFC 4180 (CRLF records, quoted fields); formula neutralising: OWASP "CSV Injection".
import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { configurePayments } from '../../server/integrations/payments/client.js';
import { createAccount } from '../../server/accounts/accounts.js';
import {
  API_KEY,
  WEBHOOK_SECRET,
  mailRows,
  makeBillingHarness,
  meter,
  type BillingHarness,
} from '../billing/harness.js';

let h: BillingHarness;
beforeAll(async () => {
  h = await makeBillingHarness();
  // March 2031 usage. Alpha (Professional: 50 000 included, €49.00, €1.00 per 1000):
  // 30 000 + 31 001 = 61 001 units. Beta (Starter: 10 000 included, no fee): exactly 10 000.
  await meter(h, h.alphaId, 30_000, '2031-03-02T08:00:00Z');
  await meter(h, h.alphaId, 31_001, '2031-03-31T23:59:59Z');
  await meter(h, h.alphaId, 999_999, '2031-04-01T00:00:00Z'); // April: must not count for March
  await meter(h, h.betaId, 10_000, '2031-03-15T12:00:00Z');
});
afterAll(async () => {
  await h.close();
});

interface StatementBody {
  id: number;
  accountId: number;
  status: string;
  units: number;
  overageUnits: number;
  overageBlocks: number;
  amountMinor: number;
  providerInvoiceId: string | null;
  paidAt: string | null;
  lineItems?: { code: string; quantity: number; unitAmountMinor: number; amountMinor: number }[];
}

/** The audit log, read through the store. */
function auditRows() {
  return h.deps.store.db.select().from(h.deps.store.t.auditLog);
}

/** Stored payment events (with this id, if given). */
async function paymentEventCount(id?: string): Promise<number> {
  const [row] = await h.deps.store.rows<{ n: number | string }>(
    id === undefined
      ? sql`SELECT COUNT(*) AS n FROM payment_events`
      : sql`SELECT COUNT(*) AS n FROM payment_events WHERE id = ${id}`,
  );
  return Number(row?.n);
}

function statementOf(items: StatementBody[], accountId: number): StatementBody {
  const s = items.find((i) => i.accountId === accountId);
  if (!s) throw new Error(`no statement for account ${accountId}`);
  return s;
}

describe('plans and roles', () => {
  it('lists the plans for admin and billing and refuses a developer and a signed-out caller', async () => {
    for (const who of [h.admin, h.billing]) {
      const res = await who.agent.get('/console-api/plans').expect(200);
      expect((res.body.items as { name: string }[]).map((p) => p.name)).toEqual([
        'starter',
        'professional',
        'plant',
      ]);
    }
    // Roles per the issue 4 brief: developer has no billing access (403); no session → 401.
    await h.developer.agent.get('/console-api/plans').expect(403);
    await h.anonymous.agent.get('/console-api/plans').expect(401);
    await h.developer.agent.get('/console-api/statements').expect(403);
    await h.developer.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.developer.csrf)
      .send({ month: '2031-03' })
      .expect(403);
  });

  it('refuses a generate request without the CSRF header', async () => {
    const res = await h.billing.agent.post('/console-api/statements/generate').send({ month: '2031-03' });
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/csrf-failed');
  });

  it('rejects a month that is not YYYY-MM with the field named', async () => {
    const res = await h.billing.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ month: '2031-3' });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('month');
  });
});

describe('statements', () => {
  it('generates March drafts from the month’s usage only, with hand-computed amounts', async () => {
    const res = await h.billing.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ month: '2031-03' })
      .expect(200);
    expect(res.body).toMatchObject({
      month: '2031-03',
      monthComplete: true,
      created: 2,
      refreshed: 0,
      frozen: 0,
    });
    const alpha = statementOf(res.body.items, h.alphaId);
    // 61 001 − 50 000 = 11 001 over → ceil(11.001) = 12 blocks → 4900 + 12·100 = 6100 (hand-computed).
    expect(alpha).toMatchObject({
      status: 'draft',
      units: 61_001,
      overageUnits: 11_001,
      overageBlocks: 12,
      amountMinor: 6_100,
    });
    // Beta: exactly the 10 000 included, no fee → 0 (hand-computed boundary).
    expect(statementOf(res.body.items, h.betaId)).toMatchObject({
      units: 10_000,
      overageUnits: 0,
      amountMinor: 0,
    });
    const audit = await auditRows();
    expect(audit.some((a) => a.action === 'statement.generate' && a.targetId === '2031-03')).toBe(true);
  });

  it('refreshes a draft when late usage arrives, and skips an account whose plan does not exist', async () => {
    await meter(h, h.betaId, 1, '2031-03-20T00:00:00Z');
    const ghost = await createAccount(h.deps.store, {
      name: 'Invented Ghost Plan Ltd',
      plan: 'no-such-plan',
      now: new Date('2031-02-01T00:00:00Z'),
    });
    const res = await h.admin.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ month: '2031-03' })
      .expect(200);
    expect(res.body).toMatchObject({ created: 0, refreshed: 2 });
    expect(res.body.skipped).toEqual([expect.objectContaining({ accountId: ghost.id })]);
    // Beta now 10 001 units: 1 over → 1 block × 150 = 150 (hand-computed, Starter €1.50/1000).
    expect(statementOf(res.body.items, h.betaId)).toMatchObject({ overageBlocks: 1, amountMinor: 150 });
  });

  it('gives no draft for a month that ended before the account was created', async () => {
    const late = await createAccount(h.deps.store, {
      name: 'Invented Newcomer Evaporation',
      plan: 'starter',
      // One second after March 2031 ended (UTC).
      now: new Date('2031-04-01T00:00:01Z'),
    });
    const res = await h.billing.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ month: '2031-03' })
      .expect(200);
    expect((res.body.items as StatementBody[]).map((i) => i.accountId)).not.toContain(late.id);
    expect(res.body.created).toBe(0);
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${late.id}`)
      .expect(200);
    expect(list.body.items).toEqual([]);
  });

  it('writes counts in statement lines with a thousands separator', async () => {
    const res = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.alphaId}`)
      .expect(200);
    const id = (res.body.items as StatementBody[])[0]!.id;
    const detail = await h.billing.agent.get(`/console-api/statements/${id}`).expect(200);
    const text = (detail.body.lineItems as { description: string }[]).map((l) => l.description).join(' | ');
    // Alpha's plan includes 50 000 units; its 11 001 over are billed per block of 1 000.
    expect(text).toContain('includes 50,000 units');
    expect(text).toContain('11,001 units beyond the included 50,000');
    expect(text).not.toMatch(/\d{5}/);
  });

  it('lists statements by month and account and shows line items that sum to the amount', async () => {
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.alphaId}`)
      .expect(200);
    expect(list.body.items).toHaveLength(1);
    const id = (list.body.items[0] as StatementBody).id;
    const detail = await h.billing.agent.get(`/console-api/statements/${id}`).expect(200);
    const body = detail.body as StatementBody;
    expect(body.lineItems).toEqual([
      expect.objectContaining({
        code: 'monthly-fee',
        quantity: 1,
        unitAmountMinor: 4_900,
        amountMinor: 4_900,
      }),
      expect.objectContaining({ code: 'overage', quantity: 12, unitAmountMinor: 100, amountMinor: 1_200 }),
    ]);
    await h.billing.agent.get('/console-api/statements/99999').expect(404);
  });

  it('exports the line items as RFC 4180 CSV and neutralises a formula-like account name', async () => {
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.alphaId}`)
      .expect(200);
    const id = (list.body.items[0] as StatementBody).id;
    const res = await h.billing.agent.get(`/console-api/statements/${id}/export.csv`).expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    const lines = (res.text as string).split('\r\n');
    // RFC 4180: header record, one record per line item, CRLF line breaks (final CRLF allowed).
    expect(lines[0]).toBe(
      'statement_id,account_id,account_name,month,status,line,description,quantity,unit_amount_minor,amount_minor,currency',
    );
    expect(lines).toHaveLength(4);
    expect(lines[1]).toMatch(/,monthly-fee,.*,1,4900,4900,eur$/);
    expect(lines[2]).toMatch(/,overage,.*,12,100,1200,eur$/);

    const evil = await createAccount(h.deps.store, {
      name: '=HYPERLINK("x")',
      plan: 'professional',
      // An account of March 2031 (a later one gets no March statement).
      now: new Date('2031-03-01T00:00:00Z'),
    });
    await h.billing.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ month: '2031-03' })
      .expect(200);
    const evilList = await h.billing.agent.get(`/console-api/statements?accountId=${evil.id}`).expect(200);
    const csv = await h.billing.agent
      .get(`/console-api/statements/${(evilList.body.items[0] as StatementBody).id}/export.csv`)
      .expect(200);
    // OWASP CSV Injection: prefix a leading '=' with a quote; RFC 4180: double the inner quotes.
    expect(csv.text).toContain(`,"'=HYPERLINK(""x"")",`);
  });
});

describe('finalize through the payment provider', () => {
  it('refuses to finalize a month that is not over yet', async () => {
    await meter(h, h.alphaId, 5, '2031-04-02T00:00:00Z');
    const gen = await h.billing.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ month: '2031-04' })
      .expect(200);
    expect(gen.body.monthComplete).toBe(false);
    const april = statementOf(gen.body.items, h.alphaId);
    const res = await h.billing.agent
      .post(`/console-api/statements/${april.id}/finalize`)
      .set('X-CSRF-Token', h.billing.csrf);
    expect(res.status).toBe(409);
  });

  it('refuses a developer (403) and lets billing finalize into a provider invoice with the same amount', async () => {
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.alphaId}`)
      .expect(200);
    const id = (list.body.items[0] as StatementBody).id;
    await h.developer.agent
      .post(`/console-api/statements/${id}/finalize`)
      .set('X-CSRF-Token', h.developer.csrf)
      .expect(403);
    const res = await h.billing.agent
      .post(`/console-api/statements/${id}/finalize`)
      .set('X-CSRF-Token', h.billing.csrf)
      .expect(200);
    const statement = res.body.statement as StatementBody;
    expect(statement).toMatchObject({ status: 'finalized', amountMinor: 6_100 });
    expect(statement.providerInvoiceId).toMatch(/^inv-/);
    expect(res.body.mailedTo).toBe('accounts@alpha.invalid');
    // What the provider holds, read back through its own API (the fake's state).
    const invoice = h.fake.state.invoices.get(statement.providerInvoiceId ?? '');
    expect(invoice).toMatchObject({
      status: 'open',
      amount_due: 6_100,
      metadata: { statementId: String(id) },
    });
    expect(invoice?.lines.data.map((l) => l.amount)).toEqual([4_900, 1_200]);
    const [customerId] = await h.deps.store.rows<{ c: string }>(
      sql`SELECT payment_customer_id AS c FROM accounts WHERE id = ${h.alphaId}`,
    );
    if (!customerId) throw new Error('no account row');
    expect(customerId.c).toMatch(/^cust-/);
    expect(h.fake.state.customers.get(customerId.c)?.email).toBe('accounts@alpha.invalid');
    // Mail and audit.
    expect(await mailRows(h)).toContainEqual(
      expect.objectContaining({ kind: 'statement-ready', to: 'accounts@alpha.invalid', status: 'sent' }),
    );
    const [captured] = await h.deps.store.rows<{ subject: string; text: string }>(
      sql`SELECT subject, text_body AS text FROM captured_mail WHERE subject LIKE 'Ebullio statement%'`,
    );
    if (!captured) throw new Error('no captured statement mail');
    expect(captured.subject).toBe('Ebullio statement 2031-03 issued: €61.00');
    expect(captured.text).toContain(statement.providerInvoiceId);
    expect(await auditRows()).toContainEqual(
      expect.objectContaining({
        action: 'statement.finalize',
        actorEmail: 'billing@ebullio.invalid',
        targetId: String(id),
      }),
    );
  });

  it('never changes a finalized statement: a second finalize is 409, generate leaves it frozen', async () => {
    await meter(h, h.alphaId, 7_000, '2031-03-30T00:00:00Z'); // late usage after finalizing
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.alphaId}`)
      .expect(200);
    const id = (list.body.items[0] as StatementBody).id;
    await h.billing.agent
      .post(`/console-api/statements/${id}/finalize`)
      .set('X-CSRF-Token', h.billing.csrf)
      .expect(409);
    const gen = await h.billing.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ month: '2031-03' })
      .expect(200);
    expect(gen.body.frozen).toBe(1);
    expect(statementOf(gen.body.items, h.alphaId)).toMatchObject({
      status: 'finalized',
      units: 61_001,
      amountMinor: 6_100,
    });
    expect(h.fake.state.invoices.size).toBe(1);
  });

  it('keeps a finalized statement’s line items when its plan is repriced later', async () => {
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.alphaId}`)
      .expect(200);
    const id = (list.body.items[0] as StatementBody).id;
    const reprice = (fee: number, price: number) =>
      h.deps.store.execute(
        sql`UPDATE plans SET monthly_fee_minor = ${fee}, price_per_1000_units_minor = ${price} WHERE name = 'professional'`,
      );
    await reprice(9_900, 250); // an operator raises the prices in April
    try {
      const detail = (await h.billing.agent.get(`/console-api/statements/${id}`).expect(200))
        .body as StatementBody;
      // Still March's prices: €49.00 fee and 12 blocks at €1.00 (hand-computed above).
      expect(detail.amountMinor).toBe(6_100);
      expect(detail.lineItems).toEqual([
        expect.objectContaining({ code: 'monthly-fee', unitAmountMinor: 4_900, amountMinor: 4_900 }),
        expect.objectContaining({ code: 'overage', quantity: 12, unitAmountMinor: 100, amountMinor: 1_200 }),
      ]);
      // A statement made before prices were kept falls back to the plan; repriced, it shows the
      // stored total as one line rather than line items that would not add up.
      await h.deps.store.execute(
        sql`UPDATE statements SET monthly_fee_minor = NULL, price_per_1000_units_minor = NULL WHERE id = ${id}`,
      );
      const legacy = (await h.billing.agent.get(`/console-api/statements/${id}`).expect(200))
        .body as StatementBody;
      expect(legacy.lineItems).toEqual([
        expect.objectContaining({ code: 'monthly-fee', quantity: 1, amountMinor: 6_100 }),
      ]);
    } finally {
      await reprice(4_900, 100);
      await h.deps.store.execute(
        sql`UPDATE statements SET monthly_fee_minor = 4900, price_per_1000_units_minor = 100 WHERE id = ${id}`,
      );
    }
  });

  it('lets an admin finalize; a statement with nothing due comes back paid from the provider', async () => {
    const zero = await createAccount(h.deps.store, {
      name: 'Invented Quiet Works',
      plan: 'starter',
      // An account of March 2031 (a later one gets no March statement).
      now: new Date('2031-03-01T00:00:00Z'),
    });
    const gen = await h.admin.agent
      .post('/console-api/statements/generate')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ month: '2031-03' })
      .expect(200);
    const s = statementOf(gen.body.items, zero.id);
    expect(s.amountMinor).toBe(0); // no usage, no fee (hand-computed)
    const res = await h.admin.agent
      .post(`/console-api/statements/${s.id}/finalize`)
      .set('X-CSRF-Token', h.admin.csrf)
      .expect(200);
    // Provider's invoice workflow: nothing due → paid at finalization (from memory).
    expect(res.body.statement).toMatchObject({ status: 'paid', amountMinor: 0 });
    expect(res.body.mailedTo).toBeNull(); // no billing e-mail on this account
  });

  it('answers 502 and leaves the draft when the provider cannot be reached', async () => {
    const list = await h.billing.agent
      .get(`/console-api/statements?month=2031-03&accountId=${h.betaId}`)
      .expect(200);
    const id = (list.body.items[0] as StatementBody).id;
    // Port 9 (discard) on loopback: nothing listens there in the test environment (common practice).
    configurePayments(h.deps, {
      enabled: true,
      apiKey: API_KEY,
      apiBase: new URL('http://127.0.0.1:9'),
      webhookSecret: WEBHOOK_SECRET,
    });
    try {
      const res = await h.billing.agent
        .post(`/console-api/statements/${id}/finalize`)
        .set('X-CSRF-Token', h.billing.csrf);
      expect(res.status).toBe(502);
      expect(res.body.type).toBe('/problems/payment-provider-failed');
      const after = await h.billing.agent.get(`/console-api/statements/${id}`).expect(200);
      expect(after.body.status).toBe('draft');
    } finally {
      configurePayments(h.deps, {
        enabled: true,
        apiKey: API_KEY,
        apiBase: new URL(h.fake.url),
        webhookSecret: WEBHOOK_SECRET,
      });
    }
  }, 60_000);
});

describe('payments webhook', () => {
  async function alphaMarch() {
    const { statements } = h.deps.store.t;
    const [row] = await h.deps.store.db
      .select({
        id: statements.id,
        accountId: statements.accountId,
        status: statements.status,
        providerInvoiceId: statements.providerInvoiceId,
        paidAt: statements.paidAt,
      })
      .from(statements)
      .where(and(eq(statements.accountId, h.alphaId), eq(statements.month, '2031-03')))
      .limit(1);
    if (!row) throw new Error('no March statement for Alpha');
    return row;
  }

  it('marks the statement paid when the provider delivers a correctly signed invoice.paid', async () => {
    const before = await alphaMarch();
    expect(before.status).toBe('finalized');
    h.clock.now = new Date('2031-04-10T12:00:00Z');
    const res = await fetch(`${h.fake.url}/test/invoices/${before.providerInvoiceId}/pay`, {
      method: 'POST',
      headers: { Authorization: `Bearer ${API_KEY}` },
    });
    const body = (await res.json()) as { delivery: { status: number } };
    expect(body.delivery.status).toBe(200);
    const after = await alphaMarch();
    expect(after.status).toBe('paid');
    expect(after.paidAt?.getTime()).toBe(Date.parse('2031-04-10T12:00:00Z'));
    expect(await auditRows()).toContainEqual(
      expect.objectContaining({ action: 'statement.paid', targetId: String(before.id) }),
    );
  });

  it('ignores a replayed event: 200, marked duplicate, nothing changes', async () => {
    // The delivery for Alpha's invoice (within the 300 s tolerance: the clock has not moved since).
    const invoiceId = (await alphaMarch()).providerInvoiceId ?? '';
    const delivery = h.fake.state.deliveries.find((d) => d.status === 200 && d.payload.includes(invoiceId));
    if (!delivery) throw new Error('no delivered event');
    const paidBefore = (await alphaMarch()).paidAt?.getTime();
    const res = await fetch(`${h.baseUrl}/webhooks/payments`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', 'Stripe-Signature': delivery.signatureHeader },
      body: delivery.payload,
    });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ received: true, duplicate: true });
    expect((await alphaMarch()).paidAt?.getTime()).toBe(paidBefore);
    expect(await paymentEventCount(delivery.eventId)).toBe(1);
  });

  function signed(payload: string, secret: string, t: number): string {
    // Stripe's documented scheme, computed here by hand (not with the SDK).
    return `t=${t},v1=${crypto.createHmac('sha256', secret).update(`${t}.${payload}`).digest('hex')}`;
  }
  const nowSeconds = () => Math.floor(h.clock.now.getTime() / 1000);
  const event = (id: string) =>
    JSON.stringify({
      id,
      object: 'event',
      type: 'invoice.paid',
      data: { object: { id: 'in_unknown', object: 'invoice' } },
    });

  it('accepts an event signed by hand per the documented scheme', async () => {
    const payload = event('evt_hand_signed_1');
    const res = await fetch(`${h.baseUrl}/webhooks/payments`, {
      method: 'POST',
      headers: {
        'Content-Type': 'application/json',
        'Stripe-Signature': signed(payload, WEBHOOK_SECRET, nowSeconds()),
      },
      body: payload,
    });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({
      duplicate: false,
      effect: 'no statement for invoice in_unknown',
    });
  });

  it('rejects a bad signature, a wrong secret, a tampered body, a stale timestamp and a missing header with 400', async () => {
    const payload = event('evt_rejected_1');
    const cases: [string, Record<string, string>, string][] = [
      ['garbage', { 'Stripe-Signature': 't=1,v1=deadbeef' }, payload],
      ['wrong secret', { 'Stripe-Signature': signed(payload, 'whsec_other', nowSeconds()) }, payload],
      [
        'tampered',
        { 'Stripe-Signature': signed(payload, WEBHOOK_SECRET, nowSeconds()) },
        payload.replace('in_unknown', 'in_other'),
      ],
      // 301 s old: beyond the SDK's default 300 s tolerance.
      ['stale', { 'Stripe-Signature': signed(payload, WEBHOOK_SECRET, nowSeconds() - 301) }, payload],
      ['missing', {}, payload],
    ];
    for (const [name, headers, body] of cases) {
      const res = await fetch(`${h.baseUrl}/webhooks/payments`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/json', ...headers },
        body,
      });
      expect({ name, status: res.status }).toEqual({ name, status: 400 });
      expect(res.headers.get('content-type')).toMatch(/^application\/problem\+json/);
    }
    expect(await paymentEventCount('evt_rejected_1')).toBe(0);
  });

  it('refuses a correctly signed event without an id, a type or an object with a 400 problem, storing nothing', async () => {
    const count = () => paymentEventCount();
    const before = await count();
    const bodies = [
      JSON.stringify({ object: 'event', type: 'invoice.paid', data: { object: { id: 'in_x' } } }),
      JSON.stringify({ id: 'evt_no_type', object: 'event', data: { object: { id: 'in_x' } } }),
      JSON.stringify({ id: 'evt_no_object', object: 'event', type: 'invoice.paid', data: {} }),
      JSON.stringify({ id: { nested: 1 }, type: 'invoice.paid', data: { object: {} } }),
    ];
    for (const payload of bodies) {
      const res = await fetch(`${h.baseUrl}/webhooks/payments`, {
        method: 'POST',
        headers: {
          'Content-Type': 'application/json',
          'Stripe-Signature': signed(payload, WEBHOOK_SECRET, nowSeconds()),
        },
        body: payload,
      });
      expect({ payload, status: res.status }).toEqual({ payload, status: 400 });
      expect(res.headers.get('content-type')).toMatch(/^application\/problem\+json/);
    }
    expect(await count()).toBe(before);
  });
});
