/**
 * Drizzle schema (SQLite). Times are stored as integer milliseconds since the Unix epoch
 * (`mode: 'timestamp_ms'` gives Date objects in TypeScript); calendar days as 'YYYY-MM-DD' (UTC).
 * Change it, then run `npx drizzle-kit generate` and commit the new file under drizzle/.
 */
import { sql } from 'drizzle-orm';
import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../../shared/access.js';

const createdAt = () =>
  integer('created_at', { mode: 'timestamp_ms' })
    .notNull()
    .default(sql`(unixepoch() * 1000)`);

export const accounts = sqliteTable('accounts', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull(),
  plan: text('plan').notNull().default('starter'),
  monthlyUnitQuota: integer('monthly_unit_quota').notNull().default(10_000),
  billingEmail: text('billing_email'),
  /** When true the request log keeps (redacted, truncated) request and response bodies. */
  retainRequestBodies: integer('retain_request_bodies', { mode: 'boolean' }).notNull().default(false),
  /** The payment provider's customer id, set when the first invoice is created. */
  paymentCustomerId: text('payment_customer_id'),
  createdAt: createdAt(),
});

export const users = sqliteTable('users', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  email: text('email').notNull().unique(),
  /** `scrypt$N$r$p$<salt b64url>$<hash b64url>` (see server/accounts/passwords.ts). */
  passwordHash: text('password_hash').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  active: integer('active', { mode: 'boolean' }).notNull().default(true),
  /** Display name shown in the console. */
  name: text('name'),
  /** Consecutive failed sign-ins since the last success (reset on success). */
  failedSignIns: integer('failed_sign_ins').notNull().default(0),
  /** Sign-in refused until this time after too many failures. */
  lockedUntil: integer('locked_until', { mode: 'timestamp_ms' }),
  createdAt: createdAt(),
});

export const accountMembers = sqliteTable(
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

export const apiKeys = sqliteTable(
  'api_keys',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    publicId: text('public_id').notNull().unique(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    /** HMAC-SHA256(server secret, full key) as lowercase hex. The key itself is never stored. */
    keyHash: text('key_hash').notNull().unique(),
    /** JSON array of scopes, e.g. ["steam","liquors"]. */
    scopes: text('scopes', { mode: 'json' }).$type<string[]>().notNull(),
    rateLimitPerMinute: integer('rate_limit_per_minute').notNull().default(60),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }),
    revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
    createdAt: createdAt(),
    lastUsedAt: integer('last_used_at', { mode: 'timestamp_ms' }),
    rotatedFromId: integer('rotated_from_id'),
    /** The first characters of the key, safe to show in a console ("ebk1.AbC…"). */
    prefix: text('prefix').notNull(),
  },
  (t) => [index('api_keys_account_idx').on(t.accountId)],
);

export const usageEvents = sqliteTable(
  'usage_events',
  {
    // A plain rowid key, not AUTOINCREMENT: SQLite's documentation ("SQLite Autoincrement") says
    // AUTOINCREMENT "imposes extra CPU, memory, disk space, and disk I/O overhead and should be
    // avoided if not strictly needed" (an sqlite_sequence update with every insert). Ids still
    // grow with each insert; one could be reused only after the newest row was deleted.
    id: integer('id').primaryKey(),
    at: integer('at', { mode: 'timestamp_ms' }).notNull(),
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

export const usageDaily = sqliteTable(
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

export const requestLog = sqliteTable(
  'request_log',
  {
    id: integer('id').primaryKey(), // plain rowid key, as usage_events
    requestId: text('request_id').notNull(),
    at: integer('at', { mode: 'timestamp_ms' }).notNull(),
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
    idempotentReplay: integer('idempotent_replay', { mode: 'boolean' }).notNull().default(false),
  },
  (t) => [index('request_log_at_idx').on(t.at), index('request_log_account_at_idx').on(t.accountId, t.at)],
);

/**
 * Idempotency-Key records of /v1 POSTs (server/http/middleware/idempotency.ts), per account and
 * key: claimed "in flight" by the first request (`status` null, `claim` its token, held until
 * `lease_until`), then holding the stored answer for 24 h from `created_at`.
 */
export const idempotencyRecords = sqliteTable(
  'idempotency_records',
  {
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    key: text('key').notNull(),
    /** SHA-256 (hex) of method, path, content type and canonical body. */
    fingerprint: text('fingerprint').notNull(),
    /** The claiming request's token: only it may store its answer or give the key back. */
    claim: text('claim').notNull(),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull(),
    leaseUntil: integer('lease_until', { mode: 'timestamp_ms' }).notNull(),
    status: integer('status'),
    contentType: text('content_type'),
    body: text('body'),
  },
  (t) => [
    primaryKey({ columns: [t.accountId, t.key] }),
    index('idempotency_records_created_idx').on(t.createdAt),
  ],
);

export const storedLiquors = sqliteTable(
  'stored_liquors',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** kebab-case slug; with `version`, unique per account. */
    liquorId: text('liquor_id').notNull(),
    /**
     * 1 when stored, +1 with each update (PUT): an update adds a row and keeps the old ones, so a
     * logged result that names its liquor's id and version can be traced to the definition used.
     */
    version: integer('version').notNull().default(1),
    name: text('name').notNull(),
    definition: text('definition', { mode: 'json' }).$type<unknown>().notNull(),
    /** When this version was stored. */
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('stored_liquors_account_slug_version_idx').on(t.accountId, t.liquorId, t.version)],
);

// ---------------------------------------------------------------------------------------------
// Console: sessions, single-use tokens, audit log, mail, billing.

/** A console sign-in. The access JWT carries the session id, so revoking the row ends it at once. */
export const consoleSessions = sqliteTable(
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
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    refreshedAt: integer('refreshed_at', { mode: 'timestamp_ms' }),
    revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
    ip: text('ip'),
    userAgent: text('user_agent'),
  },
  (t) => [index('console_sessions_user_idx').on(t.userId)],
);

/** Invitations and password resets: single-use, expiring, stored only as a hash. */
export const userTokens = sqliteTable('user_tokens', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  purpose: text('purpose', { enum: ['invitation', 'password-reset'] }).notNull(),
  /** SHA-256 of the token sent by e-mail. */
  tokenHash: text('token_hash').notNull().unique(),
  email: text('email').notNull(),
  /** Set for password resets; for invitations, set when accepted. */
  userId: integer('user_id').references(() => users.id, { onDelete: 'cascade' }),
  /** Invitations: the role and accounts the new user gets. */
  role: text('role', { enum: ROLES }),
  accountIds: text('account_ids', { mode: 'json' }).$type<number[]>(),
  createdByUserId: integer('created_by_user_id').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
});

/** Every admin action: who, what, when, from where. */
export const auditLog = sqliteTable(
  'audit_log',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    at: integer('at', { mode: 'timestamp_ms' }).notNull(),
    actorUserId: integer('actor_user_id').references(() => users.id, { onDelete: 'set null' }),
    actorEmail: text('actor_email').notNull(),
    /** e.g. "key.create", "account.update", "user.invite". */
    action: text('action').notNull(),
    targetType: text('target_type'),
    targetId: text('target_id'),
    detail: text('detail', { mode: 'json' }).$type<Record<string, unknown>>(),
    ip: text('ip'),
  },
  (t) => [index('audit_log_at_idx').on(t.at)],
);

/** Every message the service sent (or failed to send). */
export const mailLog = sqliteTable(
  'mail_log',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    at: integer('at', { mode: 'timestamp_ms' }).notNull(),
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
export const capturedMail = sqliteTable('captured_mail', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  receivedAt: integer('received_at', { mode: 'timestamp_ms' }).notNull(),
  from: text('from_address').notNull(),
  to: text('to_addresses', { mode: 'json' }).$type<string[]>().notNull(),
  subject: text('subject').notNull(),
  text: text('text_body'),
  html: text('html_body'),
  raw: text('raw').notNull(),
});

/** Quota notices already sent, so each threshold is mailed once per account per month. */
export const quotaNotices = sqliteTable(
  'quota_notices',
  {
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** 'YYYY-MM' (UTC). */
    month: text('month').notNull(),
    /** Percent of the quota: 80 or 100. */
    threshold: integer('threshold').notNull(),
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.accountId, t.month, t.threshold] })],
);

/** Price plans: accounts.plan names one. Money in the currency's minor unit (cents). */
export const plans = sqliteTable('plans', {
  name: text('name').primaryKey(),
  displayName: text('display_name').notNull(),
  includedUnits: integer('included_units').notNull(),
  monthlyFeeMinor: integer('monthly_fee_minor').notNull().default(0),
  pricePer1000UnitsMinor: integer('price_per_1000_units_minor').notNull(),
  currency: text('currency').notNull().default('eur'),
});

/** A month's statement for an account, from the usage roll-ups; finalized into a provider invoice. */
export const statements = sqliteTable(
  'statements',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
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
    /**
     * The plan's prices the amount was computed with, kept so a finalized statement shows the
     * same line items after the plan is repriced (null on statements made before they were kept).
     */
    monthlyFeeMinor: integer('monthly_fee_minor'),
    pricePer1000UnitsMinor: integer('price_per_1000_units_minor'),
    status: text('status', { enum: ['draft', 'finalized', 'paid', 'void'] })
      .notNull()
      .default('draft'),
    providerInvoiceId: text('provider_invoice_id').unique(),
    finalizedAt: integer('finalized_at', { mode: 'timestamp_ms' }),
    paidAt: integer('paid_at', { mode: 'timestamp_ms' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('statements_account_month_idx').on(t.accountId, t.month)],
);

/** Provider webhook events already processed (idempotency). */
export const paymentEvents = sqliteTable('payment_events', {
  /** The provider's event id. */
  id: text('id').primaryKey(),
  type: text('type').notNull(),
  receivedAt: integer('received_at', { mode: 'timestamp_ms' }).notNull(),
});

/**
 * Long batches and sweeps run as jobs (server/http/jobs/): the validated request (`input`, JSON
 * text), its state, progress (`done` of `total` points, committed chunk by chunk), the units its
 * committed points charged, the claim of the node running it (`claim`, held until `lease_until`,
 * renewed by its heartbeat and by each chunk's commit), the problem of a failed job, the callback
 * and its delivery, and when its results expire (they are pruned then).
 */
export const jobs = sqliteTable(
  'jobs',
  {
    id: text('id').primaryKey(),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    keyId: integer('key_id').references(() => apiKeys.id, { onDelete: 'set null' }),
    /** 'batch' or 'sweep'. */
    operation: text('operation').notNull(),
    /** queued, running, succeeded, failed, cancelled. */
    state: text('state').notNull(),
    input: text('input').notNull(),
    total: integer('total').notNull(),
    done: integer('done').notNull().default(0),
    units: integer('units').notNull().default(0),
    claim: text('claim'),
    leaseUntil: integer('lease_until', { mode: 'timestamp_ms' }),
    problem: text('problem'),
    callbackUrl: text('callback_url'),
    /** pending, delivered or failed; null without a callback. */
    callbackState: text('callback_state'),
    callbackAttempts: integer('callback_attempts').notNull().default(0),
    /** The last attempt's outcome in words (status or error). */
    callbackOutcome: text('callback_outcome'),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull(),
    startedAt: integer('started_at', { mode: 'timestamp_ms' }),
    finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }),
  },
  (t) => [
    index('jobs_state_idx').on(t.state, t.createdAt),
    index('jobs_account_idx').on(t.accountId),
    index('jobs_expires_idx').on(t.expiresAt),
  ],
);

/** A job's committed chunks: the rows of points `start`… in the answer's own row format (JSON text). */
export const jobChunks = sqliteTable(
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

/**
 * The key an account's job callbacks are signed with (HMAC-SHA256), created or rotated in the
 * console and shown once. Kept encrypted (AES-256-GCM under a key derived from the server secret),
 * since it must be read back to sign.
 */
export const accountSigningSecrets = sqliteTable('account_signing_secrets', {
  accountId: integer('account_id')
    .primaryKey()
    .references(() => accounts.id, { onDelete: 'cascade' }),
  secret: text('secret').notNull(),
  createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull(),
});
