// Test harness for the console data routes: a temp (in-memory) database with migrations, an
// injectable clock, seeded plans, two invented accounts and one signed-in agent per role that goes
// through the real console pipeline (session cookie from POST /auth/sign-in, CSRF double submit).
import { createAccount } from '../../server/accounts/accounts.js';
import { recordRequest, type RequestRecord } from '../../server/accounts/metering.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { plans } from '../../server/db/schema.js';
import { createApp, type AppDeps } from '../../server/app.js';
import { consoleRouteModules } from '../../server/console/index.js';
import { accountRoutes } from '../../server/console/accounts.js';
import { keyRoutes } from '../../server/console/keys.js';
import { liquorRoutes } from '../../server/console/liquors.js';
import { overviewRoutes } from '../../server/console/overview.js';
import { requestLogRoutes } from '../../server/console/request-log.js';
import { usageRoutes } from '../../server/console/usage.js';
import { defaultMailCapture } from '../../server/mail/send.js';
import { testConfig } from '../http/helpers.js';
import { signInOnePerRole, type ConsoleAgent } from './console-agents.js';

for (const m of [overviewRoutes, accountRoutes, keyRoutes, requestLogRoutes, usageRoutes, liquorRoutes]) {
  if (!consoleRouteModules.includes(m)) consoleRouteModules.push(m);
}

export const PASSWORD = 'correct-horse-battery-42';

export interface SignedIn extends ConsoleAgent {
  userId: number;
}

export interface ConsoleHarness {
  deps: AppDeps;
  clock: { now: Date };
  app: ReturnType<typeof createApp>;
  /** "Invented Alpha Works" (developer is a member) and "Invented Beta Mills" (not). */
  alphaId: number;
  betaId: number;
  admin: SignedIn;
  billing: SignedIn;
  developer: SignedIn;
  close(): Promise<void>;
}

export async function makeConsoleHarness(): Promise<ConsoleHarness> {
  const { sqlite, db } = openDatabase(':memory:');
  const store = sqliteStore(sqlite, db);
  runMigrations(db);
  const clock = { now: new Date('2031-03-14T10:00:00Z') };
  const deps: AppDeps = {
    store,
    config: testConfig({ consoleSignInLimit: 1000 }),
    clock: () => clock.now,
    engineVersion: 'test-engine',
  };
  db.insert(plans)
    .values([
      { name: 'starter', displayName: 'Starter', includedUnits: 10_000, pricePer1000UnitsMinor: 200 },
      { name: 'works', displayName: 'Works', includedUnits: 200_000, pricePer1000UnitsMinor: 120 },
    ])
    .run();
  const alpha = await createAccount(store, {
    name: 'Invented Alpha Works',
    monthlyUnitQuota: 1000,
    billingEmail: 'ops@alpha.invalid',
    now: clock.now,
  });
  const beta = await createAccount(store, {
    name: 'Invented Beta Mills',
    monthlyUnitQuota: 500,
    now: clock.now,
  });
  const app = createApp(deps);
  const signedIn = await signInOnePerRole(store, app, {
    password: PASSWORD,
    developerAccountId: alpha.id,
    now: clock.now,
  });
  return {
    deps,
    clock,
    app,
    alphaId: alpha.id,
    betaId: beta.id,
    ...signedIn,
    async close() {
      await (await defaultMailCapture(deps)).close();
      sqlite.close();
    },
  };
}

let seq = 0;
/** Writes one metered request exactly as the v1 metering hook does (server/accounts/metering.ts). */
export async function meter(
  h: ConsoleHarness,
  r: Partial<RequestRecord> & { accountId: number; keyId: number },
): Promise<void> {
  seq++;
  await recordRequest(h.deps.store, {
    at: h.clock.now,
    operation: 'steam.state',
    status: 200,
    units: 1,
    latencyMs: 10,
    requestId: `req-${seq}`,
    engineVersion: 'test-engine',
    method: 'POST',
    path: '/v1/steam/state',
    requestBody: null,
    responseBody: null,
    ...r,
  });
}
