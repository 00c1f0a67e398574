/**
 * A local stand-in for the payment provider's HTTP API, for development and tests. It implements
 * exactly the calls Ebullio's billing makes through the official SDK, with the provider's wire
 * format: form-encoded request bodies (`metadata[statementId]=7`), `Authorization: Bearer <key>`,
 * JSON objects with `id` and `object`, errors as `{ error: { type, message, param? } }`, and the
 * `Idempotency-Key` header honoured (a repeated key replays the first response).
 *
 *   POST /v1/customers                GET /v1/customers/:id
 *   POST /v1/invoiceitems
 *   POST /v1/invoices                 GET /v1/invoices/:id
 *   POST /v1/invoices/:id/finalize    POST /v1/invoices/:id/pay
 *   POST /test/invoices/:id/pay       simulate the customer paying: marks the invoice paid and
 *                                     delivers a signed `invoice.paid` event before answering
 *
 * Webhook events are POSTed as JSON to `webhookUrl` with the `Stripe-Signature` header
 * `t=<unix seconds>,v1=<hex HMAC-SHA256(webhookSecret, "<t>.<payload>")>`, produced with the SDK's
 * `webhooks.generateTestHeaderString`. Finalizing an invoice whose amount due is zero marks it paid
 * at once, as the provider does (from memory of the provider's invoice workflow docs).
 *
 * State lives in memory and is exposed on the returned handle for tests.
 *
 *   npx tsx -e "import('./server/integrations/payments/fake-provider.ts').then(m => m.startFakePaymentProvider({ port: 0, webhookUrl: 'http://127.0.0.1:8080/webhooks/payments', webhookSecret: 'ebpay_dev_signing_local', apiKey: 'ebpay_dev_key_local' }).then(f => console.log(f.url)))"
 */
import crypto from 'node:crypto';
import type { AddressInfo } from 'node:net';
import express, { type ErrorRequestHandler, type Request, type RequestHandler, type Response } from 'express';
import Stripe from 'stripe';

export interface FakeProviderOptions {
  /** 0 or omitted: any free port. */
  port?: number;
  host?: string;
  /** Where events are delivered; undefined = no deliveries (recorded as skipped). */
  webhookUrl: string | undefined;
  webhookSecret: string;
  apiKey: string;
  /** Pay every invoice right after it is finalized (and deliver invoice.paid). */
  autoPayAfterFinalize?: boolean;
  /** The provider's clock (for created times and signature timestamps). Default: real time. */
  clock?: () => Date;
}

type Metadata = Record<string, string>;

export interface FakeCustomer {
  id: string;
  object: 'customer';
  email: string | null;
  name: string | null;
  description: string | null;
  metadata: Metadata;
  created: number;
  livemode: false;
}

export interface FakeInvoiceItem {
  id: string;
  object: 'invoiceitem';
  customer: string;
  invoice: string | null;
  amount: number;
  currency: string;
  description: string | null;
  metadata: Metadata;
  date: number;
  livemode: false;
}

export interface FakeInvoice {
  id: string;
  object: 'invoice';
  customer: string;
  currency: string;
  status: 'draft' | 'open' | 'paid' | 'void';
  number: string | null;
  description: string | null;
  collection_method: 'charge_automatically' | 'send_invoice';
  days_until_due: number | null;
  auto_advance: boolean;
  metadata: Metadata;
  subtotal: number;
  total: number;
  amount_due: number;
  amount_paid: number;
  amount_remaining: number;
  created: number;
  status_transitions: { finalized_at: number | null; paid_at: number | null };
  lines: { object: 'list'; data: FakeInvoiceItem[]; has_more: false; url: string };
  livemode: false;
}

export interface FakeDelivery {
  eventId: string;
  type: string;
  payload: string;
  signatureHeader: string;
  /** HTTP status of the last attempt; 0 = network error; -1 = not sent (no webhookUrl). */
  status: number;
  attempts: number;
}

export interface FakeRequestRecord {
  method: string;
  path: string;
  idempotencyKey: string | undefined;
  body: Record<string, unknown>;
}

export interface FakeProviderState {
  customers: Map<string, FakeCustomer>;
  invoiceItems: Map<string, FakeInvoiceItem>;
  invoices: Map<string, FakeInvoice>;
  deliveries: FakeDelivery[];
  requests: FakeRequestRecord[];
}

export interface FakePaymentProvider {
  url: string;
  port: number;
  state: FakeProviderState;
  /** Marks an open invoice paid and delivers `invoice.paid`; resolves after the delivery. */
  payInvoice(id: string): Promise<{ invoice: FakeInvoice; delivery: FakeDelivery }>;
  /** Waits until every delivery in flight has finished. */
  settle(): Promise<void>;
  close(): Promise<void>;
}

class FakeApiError extends Error {
  constructor(
    readonly status: number,
    readonly type: string,
    message: string,
    readonly param?: string,
  ) {
    super(message);
  }
}

function randomId(prefix: string): string {
  return `${prefix}-${crypto.randomBytes(12).toString('base64url').replace(/[-_]/g, 'x')}`;
}

function str(body: Record<string, unknown>, name: string): string | undefined {
  const v = body[name];
  if (v === undefined || v === '') return undefined;
  if (typeof v !== 'string') throw new FakeApiError(400, 'invalid_request_error', `Invalid ${name}`, name);
  return v;
}

function int(body: Record<string, unknown>, name: string): number | undefined {
  const v = str(body, name);
  if (v === undefined) return undefined;
  if (!/^-?\d+$/.test(v)) throw new FakeApiError(400, 'invalid_request_error', `Invalid integer: ${v}`, name);
  return Number(v);
}

function bool(body: Record<string, unknown>, name: string): boolean | undefined {
  const v = str(body, name);
  if (v === undefined) return undefined;
  if (v !== 'true' && v !== 'false')
    throw new FakeApiError(400, 'invalid_request_error', `Invalid boolean: ${v}`, name);
  return v === 'true';
}

function metadata(body: Record<string, unknown>): Metadata {
  const v = body.metadata;
  if (v === undefined || v === '') return {};
  if (typeof v !== 'object' || v === null || Array.isArray(v))
    throw new FakeApiError(400, 'invalid_request_error', 'Invalid metadata', 'metadata');
  const out: Metadata = {};
  for (const [k, value] of Object.entries(v)) out[k] = String(value);
  return out;
}

function required<T>(value: T | undefined, name: string): T {
  if (value === undefined)
    throw new FakeApiError(400, 'invalid_request_error', `Missing required param: ${name}.`, name);
  return value;
}

export async function startFakePaymentProvider(options: FakeProviderOptions): Promise<FakePaymentProvider> {
  const clock = options.clock ?? (() => new Date());
  const now = () => Math.floor(clock().getTime() / 1000);
  const state: FakeProviderState = {
    customers: new Map(),
    invoiceItems: new Map(),
    invoices: new Map(),
    deliveries: [],
    requests: [],
  };
  const idempotent = new Map<string, { status: number; body: unknown }>();
  const inFlight = new Set<Promise<unknown>>();
  let invoiceNumber = 0;

  function recompute(invoice: FakeInvoice): void {
    const total = invoice.lines.data.reduce((sum, item) => sum + item.amount, 0);
    invoice.subtotal = total;
    invoice.total = total;
    invoice.amount_due = total;
    invoice.amount_remaining = total - invoice.amount_paid;
  }

  function markPaid(invoice: FakeInvoice): void {
    invoice.status = 'paid';
    invoice.amount_paid = invoice.amount_due;
    invoice.amount_remaining = 0;
    invoice.status_transitions.paid_at = now();
  }

  async function deliver(type: string, object: unknown): Promise<FakeDelivery> {
    const event = {
      id: randomId('ev'),
      object: 'event',
      api_version: Stripe.API_VERSION,
      created: now(),
      type,
      livemode: false,
      pending_webhooks: 1,
      request: { id: null, idempotency_key: null },
      data: { object },
    };
    const payload = JSON.stringify(event);
    const signatureHeader = Stripe.webhooks.generateTestHeaderString({
      payload,
      secret: options.webhookSecret,
      timestamp: now(),
    });
    const delivery: FakeDelivery = {
      eventId: event.id,
      type,
      payload,
      signatureHeader,
      status: -1,
      attempts: 0,
    };
    state.deliveries.push(delivery);
    if (options.webhookUrl === undefined) return delivery;
    // The provider retries failed deliveries for days; three quick attempts are enough locally.
    for (let attempt = 1; attempt <= 3; attempt++) {
      delivery.attempts = attempt;
      try {
        const res = await fetch(options.webhookUrl, {
          method: 'POST',
          headers: { 'Content-Type': 'application/json', 'Stripe-Signature': signatureHeader },
          body: payload,
        });
        delivery.status = res.status;
        await res.arrayBuffer();
        if (res.ok) break;
      } catch {
        delivery.status = 0;
      }
      await new Promise((r) => setTimeout(r, 50 * attempt));
    }
    return delivery;
  }

  function track<T>(p: Promise<T>): Promise<T> {
    inFlight.add(p);
    void p.finally(() => inFlight.delete(p)).catch(() => undefined);
    return p;
  }

  function getInvoice(id: string): FakeInvoice {
    const invoice = state.invoices.get(id);
    if (!invoice) throw new FakeApiError(404, 'invalid_request_error', `No such invoice: '${id}'`, 'id');
    return invoice;
  }

  async function payInvoice(id: string): Promise<{ invoice: FakeInvoice; delivery: FakeDelivery }> {
    const invoice = getInvoice(id);
    if (invoice.status !== 'open' && invoice.status !== 'paid') {
      throw new FakeApiError(
        400,
        'invalid_request_error',
        `Invoice is ${invoice.status}; it cannot be paid.`,
      );
    }
    if (invoice.status === 'open') markPaid(invoice);
    const delivery = await track(deliver('invoice.paid', structuredClone(invoice)));
    return { invoice, delivery };
  }

  const app = express();
  app.disable('x-powered-by');
  app.use(express.urlencoded({ extended: true, limit: '256kb' }));

  const auth: RequestHandler = (req, _res, next) => {
    const header = req.get('authorization') ?? '';
    const m = /^Bearer (.+)$/.exec(header);
    if (!m || m[1] !== options.apiKey) {
      next(new FakeApiError(401, 'invalid_request_error', 'Invalid API Key provided.'));
      return;
    }
    next();
  };

  /** Records the call and replays the stored response of a repeated Idempotency-Key. */
  const recordAndReplay: RequestHandler = (req, res, next) => {
    const body = (req.body ?? {}) as Record<string, unknown>;
    const key = req.get('idempotency-key');
    state.requests.push({ method: req.method, path: req.baseUrl + req.path, idempotencyKey: key, body });
    if (req.method === 'POST' && key !== undefined) {
      const cacheKey = `${req.path} ${key}`;
      const seen = idempotent.get(cacheKey);
      if (seen) {
        res.setHeader('Idempotent-Replayed', 'true');
        res.status(seen.status).json(seen.body);
        return;
      }
      const json = res.json.bind(res);
      res.json = (payload: unknown) => {
        idempotent.set(cacheKey, { status: res.statusCode, body: payload });
        return json(payload);
      };
    }
    next();
  };

  const reply = (res: Response, body: unknown) => {
    res.setHeader('Request-Id', randomId('req'));
    res.json(body);
  };

  const v1 = express.Router();
  v1.use(auth, recordAndReplay);

  v1.post('/customers', (req, res) => {
    const body = req.body as Record<string, unknown>;
    const customer: FakeCustomer = {
      id: randomId('cust'),
      object: 'customer',
      email: str(body, 'email') ?? null,
      name: str(body, 'name') ?? null,
      description: str(body, 'description') ?? null,
      metadata: metadata(body),
      created: now(),
      livemode: false,
    };
    state.customers.set(customer.id, customer);
    reply(res, customer);
  });

  v1.get('/customers/:id', (req, res) => {
    const customer = state.customers.get(String(req.params.id));
    if (!customer)
      throw new FakeApiError(404, 'invalid_request_error', `No such customer: '${req.params.id}'`, 'id');
    reply(res, customer);
  });

  v1.post('/invoices', (req, res) => {
    const body = req.body as Record<string, unknown>;
    const customerId = required(str(body, 'customer'), 'customer');
    if (!state.customers.has(customerId))
      throw new FakeApiError(400, 'invalid_request_error', `No such customer: '${customerId}'`, 'customer');
    const collection = (str(body, 'collection_method') ??
      'charge_automatically') as FakeInvoice['collection_method'];
    if (collection !== 'charge_automatically' && collection !== 'send_invoice')
      throw new FakeApiError(400, 'invalid_request_error', 'Invalid collection_method', 'collection_method');
    const daysUntilDue = int(body, 'days_until_due') ?? null;
    if (collection === 'send_invoice' && daysUntilDue === null)
      throw new FakeApiError(
        400,
        'invalid_request_error',
        'Missing required param: days_until_due (needed with send_invoice).',
        'days_until_due',
      );
    const id = randomId('inv');
    const invoice: FakeInvoice = {
      id,
      object: 'invoice',
      customer: customerId,
      currency: str(body, 'currency') ?? 'eur',
      status: 'draft',
      number: null,
      description: str(body, 'description') ?? null,
      collection_method: collection,
      days_until_due: daysUntilDue,
      auto_advance: bool(body, 'auto_advance') ?? false,
      metadata: metadata(body),
      subtotal: 0,
      total: 0,
      amount_due: 0,
      amount_paid: 0,
      amount_remaining: 0,
      created: now(),
      status_transitions: { finalized_at: null, paid_at: null },
      lines: { object: 'list', data: [], has_more: false, url: `/v1/invoices/${id}/lines` },
      livemode: false,
    };
    // Pending items join only when asked ('exclude' is the provider's default; from memory).
    if (str(body, 'pending_invoice_items_behavior') === 'include') {
      for (const item of state.invoiceItems.values()) {
        if (item.customer === customerId && item.invoice === null) {
          item.invoice = id;
          invoice.lines.data.push(item);
        }
      }
    }
    recompute(invoice);
    state.invoices.set(id, invoice);
    reply(res, invoice);
  });

  v1.post('/invoiceitems', (req, res) => {
    const body = req.body as Record<string, unknown>;
    const customerId = required(str(body, 'customer'), 'customer');
    if (!state.customers.has(customerId))
      throw new FakeApiError(400, 'invalid_request_error', `No such customer: '${customerId}'`, 'customer');
    const amount = required(int(body, 'amount'), 'amount');
    const currency = required(str(body, 'currency'), 'currency');
    const invoiceId = str(body, 'invoice');
    let invoice: FakeInvoice | undefined;
    if (invoiceId !== undefined) {
      invoice = getInvoice(invoiceId);
      if (invoice.status !== 'draft')
        throw new FakeApiError(
          400,
          'invalid_request_error',
          'Invoice items can be added to draft invoices only.',
          'invoice',
        );
      if (invoice.customer !== customerId)
        throw new FakeApiError(
          400,
          'invalid_request_error',
          'The invoice belongs to another customer.',
          'invoice',
        );
      if (invoice.currency !== currency)
        throw new FakeApiError(
          400,
          'invalid_request_error',
          'Currency differs from the invoice.',
          'currency',
        );
    }
    const item: FakeInvoiceItem = {
      id: randomId('line'),
      object: 'invoiceitem',
      customer: customerId,
      invoice: invoiceId ?? null,
      amount,
      currency,
      description: str(body, 'description') ?? null,
      metadata: metadata(body),
      date: now(),
      livemode: false,
    };
    state.invoiceItems.set(item.id, item);
    if (invoice) {
      invoice.lines.data.push(item);
      recompute(invoice);
    }
    reply(res, item);
  });

  v1.get('/invoices/:id', (req, res) => {
    reply(res, getInvoice(String(req.params.id)));
  });

  v1.post('/invoices/:id/finalize', (req, res) => {
    const invoice = getInvoice(String(req.params.id));
    if (invoice.status !== 'draft')
      throw new FakeApiError(400, 'invalid_request_error', `This invoice is already ${invoice.status}.`);
    invoiceNumber++;
    invoice.status = 'open';
    invoice.number = `EBL-FAKE-${String(invoiceNumber).padStart(4, '0')}`;
    invoice.status_transitions.finalized_at = now();
    if (invoice.amount_due === 0) {
      markPaid(invoice);
      void track(deliver('invoice.paid', structuredClone(invoice)));
    } else if (options.autoPayAfterFinalize) {
      setImmediate(() => void payInvoice(invoice.id).catch(() => undefined));
    }
    reply(res, invoice);
  });

  v1.post('/invoices/:id/pay', async (req, res) => {
    const { invoice } = await payInvoice(String(req.params.id));
    reply(res, invoice);
  });

  app.use('/v1', v1);

  app.post('/test/invoices/:id/pay', auth, async (req, res) => {
    const { invoice, delivery } = await payInvoice(String(req.params.id));
    res.json({
      invoice,
      delivery: { eventId: delivery.eventId, status: delivery.status, attempts: delivery.attempts },
    });
  });

  app.use((req, _res, next) => {
    next(
      new FakeApiError(
        404,
        'invalid_request_error',
        `Unrecognized request URL (${req.method}: ${req.path}).`,
      ),
    );
  });
  const onError: ErrorRequestHandler = (err: unknown, _req: Request, res: Response, _next) => {
    const e =
      err instanceof FakeApiError
        ? err
        : new FakeApiError(500, 'api_error', (err as Error).message ?? 'error');
    res.status(e.status).json({
      error: { type: e.type, message: e.message, ...(e.param !== undefined ? { param: e.param } : {}) },
    });
  };
  app.use(onError);

  const server = await new Promise<import('node:http').Server>((resolve, reject) => {
    const s = app.listen(options.port ?? 0, options.host ?? '127.0.0.1', (err?: Error) => {
      if (err) reject(err);
      else resolve(s);
    });
  });
  const { port } = server.address() as AddressInfo;
  const host = options.host ?? '127.0.0.1';

  return {
    url: `http://${host}:${port}`,
    port,
    state,
    payInvoice,
    async settle() {
      while (inFlight.size > 0) await Promise.allSettled([...inFlight]);
    },
    async close() {
      await Promise.allSettled([...inFlight]);
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
    },
  };
}
