/**
 * Request-log helpers: redaction, truncation and retention pruning.
 *
 * What is never stored: request headers (so never the Authorization header), any JSON property
 * whose name looks like a secret (password, secret, token, apiKey, authorization, key…), and any
 * key-shaped text (KEY_SHAPED_PATTERN in keys.ts, in values, property names, the path and the
 * problem's instance), nor the key presented with the request or its secret part. Bodies are
 * stored only for accounts with `retain_request_bodies` on, truncated to a byte limit.
 */
import { sql } from 'drizzle-orm';
import type { Store } from '../db/store.js';
import { ISSUED_KEY_SHAPED, KEY_SHAPED_PATTERN, secretPartOf } from './keys.js';

const SECRET_PROPERTY = /pass(word)?|secret|token|authori[sz]ation|api[-_]?key|^key$|credential|cookie/i;
export const REDACTED = '[redacted]';
/** Nesting kept in a logged body; deeper values are replaced, so redaction never recurses far. */
export const LOG_BODY_DEPTH = 20;
const TOO_DEEP = '[nested too deep]';

/**
 * What a request's redaction knows besides the key shape: the key it presented (and that key's
 * secret part), and its request id, which is stored in its own column and so is kept as is.
 */
export interface RedactionContext {
  presentedToken?: string | undefined;
  requestId?: string | undefined;
}

/**
 * Long runs that are words, not keys: the API's own message codes and field names
 * (`caustic-stress-corrosion-cracking`, `condensateFilmReynoldsNumberAtBottom`). A random secret of
 * 32 characters takes either shape with a chance of about 10⁻⁶ (letters only, no two capitals
 * together, no digit), and the key a request presents is removed by value whatever its shape.
 */
const WORDS_NOT_KEY = /^(?:[a-z]+(?:-[a-z]+)+|[a-z]+(?:[A-Z][a-z]+)+)$/;

/** Replaces every key-shaped token ({@link KEY_SHAPED_PATTERN}) and the presented key in text. */
export function redactText(text: string, ctx: RedactionContext = {}): string {
  let s = text.replace(KEY_SHAPED_PATTERN, (m) =>
    m === ctx.requestId || WORDS_NOT_KEY.test(m) ? m : REDACTED,
  );
  const token = ctx.presentedToken;
  if (token) {
    for (const secret of [token, secretPartOf(token)]) {
      if (secret && s.includes(secret)) s = s.split(secret).join(REDACTED);
    }
  }
  return s;
}

/**
 * True if text carries an issued-format key, or contains one of the given secrets (and, for an
 * issued key, its secret part). For text kept whole, such as a client's request id.
 */
export function carriesKey(text: string, secrets: readonly (string | undefined)[]): boolean {
  if (ISSUED_KEY_SHAPED.test(text)) return true;
  for (const token of secrets) {
    if (!token) continue;
    const secret = secretPartOf(token);
    if (text.includes(token) || (secret !== undefined && text.includes(secret))) return true;
  }
  return false;
}

function redactValue(value: unknown, ctx: RedactionContext, depth: number): unknown {
  if (typeof value === 'string') return redactText(value, ctx);
  if (value === null || typeof value !== 'object') return value;
  if (depth >= LOG_BODY_DEPTH) return TOO_DEEP;
  if (Array.isArray(value)) return value.map((v) => redactValue(v, ctx, depth + 1));
  // A null-prototype copy: a property named "__proto__" stays a property, never a prototype.
  const out: Record<string, unknown> = Object.create(null) as Record<string, unknown>;
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
    out[redactText(k, ctx)] = SECRET_PROPERTY.test(k) ? REDACTED : redactValue(v, ctx, depth + 1);
  }
  return out;
}

/**
 * Redacts secrets in a parsed JSON value: values of secret-looking properties, and key-shaped
 * text in every string and property name. Nesting beyond {@link LOG_BODY_DEPTH} is cut.
 */
export function redact(value: unknown, ctx: RedactionContext | string = {}): unknown {
  return redactValue(value, typeof ctx === 'string' ? { presentedToken: ctx } : ctx, 0);
}

/** Truncates to at most `limitBytes` UTF-8 bytes, marking the cut. */
export function truncateUtf8(text: string, limitBytes: number): string {
  const buf = Buffer.from(text, 'utf8');
  if (buf.length <= limitBytes) return text;
  // Drop a partial multi-byte character at the cut (U+FFFD) rather than store invalid text.
  return (
    buf
      .subarray(0, limitBytes)
      .toString('utf8')
      .replace(/\uFFFD$/, '') + '…[truncated]'
  );
}

/**
 * Serialises a body for the log: JSON is parsed, redacted and re-serialised; other text has
 * key-like strings removed. Returns null for an empty body. Never throws: a body it cannot
 * serialise is logged as a note saying so.
 */
export function logBody(
  body: unknown,
  limitBytes: number,
  ctx: RedactionContext | string = {},
): string | null {
  const context = typeof ctx === 'string' ? { presentedToken: ctx } : ctx;
  try {
    return serialiseBody(body, limitBytes, context);
  } catch (err) {
    return `[body not logged: ${redactText(String((err as Error)?.message ?? err), context)}]`;
  }
}

function serialiseBody(body: unknown, limitBytes: number, ctx: RedactionContext): string | null {
  if (body === undefined || body === null) return null;
  let text: string;
  if (Buffer.isBuffer(body)) text = body.toString('utf8');
  else if (typeof body === 'string') text = body;
  else text = JSON.stringify(redact(body, ctx));
  if (text === '' || text === '{}') return text === '' ? null : text;
  if (typeof body === 'string' || Buffer.isBuffer(body)) {
    let parsed: unknown;
    let isJson = true;
    try {
      parsed = JSON.parse(text);
    } catch {
      isJson = false;
    }
    text = isJson ? JSON.stringify(redact(parsed, ctx)) : redactText(text, ctx);
  }
  return truncateUtf8(text, limitBytes);
}

/** Deletes request_log rows older than `retentionDays` before `now`; returns how many. */
export async function pruneRequestLog(store: Store, now: Date, retentionDays: number): Promise<number> {
  const cutoff = new Date(now.getTime() - retentionDays * 86_400_000);
  return store.execute(sql`DELETE FROM request_log WHERE at < ${store.instant(cutoff)}`);
}
