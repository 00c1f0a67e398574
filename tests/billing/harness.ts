// Test harness for billing: a temp (in-memory) database with migrations and the default plans, an
// injectable clock, the app listening on a loopback port (so the fake provider can deliver
// webhooks to it), the local fake of the payment provider driven through the official SDK, and
// one signed-in agent per role through the real console pipeline (sign-in cookie, CSRF double submit).
import type http from 'node:http';
import type { AddressInfo } from 'node:net';
import { createAccount } from '../../server/accounts/accounts.js';
import { recordRequest } from '../../server/accounts/metering.js';
import { ensureDefaultPlans } from '../../server/billing/plans.js';
import { billingRouteModule } from '../../server/console/billing.js';
import { consoleRouteModules } from '../../server/console/index.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { createApp, type AppDeps } from '../../server/app.js';
import { configurePayments } from '../../server/integrations/payments/client.js';
import {
  startFakePaymentProvider,
  type FakePaymentProvider,
} from '../../server/integrations/payments/fake-provider.js';
import { defaultMailCapture } from '../../server/mail/send.js';
import { csrfAgent, signInOnePerRole, type ConsoleAgent } from '../console-api/console-agents.js';
import { testConfig } from '../http/helpers.js';

if (!consoleRouteModules.includes(billingRouteModule)) consoleRouteModules.push(billingRouteModule);

export const PASSWORD = 'correct-horse-battery-42';
export const API_KEY = 'sk_test_billing_harness_key';
export const WEBHOOK_SECRET = 'whsec_billing_harness_secret';

export type SignedIn = ConsoleAgent;

export interface BillingHarness {
  deps: AppDeps;
  clock: { now: Date };
  app: ReturnType<typeof createApp>;
  baseUrl: string;
  fake: FakePaymentProvider;
  /** Professional plan, billing e-mail set. */
  alphaId: number;
  /** Starter plan (no fee), no billing e-mail. */
  betaId: number;
  admin: SignedIn;
  billing: SignedIn;
  developer: SignedIn;
  anonymous: SignedIn;
  close(): Promise<void>;
}

export async function makeBillingHarness(
  opts: { autoPay?: boolean; now?: string } = {},
): Promise<BillingHarness> {
  const { sqlite, db } = openDatabase(':memory:');
  const store = sqliteStore(sqlite, db);
  runMigrations(db);
  await ensureDefaultPlans(store);
  // 3 April 2031: March is complete.
  const clock = { now: new Date(opts.now ?? '2031-04-03T09:00:00Z') };
  const deps: AppDeps = {
    store,
    config: testConfig({ consoleSignInLimit: 1000 }),
    clock: () => clock.now,
    engineVersion: 'test-engine',
  };
  const alpha = await createAccount(store, {
    name: 'Invented Alpha Evaporation Works',
    plan: 'professional',
    monthlyUnitQuota: 200_000,
    billingEmail: 'accounts@alpha.invalid',
    now: new Date('2031-01-01T00:00:00Z'),
  });
  const beta = await createAccount(store, {
    name: 'Invented Beta Brine Co',
    plan: 'starter',
    monthlyUnitQuota: 20_000,
    now: new Date('2031-01-01T00:00:00Z'),
  });
  const app = createApp(deps);
  const server = await new Promise<http.Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const fake = await startFakePaymentProvider({
    webhookUrl: `${baseUrl}/webhooks/payments`,
    webhookSecret: WEBHOOK_SECRET,
    apiKey: API_KEY,
    autoPayAfterFinalize: opts.autoPay ?? false,
    clock: () => clock.now,
  });
  configurePayments(deps, {
    enabled: true,
    apiKey: API_KEY,
    apiBase: new URL(fake.url),
    webhookSecret: WEBHOOK_SECRET,
  });
  const signedIn = await signInOnePerRole(store, app, {
    password: PASSWORD,
    developerAccountId: alpha.id,
    now: clock.now,
  });
  return {
    deps,
    clock,
    app,
    baseUrl,
    fake,
    alphaId: alpha.id,
    betaId: beta.id,
    ...signedIn,
    anonymous: await csrfAgent(app),
    async close() {
      await fake.close();
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      await (await defaultMailCapture(deps)).close();
      sqlite.close();
    },
  };
}

let seq = 0;
/** Writes metered usage exactly as the v1 metering hook does (one request of `units` at `at`). */
export async function meter(h: BillingHarness, accountId: number, units: number, at: string): Promise<void> {
  seq++;
  await recordRequest(h.deps.store, {
    at: new Date(at),
    accountId,
    keyId: null as unknown as number,
    operation: 'evaporators.single-effect',
    status: 200,
    units,
    latencyMs: 5,
    requestId: `billing-req-${seq}`,
    engineVersion: 'test-engine',
    method: 'POST',
    path: '/v1/evaporators/single-effect',
    requestBody: null,
    responseBody: null,
  });
}

/** The mail log in order, read through the store. */
export async function mailRows(
  h: BillingHarness,
): Promise<{ kind: string; to: string; subject: string; status: string }[]> {
  const { mailLog } = h.deps.store.t;
  return h.deps.store.db
    .select({ kind: mailLog.kind, to: mailLog.to, subject: mailLog.subject, status: mailLog.status })
    .from(mailLog)
    .orderBy(mailLog.id);
}
