/**
 * Drizzle schema (PostgreSQL): the same tables, columns, indexes and foreign keys as
 * `server/db/schema.ts`, for `DATABASE_URL=postgres://…`. `tests/db/schema-parity.test.ts` keeps
 * the two from drifting: change both, then run `npm run db:generate` and `npm run db:generate:pg`.
 *
 * Type choices, and why:
 * - Times are `timestamp with time zone` in `mode: 'date'`: Drizzle hands the app `Date` objects,
 *   as `timestamp_ms` does on SQLite, and the column holds an absolute instant whatever the
 *   session's time zone. Its resolution is 1 µs, so the app's millisecond times round-trip
 *   exactly. (Raw SQL that compares times with epoch milliseconds must pass a `Date` or use
 *   `to_timestamp(ms / 1000.0)` instead.)
 * - Booleans are `boolean` (SQLite keeps 0/1 in an integer).
 * - JSON columns are `json`, not `jsonb`: `json` keeps the text exactly as written (key order,
 *   spacing), as SQLite's text does, so a stored liquor definition reads back as it was stored.
 * - Where SQLite has a rowid key, PostgreSQL has `generated always as identity`: ids come from the
 *   sequence only, so a hand-written id cannot put the sequence behind the table (a bulk copy
 *   from SQLite uses `OVERRIDING SYSTEM VALUE` and then `setval`). The two event tables that grow
 *   with every request (usage_events, request_log) get `bigint` ids, as SQLite's are 64-bit.
 * - The auth_revision table and its triggers are in the custom migration
 *   `drizzle-pg/0001_auth_revision.sql`, not here, as on SQLite.
 *
 * The PostgreSQL history starts at today's schema (`drizzle-pg/0000_init.sql`), so the later SQLite
 * migrations are already in it: 0004's plain rowid event keys are the identities above, 0006's
 * per-version liquor index is declared below, and 0005 repaired key prefixes in rows that a new
 * PostgreSQL database cannot hold (new keys are written with their display prefix).
 */
import { sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  index,
  integer,
  json,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
} from 'drizzle-orm/pg-core';
import { ROLES } from '../../shared/access.js';

/** An instant, read and written as a `Date`. */
const instant = (name: string) => timestamp(name, { withTimezone: true, mode: 'date' });
const createdAt = () =>
  instant('created_at')
    .notNull()
    .default(sql`now()`);
/** A key drawn from the table's own sequence (SQLite: INTEGER PRIMARY KEY). */
const identity = () => integer('id').primaryKey().generatedAlwaysAsIdentity();
const bigIdentity = () => bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity();

export const accounts = pgTable('accounts', {
  id: identity(),
  name: text('name').notNull(),
  plan: text('plan').notNull().default('starter'),
  monthlyUnitQuota: integer('monthly_unit_quota').notNull().default(10_000),
  billingEmail: text('billing_email'),
  /** When true the request log keeps (redacted, truncated) request and response bodies. */
  retainRequestBodies: boolean('retain_request_bodies').notNull().default(false),
  /** The payment provider's customer id, set when the first invoice is created. */
  paymentCustomerId: text('payment_customer_id'),
  createdAt: createdAt(),
});

export const users = pgTable('users', {
  id: identity(),
  email: text('email').notNull().unique(),
  /** `scrypt$N$r$p$<salt b64url>$<hash b64url>` (see server/accounts/passwords.ts). */
  passwordHash: text('password_hash').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  active: boolean('active').notNull().default(true),
  /** Display name shown in the console. */
  name: text('name'),
  /** Consecutive failed sign-ins since the last success (reset on success). */
  failedSignIns: integer('failed_sign_ins').notNull().default(0),
  /** Sign-in refused until this time after too many failures. */
  lockedUntil: instant('locked_until'),
  createdAt: createdAt(),
});

export const accountMembers = pgTable(
  'account_members',
  {
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.userId, t.accountId] })],
);

export const apiKeys = pgTable(
  'api_keys',
  {
    id: identity(),
    publicId: text('public_id').notNull().unique(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    /** HMAC-SHA256(server secret, full key) as lowercase hex. The key itself is never stored. */
    keyHash: text('key_hash').notNull().unique(),
    /** JSON array of scopes, e.g. ["steam","liquors"]. */
    scopes: json('scopes').$type<string[]>().notNull(),
    rateLimitPerMinute: integer('rate_limit_per_minute').notNull().default(60),
    expiresAt: instant('expires_at'),
    revokedAt: instant('revoked_at'),
    createdAt: createdAt(),
    lastUsedAt: instant('last_used_at'),
    rotatedFromId: integer('rotated_from_id'),
    /** The first characters of the key, safe to show in a console ("ebk1.AbC…"). */
    prefix: text('prefix').notNull(),
  },
  (t) => [index('api_keys_account_idx').on(t.accountId)],
);

export const usageEvents = pgTable(
  'usage_events',
  {
    id: bigIdentity(),
    at: instant('at').notNull(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    keyId: integer('key_id').references(() => apiKeys.id, { onDelete: 'set null' }),
    /** An OperationId, or 'unmatched' for an authenticated request that reached no operation. */
    operation: text('operation').notNull(),
    status: integer('status').notNull(),
    units: integer('units').notNull(),
    latencyMs: integer('latency_ms').notNull(),
    requestId: text('request_id').notNull(),
    engineVersion: text('engine_version').notNull(),
  },
  (t) => [index('usage_events_account_at_idx').on(t.accountId, t.at)],
);

export const usageDaily = pgTable(
  'usage_daily',
  {
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** UTC calendar day, 'YYYY-MM-DD'. */
    day: text('day').notNull(),
    operation: text('operation').notNull(),
    requests: integer('requests').notNull().default(0),
    units: integer('units').notNull().default(0),
    errors: integer('errors').notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.accountId, t.day, t.operation] })],
);

export const requestLog = pgTable(
  'request_log',
  {
    id: bigIdentity(),
    requestId: text('request_id').notNull(),
    at: instant('at').notNull(),
    accountId: integer('account_id').references(() => accounts.id, { onDelete: 'cascade' }),
    keyId: integer('key_id').references(() => apiKeys.id, { onDelete: 'set null' }),
    method: text('method').notNull(),
    path: text('path').notNull(),
    status: integer('status').notNull(),
    latencyMs: integer('latency_ms').notNull(),
    /** Redacted, truncated; null unless the account retains bodies. */
    requestBody: text('request_body'),
    responseBody: text('response_body'),
    engineVersion: text('engine_version').notNull(),
    /** The answer was a stored one, replayed for a repeated Idempotency-Key (0 units). */
    idempotentReplay: boolean('idempotent_replay').notNull().default(false),
  },
  (t) => [index('request_log_at_idx').on(t.at), index('request_log_account_at_idx').on(t.accountId, t.at)],
);

/** Idempotency-Key records of /v1 POSTs (see server/db/schema.ts). */
export const idempotencyRecords = pgTable(
  'idempotency_records',
  {
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    key: text('key').notNull(),
    fingerprint: text('fingerprint').notNull(),
    claim: text('claim').notNull(),
    createdAt: instant('created_at').notNull(),
    leaseUntil: instant('lease_until').notNull(),
    status: integer('status'),
    contentType: text('content_type'),
    body: text('body'),
  },
  (t) => [
    primaryKey({ columns: [t.accountId, t.key] }),
    index('idempotency_records_created_idx').on(t.createdAt),
  ],
);

export const storedLiquors = pgTable(
  'stored_liquors',
  {
    id: identity(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** kebab-case slug; with `version`, unique per account. */
    liquorId: text('liquor_id').notNull(),
    /** 1 when stored, +1 with each update (PUT); old versions are kept (see schema.ts). */
    version: integer('version').notNull().default(1),
    name: text('name').notNull(),
    definition: json('definition').$type<unknown>().notNull(),
    /** When this version was stored. */
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('stored_liquors_account_slug_version_idx').on(t.accountId, t.liquorId, t.version)],
);

// ---------------------------------------------------------------------------------------------
// Console: sessions, single-use tokens, audit log, mail, billing.

/** A console sign-in. The access JWT carries the session id, so revoking the row ends it at once. */
export const consoleSessions = pgTable(
  'console_sessions',
  {
    /** Random, url-safe; the JWT's `sid` claim. */
    id: text('id').primaryKey(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** SHA-256 of the current refresh token (rotated at every refresh). */
    refreshHash: text('refresh_hash').notNull(),
    createdAt: createdAt(),
    expiresAt: instant('expires_at').notNull(),
    refreshedAt: instant('refreshed_at'),
    revokedAt: instant('revoked_at'),
    ip: text('ip'),
    userAgent: text('user_agent'),
  },
  (t) => [index('console_sessions_user_idx').on(t.userId)],
);

/** Invitations and password resets: single-use, expiring, stored only as a hash. */
export const userTokens = pgTable('user_tokens', {
  id: identity(),
  purpose: text('purpose', { enum: ['invitation', 'password-reset'] }).notNull(),
  /** SHA-256 of the token sent by e-mail. */
  tokenHash: text('token_hash').notNull().unique(),
  email: text('email').notNull(),
  /** Set for password resets; for invitations, set when accepted. */
  userId: integer('user_id').references(() => users.id, { onDelete: 'cascade' }),
  /** Invitations: the role and accounts the new user gets. */
  role: text('role', { enum: ROLES }),
  accountIds: json('account_ids').$type<number[]>(),
  createdByUserId: integer('created_by_user_id').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  expiresAt: instant('expires_at').notNull(),
  usedAt: instant('used_at'),
});

/** Every admin action: who, what, when, from where. */
export const auditLog = pgTable(
  'audit_log',
  {
    id: identity(),
    at: instant('at').notNull(),
    actorUserId: integer('actor_user_id').references(() => users.id, { onDelete: 'set null' }),
    actorEmail: text('actor_email').notNull(),
    /** e.g. "key.create", "account.update", "user.invite". */
    action: text('action').notNull(),
    targetType: text('target_type'),
    targetId: text('target_id'),
    detail: json('detail').$type<Record<string, unknown>>(),
    ip: text('ip'),
  },
  (t) => [index('audit_log_at_idx').on(t.at)],
);

/** Every message the service sent (or failed to send). */
export const mailLog = pgTable(
  'mail_log',
  {
    id: identity(),
    at: instant('at').notNull(),
    kind: text('kind').notNull(),
    to: text('to').notNull(),
    subject: text('subject').notNull(),
    status: text('status', { enum: ['sent', 'failed'] }).notNull(),
    messageId: text('message_id'),
    error: text('error'),
  },
  (t) => [index('mail_log_at_idx').on(t.at)],
);

/** Messages received by the local SMTP capture server (development and tests only). */
export const capturedMail = pgTable('captured_mail', {
  id: identity(),
  receivedAt: instant('received_at').notNull(),
  from: text('from_address').notNull(),
  to: json('to_addresses').$type<string[]>().notNull(),
  subject: text('subject').notNull(),
  text: text('text_body'),
  html: text('html_body'),
  raw: text('raw').notNull(),
});

/** Quota notices already sent, so each threshold is mailed once per account per month. */
export const quotaNotices = pgTable(
  'quota_notices',
  {
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** 'YYYY-MM' (UTC). */
    month: text('month').notNull(),
    /** Percent of the quota: 80 or 100. */
    threshold: integer('threshold').notNull(),
    sentAt: instant('sent_at').notNull(),
  },
  (t) => [primaryKey({ columns: [t.accountId, t.month, t.threshold] })],
);

/** Price plans: accounts.plan names one. Money in the currency's minor unit (cents). */
export const plans = pgTable('plans', {
  name: text('name').primaryKey(),
  displayName: text('display_name').notNull(),
  includedUnits: integer('included_units').notNull(),
  monthlyFeeMinor: integer('monthly_fee_minor').notNull().default(0),
  pricePer1000UnitsMinor: integer('price_per_1000_units_minor').notNull(),
  currency: text('currency').notNull().default('eur'),
});

/** A month's statement for an account, from the usage roll-ups; finalized into a provider invoice. */
export const statements = pgTable(
  'statements',
  {
    id: identity(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** 'YYYY-MM' (UTC). */
    month: text('month').notNull(),
    planName: text('plan_name').notNull(),
    units: integer('units').notNull(),
    includedUnits: integer('included_units').notNull(),
    overageUnits: integer('overage_units').notNull(),
    amountMinor: integer('amount_minor').notNull(),
    currency: text('currency').notNull(),
    /** The plan's prices the amount was computed with (see schema.ts). */
    monthlyFeeMinor: integer('monthly_fee_minor'),
    pricePer1000UnitsMinor: integer('price_per_1000_units_minor'),
    status: text('status', { enum: ['draft', 'finalized', 'paid', 'void'] })
      .notNull()
      .default('draft'),
    providerInvoiceId: text('provider_invoice_id').unique(),
    finalizedAt: instant('finalized_at'),
    paidAt: instant('paid_at'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('statements_account_month_idx').on(t.accountId, t.month)],
);

/** Provider webhook events already processed (idempotency). */
export const paymentEvents = pgTable('payment_events', {
  /** The provider's event id. */
  id: text('id').primaryKey(),
  type: text('type').notNull(),
  receivedAt: instant('received_at').notNull(),
});

/** Long batches and sweeps run as jobs (see server/db/schema.ts). */
export const jobs = pgTable(
  'jobs',
  {
    id: text('id').primaryKey(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    keyId: integer('key_id').references(() => apiKeys.id, { onDelete: 'set null' }),
    operation: text('operation').notNull(),
    state: text('state').notNull(),
    input: text('input').notNull(),
    total: integer('total').notNull(),
    done: integer('done').notNull().default(0),
    units: integer('units').notNull().default(0),
    claim: text('claim'),
    leaseUntil: instant('lease_until'),
    problem: text('problem'),
    callbackUrl: text('callback_url'),
    callbackState: text('callback_state'),
    callbackAttempts: integer('callback_attempts').notNull().default(0),
    callbackOutcome: text('callback_outcome'),
    createdAt: instant('created_at').notNull(),
    startedAt: instant('started_at'),
    finishedAt: instant('finished_at'),
    expiresAt: instant('expires_at'),
  },
  (t) => [
    index('jobs_state_idx').on(t.state, t.createdAt),
    index('jobs_account_idx').on(t.accountId),
    index('jobs_expires_idx').on(t.expiresAt),
  ],
);

/** A job's committed chunks (see server/db/schema.ts). */
export const jobChunks = pgTable(
  'job_chunks',
  {
    jobId: text('job_id')
      .notNull()
      .references(() => jobs.id, { onDelete: 'cascade' }),
    start: integer('start').notNull(),
    rows: text('rows').notNull(),
  },
  (t) => [primaryKey({ columns: [t.jobId, t.start] })],
);

/** The key an account's job callbacks are signed with (see server/db/schema.ts). */
export const accountSigningSecrets = pgTable('account_signing_secrets', {
  accountId: integer('account_id')
    .primaryKey()
    .references(() => accounts.id, { onDelete: 'cascade' }),
  secret: text('secret').notNull(),
  createdAt: instant('created_at').notNull(),
});
