/**
 * Finalizing a statement: the draft is recomputed from the (now complete) month's usage, then
 * turned into an invoice at the payment provider through its official SDK:
 *
 *   ensure a customer (accounts.payment_customer_id) → create a draft invoice (send_invoice,
 *   30 days, pending items excluded, metadata.statementId) → one invoice item per line item →
 *   finalize the invoice → store providerInvoiceId, status 'finalized' (or 'paid' if the provider
 *   reports nothing due) → mail 'statement-ready' to the account's billing e-mail.
 *
 * Every provider call carries an Idempotency-Key derived from the statement (id, creation time,
 * amount), so retrying after a failure half-way re-uses what was created instead of billing
 * twice; the provider keeps such keys for at least a day (Stripe API reference, "Idempotent
 * requests", from memory). Only one finalize per statement runs at a time in this process.
 */
import { and, eq } from 'drizzle-orm';
import type { FinalizeStatementResponse, StatementDetail } from '../../shared/console/billing.js';
import { getAccount } from '../accounts/accounts.js';
import type { AppDeps } from '../deps.js';
import { problem, ProblemError } from '../http/problem.js';
import { paymentsFor } from '../integrations/payments/client.js';
import { sendMail } from '../mail/send.js';
import { formatCount, formatMoney, isMonthComplete } from './statement.js';
import { refreshDraft, statementDetail } from './statements.js';

const running = new Set<number>();

/** Days the customer has to pay a sent invoice. */
export const DAYS_UNTIL_DUE = 30;

function providerFailure(err: unknown): ProblemError {
  const message = (err as Error).message ?? String(err);
  return problem(
    'payment-provider-failed',
    `The payment provider refused or did not answer: ${message}. The statement is still a draft; try again (retries reuse what was already created).`,
  );
}

/** A stored status as people read it (the console shows the same words). */
const STATE_WORDS: Record<StatementDetail['status'], string> = {
  draft: 'a draft',
  finalized: 'already issued',
  paid: 'already settled',
  void: 'withdrawn',
};

function statementReadyText(detail: StatementDetail): string {
  const lines = detail.lineItems.map(
    (l) =>
      `  ${l.description}: ${l.quantity} × ${formatMoney(l.unitAmountMinor, detail.currency)} = ${formatMoney(l.amountMinor, detail.currency)}`,
  );
  return [
    `Your Ebullio statement for ${detail.month} (${detail.accountName}) has been issued.`,
    '',
    `Units used: ${formatCount(detail.units)} (included in the plan: ${formatCount(detail.includedUnits)}).`,
    ...(lines.length > 0 ? ['', ...lines] : []),
    '',
    `Total: ${formatMoney(detail.amountMinor, detail.currency)}.`,
    `Payment reference: ${detail.providerInvoiceId ?? '—'}; please settle it within ${DAYS_UNTIL_DUE} days.`,
    '',
    'Calendar months are counted in UTC.',
  ].join('\n');
}

export async function finalizeStatement(
  deps: AppDeps,
  statementId: number,
): Promise<FinalizeStatementResponse> {
  if (running.has(statementId)) {
    throw problem('conflict', `Statement ${statementId} is being issued by another request.`);
  }
  running.add(statementId);
  try {
    return await finalizeOnce(deps, statementId);
  } finally {
    running.delete(statementId);
  }
}

async function finalizeOnce(deps: AppDeps, statementId: number): Promise<FinalizeStatementResponse> {
  const before = await statementDetail(deps.store, statementId);
  if (!before) throw problem('not-found', `There is no statement ${statementId}.`);
  if (before.status !== 'draft') {
    throw problem(
      'conflict',
      `Statement ${statementId} is ${STATE_WORDS[before.status]}; only a draft can be issued.`,
    );
  }
  const now = deps.clock();
  if (!isMonthComplete(before.month, now)) {
    throw problem(
      'conflict',
      `The month ${before.month} is not over yet (UTC); a statement can be issued from the first day of the next month.`,
    );
  }
  const payments = paymentsFor(deps);
  if (!payments.config.enabled) {
    throw problem(
      'payment-provider-failed',
      'No payment provider is configured: set PAYMENTS_API_KEY and PAYMENTS_WEBHOOK_SECRET to finalize statements.',
    );
  }
  // The month is over: its usage is final. Recompute the draft once more before freezing it.
  await refreshDraft(deps.store, statementId);
  const detail = await statementDetail(deps.store, statementId);
  const account = await getAccount(deps.store, before.accountId);
  if (!detail || !account) throw problem('not-found', `There is no statement ${statementId}.`);

  const client = payments.client;
  const keyBase = `ebullio-statement-${detail.id}-${Date.parse(detail.createdAt)}-${detail.amountMinor}`;
  let invoice;
  try {
    let customerId = account.paymentCustomerId;
    if (!customerId) {
      const customer = await client.customers.create(
        {
          name: account.name,
          ...(account.billingEmail ? { email: account.billingEmail } : {}),
          metadata: { ebullioAccountId: String(account.id) },
        },
        { idempotencyKey: `ebullio-account-${account.id}-${account.createdAt.getTime()}-customer` },
      );
      customerId = customer.id;
      const { accounts } = deps.store.t;
      await deps.store.db
        .update(accounts)
        .set({ paymentCustomerId: customerId })
        .where(eq(accounts.id, account.id));
    }
    const draft = await client.invoices.create(
      {
        customer: customerId,
        currency: detail.currency,
        collection_method: 'send_invoice',
        days_until_due: DAYS_UNTIL_DUE,
        auto_advance: false,
        pending_invoice_items_behavior: 'exclude',
        description: `Ebullio calculation service, ${detail.month} (UTC)`,
        metadata: {
          statementId: String(detail.id),
          ebullioAccountId: String(detail.accountId),
          month: detail.month,
        },
      },
      { idempotencyKey: `${keyBase}-invoice` },
    );
    for (const item of detail.lineItems) {
      await client.invoiceItems.create(
        {
          customer: customerId,
          invoice: draft.id,
          amount: item.amountMinor,
          currency: detail.currency,
          description: `${item.description} (${item.quantity} × ${item.unitAmountMinor})`,
          metadata: {
            code: item.code,
            quantity: String(item.quantity),
            unitAmountMinor: String(item.unitAmountMinor),
          },
        },
        { idempotencyKey: `${keyBase}-item-${item.code}` },
      );
    }
    invoice = await client.invoices.finalizeInvoice(draft.id, {}, { idempotencyKey: `${keyBase}-finalize` });
  } catch (err) {
    if (err instanceof ProblemError) throw err;
    throw providerFailure(err);
  }
  if (invoice.amount_due !== detail.amountMinor) {
    throw providerFailure(
      new Error(
        `invoice ${invoice.id} is due ${invoice.amount_due}, the statement says ${detail.amountMinor}`,
      ),
    );
  }
  const paid = invoice.status === 'paid';
  const paidAtSeconds = invoice.status_transitions?.paid_at;
  const { statements } = deps.store.t;
  const [updated] = await deps.store.db
    .update(statements)
    .set({
      status: paid ? 'paid' : 'finalized',
      providerInvoiceId: invoice.id,
      finalizedAt: now,
      paidAt: paid ? (paidAtSeconds ? new Date(paidAtSeconds * 1000) : now) : null,
    })
    .where(and(eq(statements.id, statementId), eq(statements.status, 'draft')))
    .returning();
  if (!updated) throw problem('conflict', `Statement ${statementId} changed while it was being issued.`);
  const final = await statementDetail(deps.store, statementId);
  if (!final) throw problem('not-found', `There is no statement ${statementId}.`);

  let mailedTo: string | null = null;
  if (account.billingEmail) {
    const result = await sendMail(deps, {
      kind: 'statement-ready',
      to: account.billingEmail,
      subject: `Ebullio statement ${final.month} issued: ${formatMoney(final.amountMinor, final.currency)}`,
      text: statementReadyText(final),
    });
    if (result.status === 'sent') mailedTo = account.billingEmail;
  }
  return { statement: final, mailedTo };
}
