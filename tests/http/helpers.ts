// Test harness for the HTTP core: an in-memory database with migrations applied, an injectable
// clock, and a test-only route module that spends units (so quota tests need no calculation route).
import type express from 'express';
import { sql } from 'drizzle-orm';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey } from '../../server/accounts/keys.js';
import type { Scope } from '../../server/accounts/operations.js';
import type { Config } from '../../server/config.js';
import type { Store } from '../../server/db/store.js';
import { openTestStore } from '../support/test-store.js';
import { createApp, type AppDeps } from '../../server/app.js';
import { chargeUnits, requireOperation } from '../../server/http/middleware/operation.js';
import { v1RouteModules } from '../../server/http/v1/index.js';
import type { V1RouteModule } from '../../server/http/v1/module.js';
import type { EnginePool } from '../../server/workers/engine-pool.js';

export const ALL_SCOPES: Scope[] = ['steam', 'liquors', 'evaporators', 'batch', 'usage'];

/** POST /v1/__test/charge?extra=N: guarded as evaporators.multiple-effect (5 units) + N extra units. */
const testModule: V1RouteModule = {
  register(router) {
    router.post('/__test/charge', requireOperation('evaporators.multiple-effect'), (req, res) => {
      chargeUnits(res, Number(req.query.extra ?? 0));
      res.json({ ok: true, echo: req.body as unknown });
    });
  },
};
if (!v1RouteModules.includes(testModule)) v1RouteModules.push(testModule);

export interface Harness {
  app: express.Express;
  store: Store;
  config: Config;
  deps: AppDeps;
  /** Current time of the injectable clock; change `clock.now` to move time. */
  clock: { now: Date };
  accountId: number;
  token: string;
  keyId: number;
}

export function testConfig(overrides: Partial<Config> = {}): Config {
  return {
    port: 0,
    dbFile: ':memory:',
    dataDir: '/nonexistent',
    secret: Buffer.from('test-secret-test-secret-test-secret-0123'),
    secretSource: 'env',
    requestLogRetentionDays: 30,
    bodyLimitBytes: 16 * 1024,
    logBodyLimitBytes: 8 * 1024,
    bootstrapApiKey: undefined,
    bootstrapAdminEmail: undefined,
    bootstrapAdminPassword: undefined,
    ...overrides,
  };
}

export async function makeHarness(
  opts: {
    scopes?: Scope[];
    quota?: number;
    rateLimit?: number;
    retain?: boolean;
    config?: Partial<Config>;
    /** The calculation pool (default: one made by createApp from the config). */
    enginePool?: EnginePool;
  } = {},
): Promise<Harness> {
  const store = await openTestStore();
  const config = testConfig(opts.config);
  const clock = { now: new Date('2031-03-14T10:00:00Z') };
  const deps: AppDeps = {
    store,
    config,
    clock: () => clock.now,
    engineVersion: 'test-engine',
    ...(opts.enginePool ? { enginePool: opts.enginePool } : {}),
  };
  const account = await createAccount(store, {
    name: 'Invented Test Works',
    monthlyUnitQuota: opts.quota ?? 1000,
    retainRequestBodies: opts.retain ?? false,
    now: clock.now,
  });
  const { key, token } = await createKey(store, config.secret, {
    accountId: account.id,
    name: 'test key',
    scopes: opts.scopes ?? ALL_SCOPES,
    rateLimitPerMinute: opts.rateLimit ?? 1000,
    now: clock.now,
  });
  return {
    app: createApp(deps),
    store,
    config,
    deps,
    clock,
    accountId: account.id,
    token,
    keyId: key.id,
  };
}

export interface UsageEventRow {
  operation: string;
  status: number;
  units: number;
  request_id: string;
}

/** Every usage event in the order it was written, read through the store (any dialect). */
export async function usageRows(store: Store): Promise<UsageEventRow[]> {
  const rows = await store.rows<UsageEventRow>(
    sql`SELECT operation, status, units, request_id FROM usage_events ORDER BY id`,
  );
  return rows.map((r) => ({ ...r, status: Number(r.status), units: Number(r.units) }));
}
