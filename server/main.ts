/**
 * Start-up: config → database (WAL, migrations) → seed/bootstrap → development services → listen;
 * request-log pruning at start and hourly; quota-notice sweep at start and every 10 minutes;
 * a draining shutdown on SIGTERM/SIGINT (see `shutdown` below: refuse new connections, answer
 * what arrives on open ones with `Connection: close` for SHUTDOWN_GRACE_MS, then close the idle
 * ones, let in-flight requests finish for up to SHUTDOWN_TIMEOUT_MS more, stop the development
 * services, the calculation pool's threads and the Redis connections of the shared state (REDIS_URL),
 * close the database, exit 0).
 *
 *   PORT=8080 DB_FILE=./data/ebullio.db BOOTSTRAP_API_KEY=… node --import tsx server/main.ts
 *
 * Development services (never with NODE_ENV=production):
 *
 * | variable | default | meaning |
 * |---|---|---|
 * | MAIL_CAPTURE | 1 when SMTP_URL is unset | "0": not started here (server/mail/send.ts then starts one on a random port at the first mail) |
 * | MAIL_CAPTURE_PORT | 0 (any free port) | loopback port of the capture server; SMTP_URL is pointed at it |
 * | FAKE_PAYMENTS | 1 when PAYMENTS_API_BASE is a loopback http URL (the default) | "0": do not start the local fake of the payment provider |
 * | DEMO_CONSOLE_USERS | 0 | "1": create the demo billing and developer users of server/accounts/demo-users.ts (documented shared password: never on a reachable host) |
 * | FAKE_PAYMENTS_AUTOPAY | 0 | "1": the fake pays every invoice right after it is finalized and sends the signed invoice.paid webhook |
 *
 * The fake provider listens on the port of PAYMENTS_API_BASE (by default port 0: any free port, see
 * server/integrations/payments/config.ts); the payments client is pointed at the port it was given,
 * as SMTP_URL is at the mail capture's, and the fake delivers its webhooks to this server's
 * /webhooks/payments.
 */
import fs from 'node:fs';
import path from 'node:path';
import net, { type AddressInfo } from 'node:net';
import { sql } from 'drizzle-orm';
import { pruneRequestLog } from './accounts/request-log.js';
import { pruneIdempotencyRecords } from './http/middleware/idempotency.js';
import { ensureDefaultPlans } from './billing/plans.js';
import { checkQuotaNotices } from './billing/quota-notices.js';
import { ConfigError, engineSettings, loadConfig, serverSettings, type Config } from './config.js';
import { openStore } from './db/store.js';
import { closeApp, createApp } from './app.js';
import type { AppDeps, Lifecycle } from './deps.js';
import { createHttpServer, startDraining } from './http/server.js';
import { startMailCapture, type MailCapture } from './integrations/mail-capture.js';
import { configurePayments } from './integrations/payments/client.js';
import { loadPaymentsConfig, PaymentsConfigError, withBoundPort } from './integrations/payments/config.js';
import { startFakePaymentProvider, type FakePaymentProvider } from './integrations/payments/fake-provider.js';
import { bootstrap } from './seed/bootstrap.js';
import { DEMO_CONSOLE_PASSWORD, seedDemoConsoleUsers } from './accounts/demo-users.js';
import { createEnginePool } from './workers/engine-pool.js';
import { DEMO_ACCOUNT_NAME } from './seed/demo.js';

/** After the grace period, how long requests still in flight may take before they are cut. */
const SHUTDOWN_TIMEOUT_MS = 10_000;
const PRUNE_INTERVAL_MS = 3_600_000;
const QUOTA_SWEEP_INTERVAL_MS = 600_000;

function flag(name: string, fallback: boolean): boolean {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  if (/^(1|true|on|yes)$/i.test(raw)) return true;
  if (/^(0|false|off|no)$/i.test(raw)) return false;
  throw new ConfigError(`${name} must be 1 or 0, got "${raw}"`);
}

/** Local SMTP capture server: outside production, when no SMTP server is configured. */
async function startDevMail(
  config: Config,
  deps: Pick<AppDeps, 'store' | 'clock'>,
): Promise<MailCapture | undefined> {
  if (config.nodeEnv === 'production' || config.smtpUrl !== undefined || !flag('MAIL_CAPTURE', true))
    return undefined;
  const raw = process.env.MAIL_CAPTURE_PORT;
  const port = raw === undefined || raw === '' ? 0 : Number(raw);
  if (!Number.isInteger(port) || port < 0 || port > 65535)
    throw new ConfigError(`MAIL_CAPTURE_PORT must be a port number, got "${raw}"`);
  const capture = await startMailCapture({ store: deps.store, port, clock: deps.clock });
  // sendMail reads config.smtpUrl: point it at the capture server (loopback, no TLS).
  config.smtpUrl = capture.url;
  console.log(
    `[start-up] development mail capture on ${capture.url} (messages appear in the console outbox)`,
  );
  return capture;
}

/** Local fake of the payment provider: outside production, when PAYMENTS_API_BASE is loopback http. */
async function startDevPayments(
  config: Config,
  deps: AppDeps,
  serverPort: number,
): Promise<FakePaymentProvider | undefined> {
  if (config.nodeEnv === 'production') return undefined;
  const payments = loadPaymentsConfig(process.env);
  const base = payments.apiBase;
  const loopback =
    base !== undefined && base.protocol === 'http:' && /^(127\.0\.0\.1|localhost)$/.test(base.hostname);
  if (!payments.enabled || !loopback || !flag('FAKE_PAYMENTS', true)) return undefined;
  const fake = await startFakePaymentProvider({
    port: Number(base.port || 80),
    host: '127.0.0.1',
    webhookUrl: `http://127.0.0.1:${serverPort}/webhooks/payments`,
    webhookSecret: payments.webhookSecret,
    apiKey: payments.apiKey,
    autoPayAfterFinalize: flag('FAKE_PAYMENTS_AUTOPAY', false),
  });
  // The app's payments client calls the port the fake was given (PAYMENTS_API_BASE may say 0).
  configurePayments(deps, withBoundPort(payments, fake.port));
  console.log(`[start-up] development fake payment provider on ${fake.url} (webhooks to /webhooks/payments)`);
  return fake;
}

function engineVersion(): string {
  const pkg = JSON.parse(fs.readFileSync(path.resolve(import.meta.dirname, '../package.json'), 'utf8')) as {
    version: string;
  };
  return `ebullio-${pkg.version}`;
}

async function main(): Promise<void> {
  let config: Config;
  try {
    config = loadConfig(process.env);
    // Validate the payment settings and the development-service flags before opening anything.
    loadPaymentsConfig(process.env);
    flag('MAIL_CAPTURE', true);
    flag('FAKE_PAYMENTS', true);
    flag('FAKE_PAYMENTS_AUTOPAY', false);
    flag('DEMO_CONSOLE_USERS', false);
  } catch (err) {
    if (err instanceof ConfigError || err instanceof PaymentsConfigError) {
      console.error(`[start-up] configuration error: ${err.message}`);
      process.exit(1);
    }
    throw err;
  }
  const clock = () => new Date();
  const version = engineVersion();
  const store = openStore(config);
  let plansAdded: number;
  let report: Awaited<ReturnType<typeof bootstrap>>;
  try {
    // Several nodes may start at once on one PostgreSQL database: one at a time migrates and
    // seeds, so an empty database is seeded once (store.exclusive; immediate on SQLite).
    ({ plansAdded, report } = await store.exclusive(async () => {
      await store.migrate();
      // Price plans (server/billing/plans.ts): inserts the missing default tiers, never overwrites one.
      const added = await ensureDefaultPlans(store);
      return { plansAdded: added, report: await bootstrap(store, config, clock(), version) };
    }));
  } catch (err) {
    console.error(`[start-up] database not ready: ${(err as Error).message}`);
    await store.close().catch(() => undefined);
    process.exit(1);
  }
  console.log(
    `[start-up] database: ${store.dialect === 'postgres' ? 'PostgreSQL (DATABASE_URL)' : `SQLite ${config.dbFile}`}`,
  );
  if (plansAdded > 0) console.log(`[start-up] ${plansAdded} default price plan(s) added`);
  if (report.seeded) console.log('[start-up] empty database: demo accounts and usage seeded');
  if (report.demoCredentials && config.nodeEnv !== 'production') {
    // Shown once, on the start that created them (they are stored only as hashes).
    const c = report.demoCredentials;
    console.log(
      `[start-up] demo console sign-in (shown once): ${c.operatorEmail} / ${c.operatorPassword}\n` +
        `[start-up] demo API key (shown once): ${c.apiKey}`,
    );
  }
  if (report.apiKeyRegistered)
    console.log('[start-up] BOOTSTRAP_API_KEY registered on the demo account with all scopes');
  if (report.adminCreated) console.log(`[start-up] admin user ${config.bootstrapAdminEmail} created`);
  if (config.nodeEnv !== 'production' && flag('DEMO_CONSOLE_USERS', false)) {
    const [demoAccount] = await store.rows<{ id: number }>(
      sql`SELECT id FROM accounts WHERE name = ${DEMO_ACCOUNT_NAME}`,
    );
    const created = await seedDemoConsoleUsers(store, clock(), demoAccount ? [Number(demoAccount.id)] : []);
    for (const email of created)
      console.log(`[start-up] demo console user ${email} created (DEMO_CONSOLE_USERS=1)`);
    // Shown with the users it was just given to, like the other first-start secrets.
    if (created.length > 0)
      console.log(`[start-up] demo console users' shared password (shown once): ${DEMO_CONSOLE_PASSWORD}`);
  }
  console.log(
    `[start-up] server secret from ${config.secretSource === 'env' ? 'EBULLIO_SECRET' : config.secretSource}`,
  );

  const prune = async () => {
    const n = await pruneRequestLog(store, clock(), config.requestLogRetentionDays);
    if (n > 0)
      console.log(
        `[maintenance] pruned ${n} request-log rows older than ${config.requestLogRetentionDays} days`,
      );
    // Idempotency records are kept 24 h; older ones are already ignored, this frees their rows.
    await pruneIdempotencyRecords(store, clock());
  };
  await prune();
  // A later pass that fails (the database briefly unreachable) is logged; the next one retries.
  const pruneTimer = setInterval(() => {
    prune().catch((err: unknown) => console.error('[maintenance] request-log pruning failed:', err));
  }, PRUNE_INTERVAL_MS);
  pruneTimer.unref();

  let mail: MailCapture | undefined;
  try {
    mail = await startDevMail(config, { store, clock });
  } catch (err) {
    // A busy capture port should not stop the service: mail is then logged as failed.
    console.error(`[start-up] development mail capture not started: ${(err as Error).message}`);
  }
  let payments: FakePaymentProvider | undefined;

  const lifecycle: Lifecycle = { draining: false };
  // The calculation pool's threads start now, so the first heavy request does not wait for them.
  const engine = engineSettings(config);
  const enginePool = createEnginePool({ ...engine, eager: true });
  console.log(
    `[start-up] calculation pool: ${engine.workers === 0 ? 'inline (ENGINE_WORKERS=0)' : `${engine.workers} worker thread(s)`}, ${engine.taskTimeoutMs} ms limit per task`,
  );
  const deps: AppDeps = { store, config, clock, engineVersion: version, lifecycle, enginePool };
  // Quota e-mails (80 % and 100 %, once per account and month; server/billing/quota-notices.ts):
  // a sweep over every account catches usage that no request-time check saw (seeded or imported).
  let sweeping = false;
  const sweepQuotas = async () => {
    if (sweeping) return;
    sweeping = true;
    try {
      const { accounts } = store.t;
      const ids = await store.db.select({ id: accounts.id }).from(accounts).orderBy(accounts.id);
      for (const { id } of ids) {
        const r = await checkQuotaNotices(deps, id);
        if (r.sent !== null)
          console.log(`[quota] account ${id}: ${r.sent} % notice sent (${r.used}/${r.quota} units)`);
      }
    } catch (err) {
      console.error('[quota] notice sweep failed:', err);
    } finally {
      sweeping = false;
    }
  };
  const quotaTimer = setInterval(() => void sweepQuotas(), QUOTA_SWEEP_INTERVAL_MS);
  quotaTimer.unref();

  const app = createApp(deps);
  if (deps.shared) {
    // Not fatal: until Redis answers, the limits answer 503 (fail closed) and the node reconnects.
    const up = await deps.shared.ready(5_000);
    console.log(
      up
        ? '[start-up] shared state on Redis (REDIS_URL): rate limits and key-cache invalidation shared between nodes'
        : '[start-up] Redis (REDIS_URL) not reachable yet: limited routes answer 503 until it is; retrying',
    );
  }
  const server = createHttpServer(app, config, lifecycle);
  const onListenError = (err: Error) => {
    console.error(`[start-up] cannot listen on port ${config.port}: ${err.message}`);
    void store.close().finally(() => process.exit(1));
  };
  server.once('error', onListenError);
  server.listen(config.port, () => {
    server.off('error', onListenError);
    const { port } = server.address() as AddressInfo;
    startDevPayments(config, deps, port)
      .then((fake) => {
        payments = fake;
      })
      .catch((e: unknown) => {
        console.error(`[start-up] development fake payment provider not started: ${(e as Error).message}`);
      })
      .finally(() => {
        console.log(`[start-up] Ebullio ${version} listening on http://localhost:${port}`);
        void sweepQuotas();
      });
  });

  /**
   * Draining. A keep-alive client may write its next request on an idle connection at the very
   * moment the server closes that connection; the client then sees a reset and cannot know
   * whether the request was processed. So idle connections are not closed at once:
   *
   * 1. The listener closes at once (net.Server#close: http.Server#close would also drop every
   *    idle keep-alive connection). A refused connection carries no request, so a client can
   *    safely retry elsewhere. Closing it now rather than after the grace period also matters:
   *    during the grace period clients reconnect after each `Connection: close`, and the
   *    connections the kernel had accepted but Node had not yet taken when the listener closed
   *    would be reset with their request written.
   * 2. For SHUTDOWN_GRACE_MS the open connections stay open; every answer from now on, those of
   *    requests in flight included, carries `Connection: close` (server.ts), so each client drops
   *    its connection after its next answer, and /readyz says 503. When the last connection is gone the process exits at once.
   * 3. Then the connections still idle (silent for the whole grace period) are closed, and closed
   *    again as requests in flight finish; after SHUTDOWN_TIMEOUT_MS more, everything is cut.
   *    (Node counts a connection as idle only when no byte of a request has been parsed on it; a
   *    request written in the very instant of the close is reset, the race every keep-alive
   *    timeout has, now only for a client that sent nothing for the whole grace period.)
   */
  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    startDraining(server);
    const { shutdownGraceMs } = serverSettings(config);
    console.log(
      `[shutdown] ${signal}: no new connections; answering open ones with Connection: close for ${shutdownGraceMs} ms`,
    );
    clearInterval(pruneTimer);
    clearInterval(quotaTimer);
    let reaper: NodeJS.Timeout | undefined;
    const grace = setTimeout(() => {
      server.closeIdleConnections();
      reaper = setInterval(() => server.closeIdleConnections(), 100);
    }, shutdownGraceMs);
    const force = setTimeout(() => {
      console.error(
        `[shutdown] requests still open ${SHUTDOWN_TIMEOUT_MS} ms after the grace period; closing them`,
      );
      server.closeAllConnections();
    }, shutdownGraceMs + SHUTDOWN_TIMEOUT_MS);
    force.unref();
    net.Server.prototype.close.call(server, () => {
      clearTimeout(grace);
      clearTimeout(force);
      clearInterval(reaper);
      // Development services after the last request (a finalize in flight may still call the
      // fake). Then one more turn of the event loop: the row of a request its client abandoned is
      // still queued for the metering group commit, which runs on the next turn. The pool and the
      // shared state's connections last (closeApp): a request answered during the drain may still
      // have needed a thread or its limiter.
      void Promise.allSettled([payments?.close(), mail?.close()])
        .then(() => new Promise((resolve) => setImmediate(resolve)))
        .then(() =>
          closeApp(deps).then(
            () => deps.shared && console.log('[shutdown] Redis connections closed'),
            (e: unknown) => console.error('[shutdown] closing the pool or Redis:', e),
          ),
        )
        .then(() => store.close())
        .catch((e: unknown) => console.error('[shutdown] closing the database:', e))
        .then(() => {
          console.log('[shutdown] done');
          process.exit(0);
        });
    });
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

void main();
