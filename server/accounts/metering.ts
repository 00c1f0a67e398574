/**
 * Metering: for each request one usage_events row, its share of the usage_daily roll-up, one
 * request_log row and the key's last_used_at, committed in a synchronous better-sqlite3
 * transaction before the response leaves.
 *
 * Group commit. The HTTP layer hands each finished request to a {@link MeteringWriter} and holds
 * the response bytes back until the writer reports the commit. The writer gathers the requests
 * finished in one turn of the event loop and commits them together in ONE transaction on the next
 * `setImmediate` (i.e. after the poll phase has handled every socket that was ready), so the WAL
 * pages of the tables and indexes are written once per group, not once per request, and the daily
 * roll-up gets one upsert per (account, day, operation) in the group. The promise is unchanged: a
 * response is written only after the transaction holding its row has committed, so a process
 * killed at any moment has billed every request that got a response (plus, at most, those that
 * were in flight). If the group's transaction fails, each record is retried alone, so one bad
 * record cannot cost the others their response.
 *
 * {@link recordRequest} is the same write for one record, synchronously (seeding, tests).
 *
 * Month totals. Every charged request checks the account's quota against the units committed
 * this month. This module is the only writer of usage_daily, so it keeps those totals per
 * account in memory ({@link committedUnitsThisMonth}): read from usage_daily on first use in a
 * month, then advanced by each commit, in the same synchronous step that commits the rows. (A
 * second process writing usage_daily to the same file would need the query instead; one server
 * process per database is the supported layout, see middleware/rate-limit.ts.)
 */
import { setImmediate as nextTurn } from 'node:timers';
import type { Sqlite } from '../db/client.js';
import { unitsUsedThisMonth, utcDay, utcMonth } from './usage.js';

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
  /**
   * Only a request-log row, no usage event, roll-up or key use: a request refused with 401 for a
   * known but unusable key (revoked, expired, rotated), shown to its account, never metered.
   */
  logOnly?: boolean;
}

/** last_used_at is written at most once a minute per key, to keep the hot path cheap. */
const LAST_USED_GRANULARITY_MS = 60_000;

type CommitRecords = (records: readonly RequestRecord[]) => void;

const committers = new WeakMap<Sqlite, CommitRecords>();

/** Units committed per account in one calendar month (UTC), per connection. */
type MonthTotals = Map<number, { month: string; units: number }>;
const monthTotals = new WeakMap<Sqlite, MonthTotals>();
function totalsFor(sqlite: Sqlite): MonthTotals {
  let totals = monthTotals.get(sqlite);
  if (!totals) {
    totals = new Map();
    monthTotals.set(sqlite, totals);
  }
  return totals;
}

/** Units the account has committed in the calendar month (UTC) containing `now`. */
export function committedUnitsThisMonth(sqlite: Sqlite, accountId: number, now: Date): number {
  const totals = totalsFor(sqlite);
  const month = utcMonth(now);
  const known = totals.get(accountId);
  if (known?.month === month) return known.units;
  const units = unitsUsedThisMonth(sqlite, accountId, now);
  totals.set(accountId, { month, units });
  return units;
}

function prepareCommit(sqlite: Sqlite): CommitRecords {
  const insertEvent = sqlite.prepare(
    `INSERT INTO usage_events (at, account_id, key_id, operation, status, units, latency_ms, request_id, engine_version)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const upsertDaily = sqlite.prepare(
    `INSERT INTO usage_daily (account_id, day, operation, requests, units, errors) VALUES (?, ?, ?, ?, ?, ?)
     ON CONFLICT (account_id, day, operation) DO UPDATE SET
       requests = requests + excluded.requests, units = units + excluded.units, errors = errors + excluded.errors`,
  );
  const insertLog = sqlite.prepare(
    `INSERT INTO request_log (request_id, at, account_id, key_id, method, path, status, latency_ms,
       request_body, response_body, engine_version) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const touchKey = sqlite.prepare(
    'UPDATE api_keys SET last_used_at = ? WHERE id = ? AND (last_used_at IS NULL OR last_used_at < ?)',
  );
  const write = sqlite.transaction((records: readonly RequestRecord[]) => {
    const daily = new Map<
      string,
      { accountId: number; day: string; operation: string; requests: number; units: number; errors: number }
    >();
    const lastUse = new Map<number, number>();
    // Every record gets its request-log row; a refused key's (logOnly) gets nothing else.
    const logRow = (r: (typeof records)[number], at: number) =>
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
    for (const r of records) {
      const at = r.at.getTime();
      const isError = r.status >= 400 ? 1 : 0;
      if (r.logOnly) {
        logRow(r, at);
        continue;
      }
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
      logRow(r, at);
      const day = utcDay(r.at);
      const rollKey = `${r.accountId}\u0000${day}\u0000${r.operation}`;
      const roll = daily.get(rollKey);
      if (roll) {
        roll.requests += 1;
        roll.units += r.units;
        roll.errors += isError;
      } else {
        daily.set(rollKey, {
          accountId: r.accountId,
          day,
          operation: r.operation,
          requests: 1,
          units: r.units,
          errors: isError,
        });
      }
      lastUse.set(r.keyId, Math.max(lastUse.get(r.keyId) ?? at, at));
    }
    for (const d of daily.values())
      upsertDaily.run(d.accountId, d.day, d.operation, d.requests, d.units, d.errors);
    for (const [keyId, at] of lastUse) touchKey.run(at, keyId, at - LAST_USED_GRANULARITY_MS);
  });
  const totals = totalsFor(sqlite);
  return (records) => {
    write(records);
    // Committed: advance the month totals already known (others are read on first use).
    for (const r of records) {
      const known = totals.get(r.accountId);
      if (known?.month === utcMonth(r.at)) known.units += r.units;
    }
  };
}

function committerFor(sqlite: Sqlite): CommitRecords {
  let commit = committers.get(sqlite);
  if (!commit) {
    commit = prepareCommit(sqlite);
    committers.set(sqlite, commit);
  }
  return commit;
}

/** Writes one record durably (synchronous transaction). Throws if the database refuses. */
export function recordRequest(sqlite: Sqlite, record: RequestRecord): void {
  committerFor(sqlite)([record]);
}

/** Called once the record is committed (`error` undefined) or could not be written. */
export type CommitCallback = (error?: unknown) => void;

export interface MeteringWriter {
  /** Queues a record for the next group commit; `done` runs after that commit (or its failure). */
  submit(record: RequestRecord, done: CommitCallback): void;
  /** Commits what is queued now, synchronously. */
  flush(): void;
  /** Records queued and not yet committed. */
  readonly pending: number;
}

/** Runs a commit callback; one that throws must not keep the others' responses waiting. */
function settle(cb: CommitCallback, error?: unknown): void {
  try {
    cb(error);
  } catch (err) {
    console.error('[metering] a commit callback failed:', err);
  }
}

/** A group-commit writer on this connection (one per app). */
export function meteringWriter(sqlite: Sqlite): MeteringWriter {
  const commit = committerFor(sqlite);
  let records: RequestRecord[] = [];
  let callbacks: CommitCallback[] = [];
  let scheduled = false;

  const flush = (): void => {
    scheduled = false;
    if (records.length === 0) return;
    const group = records;
    const done = callbacks;
    records = [];
    callbacks = [];
    let groupError: unknown;
    try {
      commit(group);
    } catch (err) {
      groupError = err;
    }
    if (groupError === undefined) {
      for (const cb of done) settle(cb);
      return;
    }
    // The group was rolled back as a whole: retry each record alone so only a bad one fails.
    for (let i = 0; i < group.length; i++) {
      let error: unknown;
      try {
        commit([group[i]!]);
      } catch (err) {
        error = err;
      }
      settle(done[i]!, error);
    }
  };

  return {
    submit(record, done) {
      records.push(record);
      callbacks.push(done);
      if (!scheduled) {
        scheduled = true;
        nextTurn(flush);
      }
    },
    flush,
    get pending() {
      return records.length;
    },
  };
}
