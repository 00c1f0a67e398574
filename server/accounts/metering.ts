/**
 * Metering: one usage_events row, the usage_daily upsert, the request_log row and the key's
 * last_used_at, all in ONE synchronous better-sqlite3 transaction.
 *
 * The HTTP layer calls {@link recordRequest} from its `res.end` hook, before the response bytes are
 * handed to the socket. better-sqlite3 is synchronous, so when `recordRequest` returns the
 * transaction is committed (WAL) and the request is billed before the client can see the answer:
 * a client never holds a result that was not metered.
 */
import type { Sqlite } from '../db/client.js';
import { utcDay } from './usage.js';

export interface RequestRecord {
  at: Date;
  accountId: number;
  keyId: number;
  operation: string;
  status: number;
  units: number;
  latencyMs: number;
  requestId: string;
  engineVersion: string;
  method: string;
  path: string;
  requestBody: string | null;
  responseBody: string | null;
}

/** last_used_at is written at most once a minute per key, to keep the hot path cheap. */
const LAST_USED_GRANULARITY_MS = 60_000;

const statements = new WeakMap<Sqlite, (r: RequestRecord) => void>();

function prepare(sqlite: Sqlite): (r: RequestRecord) => void {
  const insertEvent = sqlite.prepare(
    `INSERT INTO usage_events (at, account_id, key_id, operation, status, units, latency_ms, request_id, engine_version)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const upsertDaily = sqlite.prepare(
    `INSERT INTO usage_daily (account_id, day, operation, requests, units, errors) VALUES (?, ?, ?, 1, ?, ?)
     ON CONFLICT (account_id, day, operation) DO UPDATE SET
       requests = requests + 1, units = units + excluded.units, errors = errors + excluded.errors`,
  );
  const insertLog = sqlite.prepare(
    `INSERT INTO request_log (request_id, at, account_id, key_id, method, path, status, latency_ms,
       request_body, response_body, engine_version) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const touchKey = sqlite.prepare(
    'UPDATE api_keys SET last_used_at = ? WHERE id = ? AND (last_used_at IS NULL OR last_used_at < ?)',
  );
  return sqlite.transaction((r: RequestRecord) => {
    const at = r.at.getTime();
    const isError = r.status >= 400 ? 1 : 0;
    insertEvent.run(
      at,
      r.accountId,
      r.keyId,
      r.operation,
      r.status,
      r.units,
      r.latencyMs,
      r.requestId,
      r.engineVersion,
    );
    upsertDaily.run(r.accountId, utcDay(r.at), r.operation, r.units, isError);
    insertLog.run(
      r.requestId,
      at,
      r.accountId,
      r.keyId,
      r.method,
      r.path,
      r.status,
      r.latencyMs,
      r.requestBody,
      r.responseBody,
      r.engineVersion,
    );
    touchKey.run(at, r.keyId, at - LAST_USED_GRANULARITY_MS);
  });
}

/** Writes the record durably (synchronous transaction). Throws if the database refuses. */
export function recordRequest(sqlite: Sqlite, record: RequestRecord): void {
  let run = statements.get(sqlite);
  if (!run) {
    run = prepare(sqlite);
    statements.set(sqlite, run);
  }
  run(record);
}
