/**
 * Drizzle schema (SQLite). Times are stored as integer milliseconds since the Unix epoch
 * (`mode: 'timestamp_ms'` gives Date objects in TypeScript); calendar days as 'YYYY-MM-DD' (UTC).
 * Change it, then run `npx drizzle-kit generate` and commit the new file under drizzle/.
 */
import { sql } from 'drizzle-orm';
import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';

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
  createdAt: createdAt(),
});

export const users = sqliteTable('users', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  email: text('email').notNull().unique(),
  /** `scrypt$N$r$p$<salt b64url>$<hash b64url>` (see server/accounts/passwords.ts). */
  passwordHash: text('password_hash').notNull(),
  role: text('role', { enum: ['admin', 'billing', 'developer'] }).notNull(),
  active: integer('active', { mode: 'boolean' }).notNull().default(true),
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
    /** The first characters of the key, safe to show in a console ("ebl_live_AbC…"). */
    prefix: text('prefix').notNull(),
  },
  (t) => [index('api_keys_account_idx').on(t.accountId)],
);

export const usageEvents = sqliteTable(
  'usage_events',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
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
    id: integer('id').primaryKey({ autoIncrement: true }),
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
  },
  (t) => [index('request_log_at_idx').on(t.at), index('request_log_account_at_idx').on(t.accountId, t.at)],
);

export const storedLiquors = sqliteTable(
  'stored_liquors',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    accountId: integer('account_id')
      .notNull()
      .references(() => accounts.id, { onDelete: 'cascade' }),
    /** kebab-case slug, unique per account. */
    liquorId: text('liquor_id').notNull(),
    name: text('name').notNull(),
    definition: text('definition', { mode: 'json' }).$type<unknown>().notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('stored_liquors_account_slug_idx').on(t.accountId, t.liquorId)],
);
