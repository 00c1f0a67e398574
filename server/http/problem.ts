/**
 * RFC 9457 problem details: the one error shape of the Ebullio HTTP API.
 *
 * Every error response is `application/problem+json` with
 * `{ type, title, status, detail, instance, requestId, errors? }`. `type` is a relative URI
 * `/problems/<slug>`; the app serves a short explanation of each slug at `GET /problems/:slug`
 * (see {@link problemCatalogue}). Handlers throw {@link ProblemError}; the final error handler
 * in app.ts renders it with {@link sendProblem}.
 */
import type { Request, Response } from 'express';
import { redactText } from '../accounts/request-log.js';

/** One offending input, named by its dotted path into the request (e.g. `feed.massFraction`). */
export interface ProblemFieldError {
  field: string;
  message: string;
  value?: unknown;
  validRange?: { min: number; max: number; unit: string };
}

export interface ProblemInit {
  status: number;
  /** Slug from {@link problemCatalogue}, e.g. 'quota-exceeded'. */
  type: string;
  title: string;
  detail?: string;
  errors?: ProblemFieldError[];
  /** Extra response headers, e.g. `WWW-Authenticate` or `Retry-After`. */
  headers?: Record<string, string>;
}

/** An error that becomes a problem-details response. Throw it from any handler or middleware. */
export class ProblemError extends Error {
  override readonly name = 'ProblemError';
  readonly status: number;
  readonly type: string;
  readonly title: string;
  readonly detail: string | undefined;
  readonly errors: ProblemFieldError[] | undefined;
  readonly headers: Record<string, string>;

  constructor(init: ProblemInit) {
    super(init.detail ?? init.title);
    this.status = init.status;
    this.type = init.type;
    this.title = init.title;
    this.detail = init.detail;
    this.errors = init.errors;
    this.headers = init.headers ?? {};
  }
}

/** The known problem types: slug → status, title and a one-paragraph explanation for humans. */
export const problemCatalogue = {
  'bad-request': {
    status: 400,
    title: 'Bad request',
    description: 'The request could not be understood (for example an invalid header or query string).',
  },
  'body-too-deep': {
    status: 400,
    title: 'Body nested too deeply',
    description:
      'The JSON body nests arrays and objects deeper than the service accepts; the detail states the limit.',
  },
  'malformed-json': {
    status: 400,
    title: 'Malformed JSON',
    description: 'The request body is not valid JSON. Check quoting, commas and brackets.',
  },
  unauthorized: {
    status: 401,
    title: 'Unauthorized',
    description:
      'No valid API key was presented. Send "Authorization: Bearer <key>"; the detail says whether the key was missing, malformed, unknown, revoked or expired.',
  },
  forbidden: {
    status: 403,
    title: 'Forbidden',
    description: 'The API key is valid but lacks the scope this operation needs. The detail names the scope.',
  },
  'not-found': {
    status: 404,
    title: 'Not found',
    description: 'No resource or route exists at this path.',
  },
  conflict: {
    status: 409,
    title: 'Conflict',
    description:
      'The resource exists already (for example a stored liquor id that is taken); choose another id.',
  },
  'idempotency-key-in-flight': {
    status: 409,
    title: 'Idempotency key in use',
    description:
      'The first request with this Idempotency-Key is still being processed. Retry after it has answered (Retry-After); the retry then gets its stored answer.',
  },
  'csrf-failed': {
    status: 403,
    title: 'CSRF check failed',
    description:
      'A state-changing console request must send the X-CSRF-Token header equal to the ebullio_csrf cookie (GET /console-api/auth/csrf sets it).',
  },
  'request-timeout': {
    status: 408,
    title: 'Request timeout',
    description:
      'The request line, headers or body did not arrive in time (HEADERS_TIMEOUT_MS, REQUEST_TIMEOUT_MS); the connection is closed. Send the whole request promptly.',
  },
  'payload-too-large': {
    status: 413,
    title: 'Payload too large',
    description: 'The request body exceeds the size limit of the service.',
  },
  'expectation-failed': {
    status: 417,
    title: 'Expectation failed',
    description:
      'The request carries an Expect header other than 100-continue, the only expectation the service meets.',
  },
  'unsupported-media-type': {
    status: 415,
    title: 'Unsupported media type',
    description:
      'Request bodies must be application/json (text/csv or multipart/form-data only where an operation says so).',
  },
  'validation-failed': {
    status: 422,
    title: 'Validation failed',
    description: 'The request is well-formed JSON but some fields are missing or invalid; see "errors".',
  },
  'idempotency-key-reused': {
    status: 422,
    title: 'Idempotency key reused',
    description:
      'This Idempotency-Key was used within the last 24 hours for a different request (method, path or body). Use a new key for a new request.',
  },
  'idempotency-key-invalid': {
    status: 400,
    title: 'Invalid Idempotency-Key',
    description:
      'The Idempotency-Key header must be 1–255 printable ASCII characters, sent as a token or a quoted string, and is not accepted on multipart uploads.',
  },
  'out-of-range': {
    status: 422,
    title: 'Input out of range',
    description:
      'An input lies outside the range where the method or model is valid; "errors" gives the field, the value and the valid range.',
  },
  'no-solution': {
    status: 422,
    title: 'No solution',
    description: 'The balances have no physical solution for these inputs, or the solver did not converge.',
  },
  'rate-limited': {
    status: 429,
    title: 'Rate limit exceeded',
    description:
      'Too many requests per minute for this API key. The RateLimit and RateLimit-Policy headers say when to retry.',
  },
  'quota-exceeded': {
    status: 429,
    title: 'Monthly quota exceeded',
    description:
      "The account's monthly unit quota would be exceeded by this request. No calculation was run. The quota resets at the start of the next calendar month (UTC).",
  },
  'payment-provider-failed': {
    status: 502,
    title: 'Payment provider failed',
    description:
      'The payment provider refused, did not answer or is not configured; the statement was left as it was. Retrying is safe.',
  },
  busy: {
    status: 503,
    title: 'Busy',
    description:
      'The server is too busy to take this request now (for example, too many password checks are queued). Nothing was changed; retry after the Retry-After header.',
  },
  'not-replayable': {
    status: 422,
    title: 'Not replayable',
    description:
      'The logged request cannot be run again: its body was not retained, was cut at the log limit or had values redacted, or the operation reads input that is not logged (a query string, an upload) or changes stored data. Nothing was run or charged.',
  },
  'calculation-timeout': {
    status: 503,
    title: 'Calculation timed out',
    description:
      'The calculation ran past the time limit of the calculation pool and was stopped. Nothing was charged. Retrying the same input will likely take as long; check it, or split the batch.',
  },
  'calculation-failed': {
    status: 500,
    title: 'Calculation failed',
    description:
      'The worker thread that ran the calculation failed and was replaced. Nothing was charged; retrying is safe. Quote the request id when reporting it.',
  },
  internal: {
    status: 500,
    title: 'Internal error',
    description: 'An unexpected error occurred. Quote the request id when reporting it.',
  },
} as const satisfies Record<string, { status: number; title: string; description: string }>;

export type ProblemSlug = keyof typeof problemCatalogue;

/** Builds a ProblemError of a catalogued type with its standard status and title. */
export function problem(
  slug: ProblemSlug,
  detail?: string,
  extra: Pick<ProblemInit, 'errors' | 'headers'> = {},
): ProblemError {
  const entry = problemCatalogue[slug];
  return new ProblemError({ status: entry.status, type: slug, title: entry.title, detail, ...extra });
}

/** The relative type URI for a slug. */
export function problemTypeUri(slug: string): string {
  return `/problems/${slug}`;
}

/** Body of a problem-details response. */
export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance: string;
  requestId?: string;
  errors?: ProblemFieldError[];
}

/**
 * A problem's own fields as JSON (type URI, title, status, detail, errors), without the request's
 * `instance` and id: a batch or sweep row's problem, a job's, a logged refusal's.
 */
export function problemFields(p: ProblemError): Omit<ProblemBody, 'instance' | 'requestId'> {
  return {
    type: problemTypeUri(p.type),
    title: p.title,
    status: p.status,
    ...(p.detail !== undefined ? { detail: p.detail } : {}),
    ...(p.errors && p.errors.length > 0 ? { errors: p.errors } : {}),
  };
}

/** The problem-details body of a problem answered to this response's request. */
export function problemBody(res: Response, p: ProblemError): ProblemBody {
  const req: Request = res.req;
  const { errors, ...fields } = problemFields(p);
  return {
    ...fields,
    // The path only, with key-shaped segments redacted (the body is logged and may be shown).
    instance: redactText(req.originalUrl.split('?')[0] ?? req.originalUrl),
    ...(typeof res.locals.requestId === 'string' ? { requestId: res.locals.requestId } : {}),
    ...(errors ? { errors } : {}),
  };
}

/** Writes a problem-details response (status, headers, `application/problem+json` body). */
export function sendProblem(res: Response, p: ProblemError): void {
  for (const [name, value] of Object.entries(p.headers)) res.setHeader(name, value);
  res
    .status(p.status)
    .type('application/problem+json')
    .send(JSON.stringify(problemBody(res, p)));
}
