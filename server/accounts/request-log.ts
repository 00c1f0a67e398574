/**
 * Request-log helpers: redaction, truncation and retention pruning.
 *
 * What is never stored: request headers (so never the Authorization header), any JSON property
 * whose name looks like a secret (password, secret, token, apiKey, authorization, key…), and any
 * string that looks like an Ebullio key, or equals the key presented with the request. Bodies are
 * stored only for accounts with `retain_request_bodies` on, truncated to a byte limit.
 */
import type { Sqlite } from '../db/client.js';

const SECRET_PROPERTY = /pass(word)?|secret|token|authori[sz]ation|api[-_]?key|^key$|credential|cookie/i;
const KEY_LIKE = /ebl_[a-z]+_[A-Za-z0-9]+_[A-Za-z0-9]+/g;
export const REDACTED = '[redacted]';

function redactValue(value: unknown, presentedToken: string | undefined, depth: number): unknown {
  if (typeof value === 'string') {
    let s = value.replace(KEY_LIKE, REDACTED);
    if (presentedToken && s.includes(presentedToken)) s = s.split(presentedToken).join(REDACTED);
    return s;
  }
  if (depth > 20 || value === null || typeof value !== 'object') return value;
  if (Array.isArray(value)) return value.map((v) => redactValue(v, presentedToken, depth + 1));
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
    out[k] = SECRET_PROPERTY.test(k) ? REDACTED : redactValue(v, presentedToken, depth + 1);
  }
  return out;
}

/** Redacts secrets in a parsed JSON value (objects by property name, strings by pattern). */
export function redact(value: unknown, presentedToken?: string): unknown {
  return redactValue(value, presentedToken, 0);
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
 * key-like strings removed. Returns null for an empty body.
 */
export function logBody(body: unknown, limitBytes: number, presentedToken?: string): string | null {
  if (body === undefined || body === null) return null;
  let text: string;
  if (Buffer.isBuffer(body)) text = body.toString('utf8');
  else if (typeof body === 'string') text = body;
  else text = JSON.stringify(redact(body, presentedToken));
  if (text === '' || text === '{}') return text === '' ? null : text;
  if (typeof body === 'string' || Buffer.isBuffer(body)) {
    try {
      text = JSON.stringify(redact(JSON.parse(text), presentedToken));
    } catch {
      text = redact(text, presentedToken) as string;
    }
  }
  return truncateUtf8(text, limitBytes);
}

/** Deletes request_log rows older than `retentionDays` before `now`; returns how many. */
export function pruneRequestLog(sqlite: Sqlite, now: Date, retentionDays: number): number {
  const cutoff = now.getTime() - retentionDays * 86_400_000;
  return sqlite.prepare('DELETE FROM request_log WHERE at < ?').run(cutoff).changes;
}
