/**
 * Start-up seeding and the bootstrap variables (idempotent; safe on every start):
 * - an empty database gets the demo scenario (demo.ts);
 * - BOOTSTRAP_API_KEY is registered with all scopes on the demo account if no key has that hash;
 * - BOOTSTRAP_ADMIN_EMAIL / _PASSWORD become an admin user if no user has that e-mail (an existing
 *   user's password is never overwritten).
 */
import { eq } from 'drizzle-orm';
import type { Config } from '../config.js';
import type { Db, Sqlite } from '../db/client.js';
import { sqliteStore } from '../db/store.js';
import { accounts } from '../db/schema.js';
import { addMember, createAccount, createUser, findUserByEmail } from '../accounts/accounts.js';
import { createKey, keyExists } from '../accounts/keys.js';
import { scopes } from '../accounts/operations.js';
import { DEMO_ACCOUNT_NAME, isDatabaseEmpty, seedDemo, type DemoCredentials } from './demo.js';

export interface BootstrapReport {
  seeded: boolean;
  /** Set when this start seeded the demo scenario: shown once by start-up, outside production. */
  demoCredentials?: DemoCredentials;
  apiKeyRegistered: boolean;
  adminCreated: boolean;
}

export async function bootstrap(
  db: Db,
  sqlite: Sqlite,
  config: Config,
  now: Date,
  engineVersion: string,
): Promise<BootstrapReport> {
  const report: BootstrapReport = { seeded: false, apiKeyRegistered: false, adminCreated: false };
  // The demo seed goes through the store; bootstrap itself still takes the SQLite connection.
  const store = sqliteStore(sqlite, db);
  if (await isDatabaseEmpty(store)) {
    report.demoCredentials = await seedDemo(store, config.secret, now, engineVersion);
    report.seeded = true;
  }
  const demoAccountId = () =>
    db.select({ id: accounts.id }).from(accounts).where(eq(accounts.name, DEMO_ACCOUNT_NAME)).get()?.id ??
    createAccount(db, { name: DEMO_ACCOUNT_NAME, plan: 'professional', monthlyUnitQuota: 50_000, now }).id;

  if (config.bootstrapApiKey !== undefined && !keyExists(db, config.secret, config.bootstrapApiKey)) {
    createKey(db, config.secret, {
      accountId: demoAccountId(),
      name: 'Bootstrap key (BOOTSTRAP_API_KEY)',
      scopes,
      rateLimitPerMinute: 600,
      now,
      token: config.bootstrapApiKey,
    });
    report.apiKeyRegistered = true;
  }
  if (
    config.bootstrapAdminEmail !== undefined &&
    config.bootstrapAdminPassword !== undefined &&
    !findUserByEmail(db, config.bootstrapAdminEmail)
  ) {
    const user = await createUser(db, {
      email: config.bootstrapAdminEmail,
      password: config.bootstrapAdminPassword,
      role: 'admin',
      now,
    });
    addMember(db, user.id, demoAccountId());
    report.adminCreated = true;
  }
  return report;
}
