/**
 * POST /webhooks/payments: events from the payment provider (outside /console-api, no session,
 * no CSRF: the signature is the authentication).
 *
 * The raw body is verified with the provider SDK's `webhooks.constructEvent(raw, Stripe-Signature,
 * PAYMENTS_WEBHOOK_SECRET)` (HMAC-SHA256 over "<t>.<body>", 300 s tolerance, time from deps.clock);
 * a bad or missing signature is a 400 problem. Each event id is stored in payment_events in the
 * same transaction as its effect, so a replayed or re-delivered event changes nothing and is
 * answered 200 (the provider stops retrying on any 2xx).
 *
 * `invoice.paid` marks the statement whose providerInvoiceId is the invoice 'paid' (paidAt from the
 * invoice's status_transitions.paid_at) and writes an audit entry. Other event types are recorded
 * and ignored.
 */
import { eq } from 'drizzle-orm';
import express, { type RequestHandler } from 'express';
import Stripe from 'stripe';
import type { AppDeps, AppModule } from '../deps.js';
import { problem } from '../http/problem.js';
import { recordAudit } from '../accounts/audit.js';
import { paymentsFor } from '../integrations/payments/client.js';

export const WEBHOOK_PATH = '/webhooks/payments';
/** Seconds an event's signature timestamp may be old (the SDK's default, 300). */
export const WEBHOOK_TOLERANCE_SECONDS = 300;

export interface WebhookOutcome {
  received: true;
  duplicate: boolean;
  /** What the event did: e.g. "statement 7 paid", "ignored: customer.created". */
  effect: string;
}

interface InvoiceLike {
  id?: unknown;
  status_transitions?: { paid_at?: unknown } | null;
  metadata?: Record<string, unknown> | null;
}

function handler(deps: AppDeps): RequestHandler {
  return async (req, res) => {
    const payments = paymentsFor(deps);
    if (!payments.config.enabled || payments.config.webhookSecret === '') {
      throw problem('payment-provider-failed', 'No webhook secret is configured (PAYMENTS_WEBHOOK_SECRET).');
    }
    const signature = req.get('stripe-signature');
    if (!signature) throw problem('bad-request', 'The Stripe-Signature header is missing.');
    if (!Buffer.isBuffer(req.body)) {
      throw problem('unsupported-media-type', 'Webhook events must be sent as application/json.');
    }
    let event: Stripe.Event;
    try {
      event = Stripe.webhooks.constructEvent(
        req.body,
        signature,
        payments.config.webhookSecret,
        WEBHOOK_TOLERANCE_SECONDS,
        undefined,
        deps.clock().getTime(),
      );
    } catch (err) {
      throw problem('bad-request', `Webhook signature verification failed: ${(err as Error).message}`);
    }
    // A correctly signed body is still only as well-formed as its sender made it: refuse an event
    // without the fields handled below instead of failing on them (a NOT NULL id, a missing object).
    const shape = event as unknown as { id?: unknown; type?: unknown; data?: { object?: unknown } | null };
    const object = shape.data?.object;
    if (
      typeof shape.id !== 'string' ||
      shape.id === '' ||
      shape.id.length > 255 ||
      typeof shape.type !== 'string' ||
      object === null ||
      typeof object !== 'object' ||
      Array.isArray(object)
    ) {
      throw problem(
        'bad-request',
        'The webhook event must carry a string "id" (1–255 characters), a string "type" and an object "data.object".',
      );
    }
    const now = deps.clock();
    const outcome = await deps.store.transaction(async (tx): Promise<WebhookOutcome> => {
      const { paymentEvents, statements } = tx.t;
      const [fresh] = await tx.db
        .insert(paymentEvents)
        .values({ id: event.id, type: event.type, receivedAt: now })
        .onConflictDoNothing()
        .returning();
      if (!fresh) return { received: true, duplicate: true, effect: 'already processed' };
      if (event.type !== 'invoice.paid')
        return { received: true, duplicate: false, effect: `ignored: ${event.type}` };
      const invoice = event.data.object as InvoiceLike;
      const invoiceId = typeof invoice.id === 'string' ? invoice.id : '';
      const [statement] = await tx.db
        .select()
        .from(statements)
        .where(eq(statements.providerInvoiceId, invoiceId))
        .limit(1);
      if (!statement)
        return { received: true, duplicate: false, effect: `no statement for invoice ${invoiceId}` };
      if (statement.status === 'paid') {
        return { received: true, duplicate: false, effect: `statement ${statement.id} already paid` };
      }
      if (statement.status !== 'finalized') {
        return {
          received: true,
          duplicate: false,
          effect: `statement ${statement.id} is ${statement.status}`,
        };
      }
      const paidSeconds = invoice.status_transitions?.paid_at;
      const paidAt = typeof paidSeconds === 'number' ? new Date(paidSeconds * 1000) : now;
      await tx.db.update(statements).set({ status: 'paid', paidAt }).where(eq(statements.id, statement.id));
      // In the same transaction: a paid statement always has its audit row.
      await recordAudit(
        deps,
        req,
        res,
        {
          action: 'statement.paid',
          targetType: 'statement',
          targetId: statement.id,
          detail: {
            eventId: event.id,
            invoiceId,
            amountMinor: statement.amountMinor,
            month: statement.month,
          },
          actor: { id: null, email: 'payment-provider (webhook)' },
        },
        tx,
      );
      return { received: true, duplicate: false, effect: `statement ${statement.id} paid` };
    });
    res.json(outcome);
  };
}

/** Registers POST /webhooks/payments (append to appModules in server/http/app.ts). */
export const paymentsWebhookModule: AppModule = {
  register(app, deps) {
    app.post(WEBHOOK_PATH, express.raw({ type: 'application/json', limit: '512kb' }), handler(deps));
  },
};
