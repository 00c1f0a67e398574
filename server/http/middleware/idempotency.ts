/**
 * `Idempotency-Key` on every POST of /v1 (IETF httpapi draft "The Idempotency-Key HTTP Header
 * Field"), mounted by the operation declarations (../v1/operation.ts) after the scope and quota
 * guard, so every declared POST has it without code of its own.
 *
 * - The key: a structured-field string (`"abc"`) or a bare token, 1–255 printable ASCII
 *   characters; anything else is a 400 naming the header.
 * - The request's fingerprint: SHA-256 over method, path (with query), media type, Accept and the body
 *   as parsed, with object keys sorted (so `{"a":1,"b":2}` and `{ "b": 2, "a": 1 }` are the same).
 * - Per account: the first request claims the key atomically (`INSERT … ON CONFLICT DO NOTHING
 *   RETURNING`) as in flight, with a lease of {@link IDEMPOTENCY_LEASE_MS}; its answer (status,
 *   content type, body) is stored after its request-log row commits and before its bytes leave
 *   (the metering middleware's `beforeSend`). A retry with the same fingerprint gets the stored
 *   answer with `Idempotent-Replayed: true`, logged with the mark at 0 units; another fingerprint
 *   is a 422; a retry while the first is in flight is a 409. A claim whose lease ran out (its node
 *   died) is taken over; a record older than {@link IDEMPOTENCY_TTL_MS} is ignored and replaced,
 *   and pruned with the request log.
 * - Not stored (the key is given back, so a retry runs again): 5xx answers, 401/403/429 (refused
 *   before or instead of processing: revoked key, missing scope, rate or quota, including the
 *   multi-node quota refusal at commit) and requests the client abandoned. Every other answer,
 *   4xx validation problems included, is stored: the same body would be refused the same way.
 */
import crypto from 'node:crypto';
import { sql } from 'drizzle-orm';
import type { RequestHandler, Response } from 'express';
import type { Store } from '../../db/store.js';
import { readInstant } from '../../db/store.js';
import { problem } from '../problem.js';
import './locals.js';

/** How long an answer is kept for its retries. */
export const IDEMPOTENCY_TTL_MS = 24 * 3_600_000;
/** How long a claim holds the key without an answer (request and calculation time limits, with room). */
export const IDEMPOTENCY_LEASE_MS = 120_000;
export const IDEMPOTENCY_HEADER = 'Idempotency-Key';

/** Statuses whose answer is not kept (the request was refused before or instead of processing). */
function keepsAnswer(status: number): boolean {
  return status < 500 && status !== 401 && status !== 403 && status !== 429 && status !== 499;
}

/**
 * The key of a header value, or undefined if it is not a valid key: an sf-string `"…"` (with
 * `\"` and `\\` escapes) or a bare token, 1–255 printable ASCII characters.
 */
export function parseIdempotencyKey(value: string): string | undefined {
  let key = value.trim();
  if (key.length >= 2 && key.startsWith('"') && key.endsWith('"')) {
    const inner = key.slice(1, -1);
    if (!/^(?:[\x20-\x21\x23-\x5b\x5d-\x7e]|\\["\\])*$/.test(inner)) return undefined;
    key = inner.replace(/\\(["\\])/g, '$1');
  } else if (!/^[\x21-\x7e]+$/.test(key) || key.includes('"')) return undefined;
  return key.length >= 1 && key.length <= 255 && /^[\x20-\x7e]+$/.test(key) ? key : undefined;
}

/** JSON with object keys sorted, so the same body written differently has one fingerprint. */
function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value !== null && typeof value === 'object') {
    const entries = Object.keys(value)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical((value as Record<string, unknown>)[k])}`);
    return `{${entries.join(',')}}`;
  }
  return JSON.stringify(value) ?? 'null';
}

function fingerprintOf(
  method: string,
  url: string,
  mediaType: string,
  accept: string,
  body: unknown,
): string {
  return crypto
    .createHash('sha256')
    .update(`${method}\n${url}\n${mediaType}\n${accept}\n${canonical(body)}`)
    .digest('hex');
}

interface RecordRow {
  fingerprint: string;
  claim: string;
  created_at: unknown;
  lease_until: unknown;
  status: number | null;
  content_type: string | null;
  body: string | null;
}

/** Claims the key for a new request (fresh, or taking over an expired record or lease). */
async function claim(
  store: Store,
  accountId: number,
  key: string,
  fingerprint: string,
  token: string,
  now: Date,
): Promise<boolean> {
  const leaseUntil = new Date(now.getTime() + IDEMPOTENCY_LEASE_MS);
  const rows = await store.rows(sql`
    INSERT INTO idempotency_records (account_id, key, fingerprint, claim, created_at, lease_until)
    VALUES (${accountId}, ${key}, ${fingerprint}, ${token}, ${store.instant(now)}, ${store.instant(leaseUntil)})
    ON CONFLICT (account_id, key) DO NOTHING RETURNING claim`);
  return rows.length === 1;
}

/** Takes over a record that expired or a claim whose lease ran out; false if another did first. */
async function takeOver(
  store: Store,
  accountId: number,
  key: string,
  previous: string,
  fingerprint: string,
  token: string,
  now: Date,
): Promise<boolean> {
  const leaseUntil = new Date(now.getTime() + IDEMPOTENCY_LEASE_MS);
  const changed = await store.execute(sql`
    UPDATE idempotency_records SET fingerprint = ${fingerprint}, claim = ${token},
      created_at = ${store.instant(now)}, lease_until = ${store.instant(leaseUntil)},
      status = NULL, content_type = NULL, body = NULL
    WHERE account_id = ${accountId} AND key = ${key} AND claim = ${previous}`);
  return changed === 1;
}

/** Deletes idempotency records older than the 24 h they are kept; returns how many. */
export async function pruneIdempotencyRecords(store: Store, now: Date): Promise<number> {
  const cutoff = new Date(now.getTime() - IDEMPOTENCY_TTL_MS);
  return store.execute(sql`DELETE FROM idempotency_records WHERE created_at < ${store.instant(cutoff)}`);
}

/** Collects what the handler writes, so the answer can be stored as sent. */
function captureBody(res: Response): () => Buffer {
  const chunks: Buffer[] = [];
  const add = (chunk: unknown, encoding: unknown) => {
    if (typeof chunk === 'string')
      chunks.push(Buffer.from(chunk, typeof encoding === 'string' ? (encoding as BufferEncoding) : 'utf8'));
    else if (chunk instanceof Uint8Array) chunks.push(Buffer.from(chunk));
  };
  const write = res.write.bind(res) as (...args: unknown[]) => boolean;
  const end = res.end.bind(res) as (...args: unknown[]) => Response;
  res.write = function capturedWrite(...args: unknown[]): boolean {
    add(args[0], args[1]);
    return write(...args);
  } as Response['write'];
  res.end = function capturedEnd(...args: unknown[]): Response {
    if (typeof args[0] !== 'function') add(args[0], args[1]);
    return end(...args);
  } as Response['end'];
  return () => Buffer.concat(chunks);
}

/**
 * The middleware of one POST operation (after its guard). `store` and `clock` are the app's.
 */
export function idempotency(store: Store, clock: () => Date): RequestHandler {
  return async (req, res, next) => {
    const header = req.get(IDEMPOTENCY_HEADER);
    if (header === undefined) return next();
    const key = parseIdempotencyKey(header);
    if (key === undefined) {
      throw problem(
        'idempotency-key-invalid',
        `The ${IDEMPOTENCY_HEADER} header must be 1–255 printable ASCII characters, as a token or a quoted string ("…").`,
      );
    }
    const mediaType = (req.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
    if (mediaType === 'multipart/form-data') {
      throw problem(
        'idempotency-key-invalid',
        `The ${IDEMPOTENCY_HEADER} header is not accepted on a multipart/form-data upload; send the same data as JSON or text/csv to retry safely.`,
      );
    }
    const auth = res.locals.auth!;
    const meter = res.locals.meter!;
    // Accept too: the same body asked for as CSV is another answer.
    const fingerprint = fingerprintOf(
      req.method,
      req.originalUrl,
      mediaType,
      req.get('accept') ?? '',
      req.body,
    );
    const token = crypto.randomUUID();
    const now = clock();
    let claimed = await claim(store, auth.accountId, key, fingerprint, token, now);
    if (!claimed) {
      const [row] = await store.rows<RecordRow>(sql`
        SELECT fingerprint, claim, created_at, lease_until, status, content_type, body
        FROM idempotency_records WHERE account_id = ${auth.accountId} AND key = ${key}`);
      if (!row)
        throw problem('idempotency-key-in-flight', 'The key was released meanwhile; retry the request.');
      const expired = readInstant(row.created_at).getTime() + IDEMPOTENCY_TTL_MS <= now.getTime();
      const abandoned = row.status === null && readInstant(row.lease_until).getTime() <= now.getTime();
      if (expired || abandoned) {
        claimed = await takeOver(store, auth.accountId, key, row.claim, fingerprint, token, now);
        if (!claimed)
          throw problem(
            'idempotency-key-in-flight',
            `Another request with this ${IDEMPOTENCY_HEADER} is being processed.`,
          );
      } else if (row.fingerprint !== fingerprint) {
        throw problem(
          'idempotency-key-reused',
          `This ${IDEMPOTENCY_HEADER} was used within the last 24 h for a different request (method, path or body); use a new key for a new request.`,
        );
      } else if (row.status === null) {
        throw problem(
          'idempotency-key-in-flight',
          `The first request with this ${IDEMPOTENCY_HEADER} is still being processed; retry once it has answered.`,
          { headers: { 'Retry-After': '1' } },
        );
      } else {
        // The stored answer, as first sent, at 0 units with the mark in the request log.
        meter.idempotentReplay = true;
        meter.units = 0; // the guard's charge is not spent: other requests may use those units

        res.setHeader('Idempotent-Replayed', 'true');
        if (row.content_type) res.setHeader('Content-Type', row.content_type);
        res.status(row.status).send(Buffer.from(row.body ?? '', 'base64'));
        return;
      }
    }
    const body = captureBody(res);
    meter.beforeSend = async (status) => {
      if (keepsAnswer(status) && !meter.cutByQuota) {
        const contentType = res.getHeader('content-type');
        await store.execute(sql`
          UPDATE idempotency_records SET status = ${status},
            content_type = ${typeof contentType === 'string' ? contentType : null},
            body = ${body().toString('base64')}
          WHERE account_id = ${auth.accountId} AND key = ${key} AND claim = ${token}`);
      } else {
        await store.execute(sql`
          DELETE FROM idempotency_records
          WHERE account_id = ${auth.accountId} AND key = ${key} AND claim = ${token}`);
      }
    };
    next();
  };
}
