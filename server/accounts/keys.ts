/**
 * API keys.
 *
 * Format of generated keys: `ebk1.<publicId>.<secret>`: `ebk` marks an Ebullio key and `1` is the
 * format's version (a later format takes the next number), publicId = 12 base62 characters (shown
 * in the console and logs), secret = 32 base62 characters (≈ 190.5 random bits). Every character
 * is safe in a header, a URL path and a shell word. Keys issued before this format,
 * `ebl_live_<publicId>_<secret>`, keep working: authentication hashes the whole token, so only
 * the parsing below (display prefix, secret part, redaction) knows both formats. Only
 * HMAC-SHA256(server secret, whole key) is stored; the key is returned once, at creation.
 *
 * Lookup is by the keyed hash (unique index), then the stored and computed hashes are compared
 * with `timingSafeEqual`. Because the whole key is hashed, a wrong secret with a real public id is
 * indistinguishable from a made-up key: both are "unknown", so the 401 never tells a caller
 * whether a public id exists. Revoked and expired are reported as such, but only to someone who
 * holds the complete key. Hashing the whole key also lets an operator register any long random
 * string (BOOTSTRAP_API_KEY) as a key.
 *
 * Rotation creates a successor with the same account, scopes and rate limit, and shortens the
 * old key's expiry to the end of an overlap window; after it the old key gets 401 'expired'.
 *
 * Every function here goes through the async data store (server/db/store.ts). Authentication has
 * two paths: on SQLite the synchronous one, {@link authenticateTokenOnSqlite}, with prepared
 * statements and TEMP triggers (the hot path of every /v1 request; tests/bench/key-lookup.ts
 * measures it against the other); on other stores (PostgreSQL) the portable one in
 * {@link authenticateToken}, which checks the shared auth_revision row once per turn.
 */
import crypto from 'node:crypto';
import { setImmediate as nextTurn } from 'node:timers';
import { desc, eq, sql } from 'drizzle-orm';
import type { Statement } from 'better-sqlite3';
import type { Sqlite } from '../db/client.js';
import type { apiKeys } from '../db/schema.js';
import { readInstant, type Store } from '../db/store.js';
import { isScope, type Scope } from './operations.js';

/** Accepted shape of a presented bearer token (anything else is "malformed"). */
export const TOKEN_PATTERN = /^[A-Za-z0-9_.-]{32,256}$/;
/** The current issued format: version marker, public id, secret. */
const ISSUED_KEY_PATTERN = /^(ebk\d+)\.([A-Za-z0-9]{12})\.([A-Za-z0-9]{32})$/;
/** The first issued format, still accepted: `ebl_<kind>_<publicId>_<secret>`. */
const LEGACY_KEY_PATTERN = /^(ebl_(?:live|test))_([A-Za-z0-9]{12})_([A-Za-z0-9]{32})$/;

/** [format marker, public id, secret] of a key of either issued format. */
function parseIssued(token: string): [string, string, string] | undefined {
  const m = ISSUED_KEY_PATTERN.exec(token) ?? LEGACY_KEY_PATTERN.exec(token);
  return m ? [m[1]!, m[2]!, m[3]!] : undefined;
}

/**
 * Every key-shaped token, wherever it appears in text: the one pattern redaction uses (the request
 * log: path, problem instance, bodies, property names). Extend it here when a key format is added.
 * It covers:
 * - issued keys, `ebk<version>.<publicId>.<secret>`, of any version and length;
 * - keys of the first issued format, `ebl_<kind>_<publicId>_<secret>`, of any kind and length;
 * - every other token {@link TOKEN_PATTERN} accepts: a registered (bootstrap) key may be any run
 *   of 32 or more of its characters, and an issued key's bare secret is 32 of them.
 * The second branch also catches long identifiers (UUIDs, hashes): a log loses an identifier
 * rather than keep a key.
 */
export const KEY_SHAPED_PATTERN =
  /ebk\d+\.[A-Za-z0-9]+\.[A-Za-z0-9]+|ebl_[a-z]+_[A-Za-z0-9]+_[A-Za-z0-9]+|[A-Za-z0-9_.-]{32,}/g;
/** The issued-format branches of {@link KEY_SHAPED_PATTERN} alone (not global: for `test`). */
export const ISSUED_KEY_SHAPED = new RegExp(KEY_SHAPED_PATTERN.source.split('|').slice(0, 2).join('|'));

/** The secret part of an issued key (the characters after its public id), if it is one. */
export function secretPartOf(token: string): string | undefined {
  return parseIssued(token)?.[2];
}

/**
 * What the console shows for a key: never a secret character. An issued key (or a registered key
 * of an issued format) shows its format marker and whole public id, `ebk1.<publicId>` (a key of
 * the first format keeps the 16 characters it always showed, `ebl_<kind>_` and the start of its
 * public id); a registered key of another format shows only its public id (`boot…`, made up at
 * registration), since every character of such a key is secret.
 */
export function displayPrefix(token: string, publicId: string): string {
  const issued = parseIssued(token);
  if (!issued) return publicId;
  const [marker, id] = issued;
  return marker.startsWith('ebl_') ? `${marker}_${id}`.slice(0, 16) : `${marker}.${id}`;
}
const BASE62 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';

/** Uniform random base62 string (rejection sampling, no modulo bias). */
export function randomBase62(length: number): string {
  let out = '';
  while (out.length < length) {
    for (const byte of crypto.randomBytes(length * 2)) {
      if (byte < 248 && out.length < length) out += BASE62[byte % 62];
    }
  }
  return out;
}

export function hashKey(serverSecret: Buffer, token: string): string {
  return crypto.createHmac('sha256', serverSecret).update(token, 'utf8').digest('hex');
}

export type ApiKeyRow = typeof apiKeys.$inferSelect;
/** A key as shown to its owners: never the hash, never the secret. */
export type ApiKeyView = Omit<ApiKeyRow, 'keyHash' | 'scopes'> & { scopes: Scope[] };

function view(row: ApiKeyRow): ApiKeyView {
  const { keyHash: _hash, scopes, ...rest } = row;
  return { ...rest, scopes: scopes.filter(isScope) };
}

export interface CreateKeyInput {
  accountId: number;
  name: string;
  scopes: readonly Scope[];
  rateLimitPerMinute?: number;
  expiresAt?: Date | null;
  now: Date;
  /** Register this exact key instead of generating one (bootstrap). Must match TOKEN_PATTERN. */
  token?: string;
  rotatedFromId?: number | null;
}

/** Creates a key; the returned `token` is the only time the secret is visible. */
export async function createKey(
  store: Store,
  serverSecret: Buffer,
  input: CreateKeyInput,
): Promise<{ key: ApiKeyView; token: string }> {
  const { apiKeys } = store.t;
  let token: string;
  let publicId: string;
  if (input.token !== undefined) {
    if (!TOKEN_PATTERN.test(input.token))
      throw new Error('a registered key must be 32–256 chars of [A-Za-z0-9_.-]');
    token = input.token;
    publicId = parseIssued(token)?.[1] ?? `boot${randomBase62(8)}`;
  } else {
    publicId = randomBase62(12);
    token = `ebk1.${publicId}.${randomBase62(32)}`;
  }
  const rate = input.rateLimitPerMinute ?? 60;
  if (!Number.isInteger(rate) || rate < 1 || rate > 100_000)
    throw new Error('rateLimitPerMinute must be 1–100000');
  const [row] = await store.db
    .insert(apiKeys)
    .values({
      publicId,
      accountId: input.accountId,
      name: input.name,
      keyHash: hashKey(serverSecret, token),
      scopes: [...new Set(input.scopes)],
      rateLimitPerMinute: rate,
      expiresAt: input.expiresAt ?? null,
      createdAt: input.now,
      rotatedFromId: input.rotatedFromId ?? null,
      prefix: displayPrefix(token, publicId),
    })
    .returning();
  return { key: view(row!), token };
}

export async function listKeys(store: Store, accountId: number): Promise<ApiKeyView[]> {
  const { apiKeys } = store.t;
  const rows = await store.db
    .select()
    .from(apiKeys)
    .where(eq(apiKeys.accountId, accountId))
    .orderBy(desc(apiKeys.id));
  return rows.map(view);
}

export async function getKey(store: Store, keyId: number): Promise<ApiKeyView | undefined> {
  const { apiKeys } = store.t;
  const [row] = await store.db.select().from(apiKeys).where(eq(apiKeys.id, keyId)).limit(1);
  return row ? view(row) : undefined;
}

/** True if a key with this exact token is registered (any state). */
export async function keyExists(store: Store, serverSecret: Buffer, token: string): Promise<boolean> {
  const { apiKeys } = store.t;
  const [row] = await store.db
    .select({ id: apiKeys.id })
    .from(apiKeys)
    .where(eq(apiKeys.keyHash, hashKey(serverSecret, token)))
    .limit(1);
  return row !== undefined;
}

/** Revokes a key at once: the next request with it gets 401 'revoked'. Idempotent. */
export async function revokeKey(store: Store, keyId: number, now: Date): Promise<ApiKeyView | undefined> {
  const { apiKeys } = store.t;
  const [row] = await store.db.select().from(apiKeys).where(eq(apiKeys.id, keyId)).limit(1);
  if (!row) return undefined;
  if (row.revokedAt) return view(row);
  const [revoked] = await store.db
    .update(apiKeys)
    .set({ revokedAt: now })
    .where(eq(apiKeys.id, keyId))
    .returning();
  return view(revoked!);
}

/**
 * Rotates a key: a new key with the same account, scopes and rate limit; the old one keeps
 * working until `now + overlapSeconds` (or its own earlier expiry), then answers 401 'expired'.
 */
export async function rotateKey(
  store: Store,
  serverSecret: Buffer,
  keyId: number,
  opts: { now: Date; overlapSeconds: number; name?: string },
): Promise<{ key: ApiKeyView; token: string; previous: ApiKeyView }> {
  if (!Number.isFinite(opts.overlapSeconds) || opts.overlapSeconds < 0 || opts.overlapSeconds > 30 * 86400) {
    throw new Error('overlapSeconds must be between 0 and 30 days');
  }
  return store.transaction(async (tx) => {
    const { apiKeys } = tx.t;
    const [old] = await tx.db.select().from(apiKeys).where(eq(apiKeys.id, keyId)).limit(1);
    if (!old) throw new Error(`API key ${keyId} does not exist`);
    if (old.revokedAt) throw new Error('a revoked key cannot be rotated');
    if (old.expiresAt && old.expiresAt <= opts.now) throw new Error('an expired key cannot be rotated');
    const windowEnd = new Date(opts.now.getTime() + opts.overlapSeconds * 1000);
    const newExpiry = old.expiresAt && old.expiresAt < windowEnd ? old.expiresAt : windowEnd;
    const [previous] = await tx.db
      .update(apiKeys)
      .set({ expiresAt: newExpiry })
      .where(eq(apiKeys.id, keyId))
      .returning();
    const created = await createKey(tx, serverSecret, {
      accountId: old.accountId,
      name: opts.name ?? old.name,
      scopes: old.scopes.filter(isScope),
      rateLimitPerMinute: old.rateLimitPerMinute,
      expiresAt: old.expiresAt,
      now: opts.now,
      rotatedFromId: old.id,
    });
    return { ...created, previous: view(previous!) };
  });
}

/** What a request authenticated by a key may do, and its account's metering settings. */
export interface AuthenticatedKey {
  id: number;
  accountId: number;
  publicId: string;
  scopes: Scope[];
  rateLimitPerMinute: number;
  account: { monthlyUnitQuota: number; retainRequestBodies: boolean };
}

export type AuthResult =
  | { ok: true; key: AuthenticatedKey }
  | { ok: false; reason: 'malformed' | 'unknown' }
  /** A key that exists but may no longer be used: its account is known (for the request log). */
  | { ok: false; reason: 'revoked' | 'expired' | 'rotated'; key: AuthenticatedKey };

interface KeyLookupRow {
  id: number;
  accountId: number;
  publicId: string;
  keyHash: string;
  scopes: string;
  rateLimitPerMinute: number;
  expiresAt: number | null;
  revokedAt: number | null;
  monthlyUnitQuota: number;
  retainRequestBodies: number;
}

/**
 * The by-hash lookup: one statement for the key and its account's metering settings, prepared
 * once per connection. Raw SQL rather than Drizzle's builder, which maps every column of the row
 * on each call. Whether an expired key has a rotation successor is asked only when it has expired.
 */
const lookups = new WeakMap<Sqlite, Statement<[string], KeyLookupRow>>();
function lookupFor(sqlite: Sqlite): Statement<[string], KeyLookupRow> {
  let stmt = lookups.get(sqlite);
  if (!stmt) {
    stmt = sqlite.prepare<[string], KeyLookupRow>(
      `SELECT k.id, k.account_id AS accountId, k.public_id AS publicId, k.key_hash AS keyHash, k.scopes,
         k.rate_limit_per_minute AS rateLimitPerMinute, k.expires_at AS expiresAt, k.revoked_at AS revokedAt,
         a.monthly_unit_quota AS monthlyUnitQuota, a.retain_request_bodies AS retainRequestBodies
       FROM api_keys k JOIN accounts a ON a.id = k.account_id WHERE k.key_hash = ?`,
    );
    lookups.set(sqlite, stmt);
  }
  return stmt;
}

/**
 * HMACs of recently presented tokens. The HMAC is a pure function of (server secret, token), so a
 * remembered one can never be stale. Bounded: cleared when full.
 */
const HASH_MEMO_LIMIT = 10_000;
const hashMemos = new WeakMap<Buffer, Map<string, string>>();
function memoHash(serverSecret: Buffer, token: string): string {
  let memo = hashMemos.get(serverSecret);
  if (!memo) {
    memo = new Map();
    hashMemos.set(serverSecret, memo);
  }
  let hash = memo.get(token);
  if (hash === undefined) {
    hash = hashKey(serverSecret, token);
    if (memo.size >= HASH_MEMO_LIMIT) memo.clear();
    memo.set(token, hash);
  }
  return hash;
}

/** A found key as the lookup row gave it, with its scopes parsed (shared, never mutated). */
interface KnownKey {
  key: Readonly<AuthenticatedKey>;
  expiresAt: number | null;
  revokedAt: number | null;
}

/**
 * Found keys by key hash, per SQLite connection (the portable path's memory, for PostgreSQL, is
 * {@link PortableKnownKeys} below), trusted only while `auth_revision.revision` is the one
 * they were read under. Triggers (migration drizzle/0003_auth_revision.sql) bump that revision in
 * the same transaction as any change to a key or account that authentication reads, whoever makes
 * it. Expiry and revocation times are still compared with the request's clock on every request.
 * Unknown tokens are never cached. Bounded: cleared when full.
 *
 * - Changes made through this connection (the console, this process's own writes) clear the
 *   cache from inside the writing statement: at start-up each of the migration's triggers gets a
 *   TEMP twin on this connection, with the same events and columns, that calls back into JS.
 * - Changes committed by another connection are seen through the revision, read at most once
 *   per turn of the event loop: every request that starts in a later turn than the commit sees
 *   it. (A request that is answered after a revocation was confirmed to its issuer always starts
 *   in a later turn.)
 *
 * - Other nodes (REDIS_URL): server/app.ts announces every local change ({@link onLocalAuthChange})
 *   on the shared state's channel, and drops this connection's keys ({@link forgetKnownKeys}) when
 *   another node announces one. The revision check above stays, with or without the message.
 *
 * So a request reads one row per turn instead of the key JOIN account lookup per request (each
 * read is a read transaction on the WAL, which showed in profiles of the metered route).
 */
const KNOWN_KEY_LIMIT = 10_000;
interface KnownKeys {
  revision: Statement<[], number>;
  seen: number;
  checkedThisTurn: boolean;
  byHash: Map<string, KnownKey>;
  /** Called after this connection changed something authentication reads (the shared-state hook). */
  onLocalChange: (() => void)[];
}
const knownKeys = new WeakMap<Sqlite, KnownKeys>();
const FORGET_FUNCTION = 'ebullio_forget_known_keys';

/** TEMP twins of the auth-revision triggers that call {@link FORGET_FUNCTION} instead. */
function installLocalForgetting(sqlite: Sqlite, forget: () => void): void {
  sqlite.function(FORGET_FUNCTION, { deterministic: false }, () => {
    forget();
    return null;
  });
  const triggers = sqlite
    .prepare<[], { name: string; sql: string }>(
      `SELECT name, sql FROM sqlite_master WHERE type = 'trigger' AND name LIKE '%auth_revision%'`,
    )
    .all();
  if (triggers.length === 0) throw new Error('auth_revision triggers missing: are the migrations applied?');
  for (const { name, sql } of triggers) {
    const twin = sql
      .replace(/^CREATE TRIGGER `[^`]+`/, `CREATE TEMP TRIGGER IF NOT EXISTS \`${name}_local\``)
      .replace(/ ON `(api_keys|accounts)`/, ' ON main.`$1`')
      .replace(/BEGIN[\s\S]*END$/, `BEGIN SELECT ${FORGET_FUNCTION}(); END`);
    // Each of the three rewrites must have taken, or the twin would not do its one job.
    if (
      !twin.includes('TEMP TRIGGER') ||
      !twin.includes(' ON main.') ||
      !twin.includes(`SELECT ${FORGET_FUNCTION}();`)
    ) {
      throw new Error(`cannot derive the local twin of trigger ${name}`);
    }
    sqlite.exec(twin);
  }
}

function knownKeysState(sqlite: Sqlite): KnownKeys {
  let known = knownKeys.get(sqlite);
  if (!known) {
    const revision = sqlite.prepare<[], number>('SELECT revision FROM auth_revision WHERE id = 1').pluck();
    const fresh: KnownKeys = {
      revision,
      seen: -1,
      checkedThisTurn: false,
      byHash: new Map(),
      onLocalChange: [],
    };
    installLocalForgetting(sqlite, () => {
      fresh.byHash.clear();
      fresh.checkedThisTurn = false;
      for (const listener of fresh.onLocalChange) listener();
    });
    known = fresh;
    knownKeys.set(sqlite, known);
  }
  return known;
}

function knownKeysFor(sqlite: Sqlite): Map<string, KnownKey> {
  const known = knownKeysState(sqlite);
  if (!known.checkedThisTurn) {
    const turn = known;
    turn.checkedThisTurn = true;
    nextTurn(() => {
      turn.checkedThisTurn = false;
    });
    const current = turn.revision.get() ?? -1;
    if (current !== turn.seen) {
      turn.byHash.clear();
      turn.seen = current;
    }
  }
  if (known.byHash.size >= KNOWN_KEY_LIMIT) known.byHash.clear();
  return known.byHash;
}

/**
 * Drops every key remembered for this store's connection (another node said authentication data
 * changed: the shared-state hook of server/app.ts). The next request looks its key up again.
 */
export function forgetKnownKeys(store: Store): void {
  if (store.sqlite) {
    const known = knownKeys.get(store.sqlite);
    if (!known) return;
    known.byHash.clear();
    known.checkedThisTurn = false;
    return;
  }
  const portable = portableKnownKeys.get(portableCacheKey(store));
  if (portable) portable.forget();
}

/**
 * Calls `listener` whenever a statement on this store's SQLite connection changes something
 * authentication reads (the same events as the auth_revision triggers), from inside that
 * statement: defer real work. On PostgreSQL it is never called: every node reads the shared
 * auth_revision row (bumped by the triggers of drizzle-pg/0001_auth_revision.sql), so a change needs
 * no announcement for the next request on any node to see it.
 */
export function onLocalAuthChange(store: Store, listener: () => void): void {
  if (store.sqlite) knownKeysState(store.sqlite).onLocalChange.push(listener);
}

/** How many keys are remembered for this store's connection (diagnostics and tests). */
export function knownKeyCount(store: Store): number {
  if (store.sqlite) return knownKeys.get(store.sqlite)?.byHash.size ?? 0;
  return portableKnownKeys.get(portableCacheKey(store))?.byHash.size ?? 0;
}

function knownKeyOf(row: KeyLookupRow): KnownKey {
  const key: AuthenticatedKey = {
    id: row.id,
    accountId: row.accountId,
    publicId: row.publicId,
    scopes: Object.freeze((JSON.parse(row.scopes) as string[]).filter(isScope)) as Scope[],
    rateLimitPerMinute: row.rateLimitPerMinute,
    account: Object.freeze({
      monthlyUnitQuota: row.monthlyUnitQuota,
      retainRequestBodies: row.retainRequestBodies === 1,
    }),
  };
  return { key: Object.freeze(key), expiresAt: row.expiresAt, revokedAt: row.revokedAt };
}

/** The lookup row as the portable query returns it on either dialect (see {@link portableLookup}). */
interface PortableKeyLookupRow {
  id: number | string;
  accountId: number | string;
  publicId: string;
  keyHash: string;
  /** JSON text (SQLite) or the parsed array (PostgreSQL's json column). */
  scopes: string | string[];
  rateLimitPerMinute: number | string;
  expiresAt: unknown;
  revokedAt: unknown;
  monthlyUnitQuota: number | string;
  retainRequestBodies: unknown;
}

function lookupRowOf(row: PortableKeyLookupRow): KeyLookupRow {
  return {
    id: Number(row.id),
    accountId: Number(row.accountId),
    publicId: row.publicId,
    keyHash: row.keyHash,
    scopes: typeof row.scopes === 'string' ? row.scopes : JSON.stringify(row.scopes),
    rateLimitPerMinute: Number(row.rateLimitPerMinute),
    expiresAt: row.expiresAt == null ? null : readInstant(row.expiresAt).getTime(),
    revokedAt: row.revokedAt == null ? null : readInstant(row.revokedAt).getTime(),
    monthlyUnitQuota: Number(row.monthlyUnitQuota),
    retainRequestBodies: row.retainRequestBodies ? 1 : 0,
  };
}

/**
 * Found keys of a store without a SQLite connection (PostgreSQL), trusted only while the shared
 * auth_revision row is the one they were read under. The revision is read at most once per turn of
 * the event loop (requests of one turn share the read), so every request that starts in a later
 * turn than a committed change, made on any node, sees it. A lookup that was under way while the
 * cache was cleared does not store its (possibly older) row: `generation` tells.
 */
interface PortableKnownKeys {
  seen: number;
  generation: number;
  revisionRead: Promise<void> | undefined;
  byHash: Map<string, KnownKey>;
  forget: () => void;
}
const portableKnownKeys = new WeakMap<object, PortableKnownKeys>();

/** One cache per connection pool (a transaction's store shares its pool's). */
function portableCacheKey(store: Store): object {
  return store.pool ?? store;
}

function portableKnownKeysState(store: Store): PortableKnownKeys {
  const cacheKey = portableCacheKey(store);
  let known = portableKnownKeys.get(cacheKey);
  if (!known) {
    const fresh: PortableKnownKeys = {
      seen: -1,
      generation: 0,
      revisionRead: undefined,
      byHash: new Map(),
      forget: () => {
        fresh.byHash.clear();
        fresh.generation += 1;
        fresh.revisionRead = undefined;
      },
    };
    known = fresh;
    portableKnownKeys.set(cacheKey, known);
  }
  return known;
}

async function portableKnownKeysFor(store: Store): Promise<PortableKnownKeys> {
  const known = portableKnownKeysState(store);
  if (known.revisionRead === undefined) {
    const read = (async () => {
      const [row] = await store.rows<{ revision: number | string }>(
        sql`SELECT revision FROM auth_revision WHERE id = 1`,
      );
      const current = row === undefined ? -1 : Number(row.revision);
      if (current !== known.seen) {
        known.byHash.clear();
        known.generation += 1;
        known.seen = current;
      }
    })();
    known.revisionRead = read;
    nextTurn(() => {
      if (known.revisionRead === read) known.revisionRead = undefined;
    });
    // A failed read is not shared with the requests of later turns.
    read.catch(() => {
      if (known.revisionRead === read) known.revisionRead = undefined;
    });
  }
  await known.revisionRead;
  if (known.byHash.size >= KNOWN_KEY_LIMIT) {
    known.byHash.clear();
    known.generation += 1;
  }
  return known;
}

/**
 * The key a presented token belongs to, if it is valid at `now`. The returned key object is
 * shared between requests (frozen): copy what you need.
 *
 * On SQLite this is {@link authenticateTokenOnSqlite} (prepared statements, no await); elsewhere
 * the same checks through the store's portable SQL, with the revision-row cache above.
 */
export async function authenticateToken(
  store: Store,
  serverSecret: Buffer,
  token: string,
  now: Date,
): Promise<AuthResult> {
  if (store.sqlite) return authenticateTokenOnSqlite(store.sqlite, serverSecret, token, now);
  if (!TOKEN_PATTERN.test(token)) return { ok: false, reason: 'malformed' };
  const computed = memoHash(serverSecret, token);
  const known = await portableKnownKeysFor(store);
  let found = known.byHash.get(computed);
  if (found === undefined) {
    const generation = known.generation;
    const [raw] = await store.rows<PortableKeyLookupRow>(sql`
      SELECT k.id, k.account_id AS "accountId", k.public_id AS "publicId", k.key_hash AS "keyHash", k.scopes,
        k.rate_limit_per_minute AS "rateLimitPerMinute", k.expires_at AS "expiresAt", k.revoked_at AS "revokedAt",
        a.monthly_unit_quota AS "monthlyUnitQuota", a.retain_request_bodies AS "retainRequestBodies"
      FROM api_keys k JOIN accounts a ON a.id = k.account_id WHERE k.key_hash = ${computed}`);
    if (!raw || !crypto.timingSafeEqual(Buffer.from(raw.keyHash, 'hex'), Buffer.from(computed, 'hex'))) {
      return { ok: false, reason: 'unknown' };
    }
    found = knownKeyOf(lookupRowOf(raw));
    // Cleared meanwhile (a newer revision, or another node's announcement): the row may be older.
    if (known.generation === generation && known.byHash.size < KNOWN_KEY_LIMIT)
      known.byHash.set(computed, found);
  }
  const at = now.getTime();
  if (found.revokedAt !== null && found.revokedAt <= at)
    return { ok: false, reason: 'revoked', key: found.key };
  if (found.expiresAt !== null && found.expiresAt <= at) {
    const successor = await store.rows(
      sql`SELECT 1 AS one FROM api_keys WHERE rotated_from_id = ${found.key.id} LIMIT 1`,
    );
    return { ok: false, reason: successor.length > 0 ? 'rotated' : 'expired', key: found.key };
  }
  return { ok: true, key: found.key };
}

/**
 * {@link authenticateToken} on a SQLite connection, synchronously: the hot path of every /v1
 * request, so it keeps its prepared statements and answers without a turn of the event loop.
 */
export function authenticateTokenOnSqlite(
  sqlite: Sqlite,
  serverSecret: Buffer,
  token: string,
  now: Date,
): AuthResult {
  if (!TOKEN_PATTERN.test(token)) return { ok: false, reason: 'malformed' };
  const computed = memoHash(serverSecret, token);
  const known = knownKeysFor(sqlite);
  let found = known.get(computed);
  if (found === undefined) {
    const row = lookupFor(sqlite).get(computed);
    if (!row || !crypto.timingSafeEqual(Buffer.from(row.keyHash, 'hex'), Buffer.from(computed, 'hex'))) {
      return { ok: false, reason: 'unknown' };
    }
    found = knownKeyOf(row);
    known.set(computed, found);
  }
  const at = now.getTime();
  if (found.revokedAt !== null && found.revokedAt <= at)
    return { ok: false, reason: 'revoked', key: found.key };
  if (found.expiresAt !== null && found.expiresAt <= at) {
    const successor = sqlite
      .prepare('SELECT 1 FROM api_keys WHERE rotated_from_id = ? LIMIT 1')
      .get(found.key.id);
    return { ok: false, reason: successor ? 'rotated' : 'expired', key: found.key };
  }
  return { ok: true, key: found.key };
}
