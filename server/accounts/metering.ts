/**
 * Metering: for each request one usage_events row, its share of the usage_daily roll-up, one
 * request_log row and the key's last_used_at, committed before the response leaves.
 *
 * Group commit. The HTTP layer hands each finished request to a {@link MeteringWriter} and holds
 * the response bytes back until the writer reports the commit. The writer gathers the requests
 * finished in one turn of the event loop and commits them together in ONE transaction on the next
 * `setImmediate` (i.e. after the poll phase has handled every socket that was ready), so the
 * pages of the tables and indexes are written once per group, not once per request, and the daily
 * roll-up gets one upsert per (account, day, operation) in the group. The promise is unchanged: a
 * response is written only after the transaction holding its row has committed, so a process
 * killed at any moment has billed every request that got a response (plus, at most, those that
 * were in flight). If the group's transaction fails, each record is retried alone, so one bad
 * record cannot cost the others their response.
 *
 * Two paths behind the same writer:
 * - **SQLite** (the measured hot path, `npm run bench`, section api): prepared statements in one
 *   synchronous better-sqlite3 transaction per group, committed on `store.sqlite` within the
 *   `setImmediate` callback.
 * - **PostgreSQL**: the same group in one transaction on one pooled connection, as a multi-row
 *   INSERT into usage_events and into request_log, one multi-row upsert of the group's
 *   (account, day, operation) roll-ups (sorted, so two nodes lock them in the same order) and an
 *   UPDATE per key for last_used_at. Groups go one at a time: what finishes while a group commits
 *   forms the next group.
 *
 * {@link recordRequest} is the same write for one record (seeding, tests).
 *
 * Month totals. Every charged request checks the account's quota against the units committed
 * this month. This module is the only writer of usage_daily, so it keeps those totals per
 * account in memory, per database ({@link knownUnitsThisMonth}, {@link committedUnitsThisMonth}):
 * read from usage_daily on first use in a month, then advanced by each commit. On SQLite the
 * first read is synchronous, so the quota check never waits; on PostgreSQL it is queued behind the
 * group being committed (so it neither misses nor double-counts that group), and the metering
 * middleware awaits it before the request goes on. These totals miss what other nodes commit, so
 * on PostgreSQL (several nodes) they are only each node's first check: the commit decides
 * ({@link chargeWithinQuotas}: the charged accounts locked, their month read, a record that no
 * longer fits written as a 429 with 0 units), and the totals known are refreshed from the database
 * at each commit. On SQLite one process serves the file and its totals are exact, so a charge is
 * never refused at the commit there.
 */
import { setImmediate as nextTurn } from 'node:timers';
import { and, eq, isNull, lt, or, sql } from 'drizzle-orm';
import type { Statement } from 'better-sqlite3';
import type { Sqlite } from '../db/client.js';
import type { Store } from '../db/store.js';
import { monthStartUtc, nextMonthStartUtc, unitsUsedThisMonth, utcDay, utcMonth } from './usage.js';

export interface RequestRecord {
  at: Date;
  accountId: number;
  /** Null for work done without a key (a replay run from the console of a deleted key's entry). */
  keyId: number | null;
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
  /** The answer was replayed from an idempotency record (0 units; marked in the request log). */
  idempotentReplay?: boolean;
}

/** last_used_at is written at most once a minute per key, to keep the hot path cheap. */
const LAST_USED_GRANULARITY_MS = 60_000;

/** Rows per multi-row INSERT on PostgreSQL (its statements take at most 65 535 parameters). */
const ROWS_PER_INSERT = 1000;

type CommitRecords = (records: readonly RequestRecord[]) => void;

/** A SQLite connection's commit (write, then advance the month totals) and its bare write. */
interface Committer {
  commit: CommitRecords;
  /** The rows alone, in the transaction open on the connection (a savepoint inside it). */
  write: CommitRecords;
}
const committers = new WeakMap<Sqlite, Committer>();

/** Units committed per account in one calendar month (UTC), per database. */
type MonthTotals = Map<number, { month: string; units: number }>;
const monthTotals = new WeakMap<object, MonthTotals>();

/** The connection (SQLite) or pool (PostgreSQL) a store writes through: the month totals' key. */
function databaseOf(store: Store): object {
  return store.sqlite ?? store.pool ?? store;
}

function totalsFor(database: object): MonthTotals {
  let totals = monthTotals.get(database);
  if (!totals) {
    totals = new Map();
    monthTotals.set(database, totals);
  }
  return totals;
}

/** Committed: advance the month totals already known (others are read on first use). */
function advanceTotals(totals: MonthTotals, records: readonly RequestRecord[]): void {
  for (const r of records) {
    const known = totals.get(r.accountId);
    if (known?.month === utcMonth(r.at)) known.units += r.units;
  }
}

/** The month-sum statement, prepared once per connection (read on the first charge of a month). */
const monthSums = new WeakMap<Sqlite, Statement<[number, string, string], { units: number }>>();

function sqliteUnitsThisMonth(sqlite: Sqlite, accountId: number, now: Date): number {
  let stmt = monthSums.get(sqlite);
  if (!stmt) {
    stmt = sqlite.prepare<[number, string, string], { units: number }>(
      'SELECT COALESCE(SUM(units), 0) AS units FROM usage_daily WHERE account_id = ? AND day >= ? AND day < ?',
    );
    monthSums.set(sqlite, stmt);
  }
  const row = stmt.get(accountId, utcDay(monthStartUtc(now)), utcDay(nextMonthStartUtc(now)));
  return row?.units ?? 0;
}

/**
 * Units the account has committed in the calendar month (UTC) containing `now`, if known without
 * waiting: from memory, or on SQLite read now. Undefined on PostgreSQL before the month's first
 * read ({@link committedUnitsThisMonth}, {@link loadUnitsThisMonth}).
 */
export function knownUnitsThisMonth(store: Store, accountId: number, now: Date): number | undefined {
  const totals = totalsFor(databaseOf(store));
  const month = utcMonth(now);
  const known = totals.get(accountId);
  if (known?.month === month) return known.units;
  if (!store.sqlite) return undefined;
  const units = sqliteUnitsThisMonth(store.sqlite, accountId, now);
  totals.set(accountId, { month, units });
  return units;
}

/**
 * Reads the month total into memory unless it is known: undefined when nothing had to wait (always
 * on SQLite), else a promise that settles once it is read. The metering middleware awaits it
 * before the request goes on, so the quota check itself stays synchronous.
 */
export function loadUnitsThisMonth(store: Store, accountId: number, now: Date): Promise<number> | undefined {
  if (knownUnitsThisMonth(store, accountId, now) !== undefined) return undefined;
  const totals = totalsFor(databaseOf(store));
  const month = utcMonth(now);
  // Behind the group being committed: the sum then holds every committed group, and the groups
  // after it advance the total (the read can neither miss nor count twice a group in flight).
  return serial(store, async () => {
    const known = totals.get(accountId);
    if (known?.month === month) return known.units;
    const units = await unitsUsedThisMonth(store, accountId, now);
    totals.set(accountId, { month, units });
    return units;
  });
}

/** Units the account has committed in the calendar month (UTC) containing `now`. */
export async function committedUnitsThisMonth(store: Store, accountId: number, now: Date): Promise<number> {
  return knownUnitsThisMonth(store, accountId, now) ?? (await loadUnitsThisMonth(store, accountId, now))!;
}

/** The PostgreSQL work of one store (group commits, month reads), one at a time, in order. */
const queues = new WeakMap<Store, Promise<unknown>>();
function serial<T>(store: Store, job: () => Promise<T>): Promise<T> {
  const result = (queues.get(store) ?? Promise.resolve()).then(job);
  queues.set(
    store,
    result.catch(() => undefined),
  );
  return result;
}

interface DailyRoll {
  accountId: number;
  day: string;
  operation: string;
  requests: number;
  units: number;
  errors: number;
}

/** Adds a request to the daily roll-up of its (account, UTC day, operation) within one group. */
function addToRollUp(daily: Map<string, DailyRoll>, r: RequestRecord): void {
  const day = utcDay(r.at);
  const rollKey = `${r.accountId}\u0000${day}\u0000${r.operation}`;
  const isError = r.status >= 400 ? 1 : 0;
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
}

function prepareCommit(sqlite: Sqlite): Committer {
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
       request_body, response_body, engine_version, idempotent_replay) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const touchKey = sqlite.prepare(
    'UPDATE api_keys SET last_used_at = ? WHERE id = ? AND (last_used_at IS NULL OR last_used_at < ?)',
  );
  const write = sqlite.transaction((records: readonly RequestRecord[]) => {
    const daily = new Map<string, DailyRoll>();
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
        r.idempotentReplay ? 1 : 0,
      );
    for (const r of records) {
      const at = r.at.getTime();
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
      addToRollUp(daily, r);
      if (r.keyId !== null) lastUse.set(r.keyId, Math.max(lastUse.get(r.keyId) ?? at, at));
    }
    for (const d of daily.values())
      upsertDaily.run(d.accountId, d.day, d.operation, d.requests, d.units, d.errors);
    for (const [keyId, at] of lastUse) touchKey.run(at, keyId, at - LAST_USED_GRANULARITY_MS);
  });
  const totals = totalsFor(sqlite);
  return {
    commit: (records) => {
      write(records);
      advanceTotals(totals, records);
    },
    write: (records) => void write(records),
  };
}

function committerOf(sqlite: Sqlite): Committer {
  let committer = committers.get(sqlite);
  if (!committer) {
    committer = prepareCommit(sqlite);
    committers.set(sqlite, committer);
  }
  return committer;
}

function committerFor(sqlite: Sqlite): CommitRecords {
  return committerOf(sqlite).commit;
}

function chunks<T>(rows: readonly T[]): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < rows.length; i += ROWS_PER_INSERT) out.push(rows.slice(i, i + ROWS_PER_INSERT));
  return out;
}

/**
 * The PostgreSQL write of a group: the same rows as the SQLite path, in one transaction, as few
 * statements as the group allows. The roll-ups and key updates are sorted, so two nodes that
 * commit groups touching the same rows take their locks in the same order (no deadlock).
 */
async function commitPostgres(store: Store, records: readonly RequestRecord[]): Promise<void> {
  const charge = await store.transaction(async (tx) => {
    const decided = await chargeWithinQuotas(tx, records);
    await writePostgres(
      tx,
      records.map((r) => (decided.refused.has(r) ? { ...r, status: 429, units: 0, responseBody: null } : r)),
    );
    return decided;
  });
  // Committed: the refusals stand, and the month totals this node knows become the database's,
  // other nodes' units included.
  for (const [record, refusal] of charge.refused) refusals.set(record, refusal);
  const totals = totalsFor(databaseOf(store));
  // (Only totals already known: one not yet read is read, queued behind this commit, on first use.)
  for (const [accountId, known] of charge.after) if (totals.has(accountId)) totals.set(accountId, known);
}

/**
 * A record the shared database refused to charge: between the node's own check (the month total
 * it knew, see {@link knownUnitsThisMonth}) and the commit, other nodes spent the account's quota.
 * The record is written as a 429 with 0 units, and the client gets the quota problem instead of
 * its result (server/http/middleware/metering.ts).
 */
export class QuotaSpentElsewhere extends Error {
  constructor(
    readonly units: number,
    readonly remaining: number,
    readonly quota: number,
  ) {
    super(`quota spent meanwhile: ${units} units asked, ${remaining} of ${quota} remain`);
  }
}

/** The refusal of each record refused at its commit, for its callback. */
const refusals = new WeakMap<RequestRecord, QuotaSpentElsewhere>();
export function refusalOf(record: RequestRecord): QuotaSpentElsewhere | undefined {
  return refusals.get(record);
}

/**
 * Quotas across nodes (PostgreSQL). Each node checks a charge against the month total it knows,
 * which misses what other nodes committed since it last read it, so the database decides at the
 * commit: the accounts charged in the group are locked (`SELECT … FOR UPDATE`, in id order so two
 * nodes cannot deadlock), their month totals read from usage_daily, which no other commit for
 * those accounts can change until this one ends, and the records charged in order; one that no
 * longer fits its account's quota is refused (429, 0 units). So the units committed in a month
 * never exceed the quota, whatever the number of nodes. Returns the month totals after the group.
 */
async function chargeWithinQuotas(
  tx: Store,
  records: readonly RequestRecord[],
): Promise<{
  refused: Map<RequestRecord, QuotaSpentElsewhere>;
  after: Map<number, { month: string; units: number }>;
}> {
  const refused = new Map<RequestRecord, QuotaSpentElsewhere>();
  const after = new Map<number, { month: string; units: number }>();
  const charged = records.filter((r) => !r.logOnly && r.units > 0);
  if (charged.length === 0) return { refused, after };
  const ids = [...new Set(charged.map((r) => r.accountId))].sort((a, b) => a - b);
  const locked = await tx.rows<{ id: number; quota: number | string }>(
    // (SQLite has no FOR UPDATE and needs none: its write transaction already excludes every other.)
    sql`SELECT id, monthly_unit_quota AS quota FROM accounts
        WHERE id IN (${sql.join(ids, sql`, `)}) ORDER BY id${tx.dialect === 'postgres' ? sql` FOR UPDATE` : sql``}`,
  );
  const quotaOf = new Map(locked.map((a) => [Number(a.id), Number(a.quota)]));
  const used = new Map<string, number>();
  for (const r of charged) {
    const month = utcMonth(r.at);
    const key = `${r.accountId}\u0000${month}`;
    let units = used.get(key);
    if (units === undefined) units = await unitsUsedThisMonth(tx, r.accountId, r.at);
    const quota = quotaOf.get(r.accountId) ?? 0;
    if (units + r.units > quota) {
      refused.set(r, new QuotaSpentElsewhere(r.units, Math.max(0, quota - units), quota));
    } else {
      units += r.units;
    }
    used.set(key, units);
    after.set(r.accountId, { month, units });
  }
  return { refused, after };
}

/** The group's rows (see {@link commitPostgres}), in the caller's transaction. */
async function writePostgres(tx: Store, records: readonly RequestRecord[]): Promise<void> {
  const store = tx;
  const events: (typeof store.t.usageEvents.$inferInsert)[] = [];
  const logs: (typeof store.t.requestLog.$inferInsert)[] = [];
  const daily = new Map<string, DailyRoll>();
  const lastUse = new Map<number, number>();
  for (const r of records) {
    logs.push({
      requestId: r.requestId,
      at: r.at,
      accountId: r.accountId,
      keyId: r.keyId,
      method: r.method,
      path: r.path,
      status: r.status,
      latencyMs: r.latencyMs,
      requestBody: r.requestBody,
      responseBody: r.responseBody,
      engineVersion: r.engineVersion,
      idempotentReplay: r.idempotentReplay === true,
    });
    // A refused key's (logOnly) request gets its request-log row and nothing else.
    if (r.logOnly) continue;
    events.push({
      at: r.at,
      accountId: r.accountId,
      keyId: r.keyId,
      operation: r.operation,
      status: r.status,
      units: r.units,
      latencyMs: r.latencyMs,
      requestId: r.requestId,
      engineVersion: r.engineVersion,
    });
    addToRollUp(daily, r);
    const at = r.at.getTime();
    if (r.keyId !== null) lastUse.set(r.keyId, Math.max(lastUse.get(r.keyId) ?? at, at));
  }
  const rolls = [...daily.values()].sort(
    (a, b) =>
      a.accountId - b.accountId ||
      (a.day < b.day ? -1 : a.day > b.day ? 1 : 0) ||
      (a.operation < b.operation ? -1 : a.operation > b.operation ? 1 : 0),
  );
  const keyUses = [...lastUse].sort((a, b) => a[0] - b[0]);
  await store.transaction(async (tx) => {
    const { usageEvents, usageDaily, requestLog, apiKeys } = tx.t;
    for (const rows of chunks(events)) await tx.db.insert(usageEvents).values(rows);
    for (const rows of chunks(logs)) await tx.db.insert(requestLog).values(rows);
    for (const rows of chunks(rolls)) {
      await tx.db
        .insert(usageDaily)
        .values(rows)
        .onConflictDoUpdate({
          target: [usageDaily.accountId, usageDaily.day, usageDaily.operation],
          // Qualified: a bare "requests" is ambiguous between the row and excluded on PostgreSQL.
          set: {
            requests: sql`usage_daily.requests + excluded.requests`,
            units: sql`usage_daily.units + excluded.units`,
            errors: sql`usage_daily.errors + excluded.errors`,
          },
        });
    }
    for (const [keyId, at] of keyUses) {
      await tx.db
        .update(apiKeys)
        .set({ lastUsedAt: new Date(at) })
        .where(
          and(
            eq(apiKeys.id, keyId),
            or(isNull(apiKeys.lastUsedAt), lt(apiKeys.lastUsedAt, new Date(at - LAST_USED_GRANULARITY_MS))),
          ),
        );
    }
  });
}

/** Writes one record durably in its own transaction. Rejects if the database refuses. */
export async function recordRequest(store: Store, record: RequestRecord): Promise<void> {
  if (store.sqlite) committerFor(store.sqlite)([record]);
  else await serial(store, () => commitPostgres(store, [record]));
}

/** Writes several records durably in one transaction (the demo seed's past usage). */
export async function recordRequests(store: Store, records: readonly RequestRecord[]): Promise<void> {
  if (records.length === 0) return;
  if (store.sqlite) committerFor(store.sqlite)(records);
  else await serial(store, () => commitPostgres(store, records));
}

/**
 * Writes `records` and runs `body` in ONE transaction: a job's chunk commits its rows, its
 * progress and its metering together, so a crash loses the whole chunk or nothing, and a chunk is
 * never charged twice. On PostgreSQL the quota is decided at the commit as for a group
 * ({@link chargeWithinQuotas}); a record it would refuse rolls the whole transaction back and
 * rejects with {@link QuotaSpentElsewhere}. `body` awaits only the store (see store.ts).
 */
export async function commitWithRecords<T>(
  store: Store,
  records: readonly RequestRecord[],
  body: (tx: Store) => Promise<T>,
): Promise<T> {
  if (store.sqlite) {
    const sqlite = store.sqlite;
    const result = await store.transaction(async (tx) => {
      const value = await body(tx);
      committerOf(sqlite).write(records);
      return value;
    });
    advanceTotals(totalsFor(sqlite), records);
    return result;
  }
  return serial(store, async () => {
    const { value, after } = await store.transaction(async (tx) => {
      const decided = await chargeWithinQuotas(tx, records);
      const refused = decided.refused.values().next();
      if (!refused.done) throw refused.value;
      await writePostgres(tx, records);
      return { value: await body(tx), after: decided.after };
    });
    const totals = totalsFor(databaseOf(store));
    for (const [accountId, known] of after) if (totals.has(accountId)) totals.set(accountId, known);
    return value;
  });
}

/**
 * Units this node has set aside for work it is running outside a request (a job's chunk), per
 * account and database: the quota check of a request counts them, as a job's check counts the
 * requests in flight, so neither can spend what the other is about to.
 */
const reservations = new WeakMap<object, Map<number, number>>();

export function reservedUnits(store: Store, accountId: number): number {
  return reservations.get(databaseOf(store))?.get(accountId) ?? 0;
}

/** Sets `units` aside for the account until {@link releaseReserved}. */
export function reserveUnits(store: Store, accountId: number, units: number): void {
  const db = databaseOf(store);
  let map = reservations.get(db);
  if (!map) {
    map = new Map();
    reservations.set(db, map);
  }
  map.set(accountId, (map.get(accountId) ?? 0) + units);
}

export function releaseReserved(store: Store, accountId: number, units: number): void {
  const map = reservations.get(databaseOf(store));
  if (!map) return;
  const left = (map.get(accountId) ?? 0) - units;
  if (left > 0) map.set(accountId, left);
  else map.delete(accountId);
}

/** Called once the record is committed (`error` undefined) or could not be written. */
export type CommitCallback = (error?: unknown) => void;

export interface MeteringWriter {
  /** Queues a record for the next group commit; `done` runs after that commit (or its failure). */
  submit(record: RequestRecord, done: CommitCallback): void;
  /**
   * Commits what is queued now; resolves once it is committed (and its callbacks have run). On
   * SQLite the commit is done before `flush` returns.
   */
  flush(): Promise<void>;
  /** Records queued and not yet handed to a commit. */
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

/** A group-commit writer on this store (one per app): SQLite or PostgreSQL, see the module comment. */
export function meteringWriter(store: Store): MeteringWriter {
  const writer = store.sqlite ? sqliteWriter(store.sqlite) : postgresWriter(store);
  let writers = writersOf.get(store);
  if (!writers) {
    writers = new Set();
    writersOf.set(store, writers);
  }
  writers.add(new WeakRef(writer));
  return writer;
}

/** Every writer made on a store, so a shutdown can wait for what they still hold. */
const writersOf = new WeakMap<Store, Set<WeakRef<MeteringWriter>>>();

/**
 * Commits what every writer on this store holds and waits for the commits in progress: a
 * shutdown calls it after the HTTP drain and before closing the database, so the row of a request
 * answered (or abandoned by its client) during the drain is not lost. On SQLite a commit is
 * synchronous and this is immediate; on PostgreSQL it awaits the group in flight.
 */
export async function flushMetering(store: Store): Promise<void> {
  const writers = writersOf.get(store);
  if (!writers) return;
  for (const ref of writers) {
    const writer = ref.deref();
    if (!writer) writers.delete(ref);
    else await writer.flush();
  }
}

function sqliteWriter(sqlite: Sqlite): MeteringWriter {
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
    flush() {
      flush();
      return Promise.resolve();
    },
    get pending() {
      return records.length;
    },
  };
}

function postgresWriter(store: Store): MeteringWriter {
  let records: RequestRecord[] = [];
  let callbacks: CommitCallback[] = [];
  let scheduled = false;
  /** The commit loop while it runs: one group at a time; what arrives meanwhile is the next. */
  let running: Promise<void> | undefined;

  const commitGroup = async (group: RequestRecord[], done: CommitCallback[]): Promise<void> => {
    try {
      await serial(store, () => commitPostgres(store, group));
    } catch {
      // The group was rolled back as a whole: retry each record alone so only a bad one fails.
      for (let i = 0; i < group.length; i++) {
        let error: unknown;
        try {
          await serial(store, () => commitPostgres(store, [group[i]!]));
        } catch (err) {
          error = err;
        }
        settle(done[i]!, error ?? refusalOf(group[i]!));
      }
      return;
    }
    // Released only now: every response of the group leaves after its COMMIT.
    for (let i = 0; i < group.length; i++) settle(done[i]!, refusalOf(group[i]!));
  };

  const run = async (): Promise<void> => {
    try {
      while (records.length > 0) {
        const group = records;
        const done = callbacks;
        records = [];
        callbacks = [];
        await commitGroup(group, done);
      }
    } finally {
      running = undefined;
    }
  };

  const flush = (): Promise<void> => {
    scheduled = false;
    if (running) return running;
    if (records.length === 0) return Promise.resolve();
    running = run();
    return running;
  };

  return {
    submit(record, done) {
      records.push(record);
      callbacks.push(done);
      if (!scheduled) {
        scheduled = true;
        nextTurn(() => void flush());
      }
    },
    flush,
    get pending() {
      return records.length;
    },
  };
}
