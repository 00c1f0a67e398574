/**
 * Start-up: config → database (WAL, migrations) → seed/bootstrap → listen; request-log pruning at
 * start and hourly; graceful shutdown on SIGTERM/SIGINT (stop accepting, let in-flight requests
 * finish for up to SHUTDOWN_TIMEOUT_MS, close the database, exit 0).
 *
 *   PORT=8080 DB_FILE=./data/ebullio.db BOOTSTRAP_API_KEY=… npx tsx server/main.ts
 */
import fs from 'node:fs';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { pruneRequestLog } from './accounts/request-log.js';
import { ConfigError, loadConfig, type Config } from './config.js';
import { openDatabase, runMigrations } from './db/client.js';
import { createApp } from './http/app.js';
import { bootstrap } from './seed/bootstrap.js';

const SHUTDOWN_TIMEOUT_MS = 10_000;
const PRUNE_INTERVAL_MS = 3_600_000;

function engineVersion(): string {
  const pkg = JSON.parse(fs.readFileSync(path.resolve(import.meta.dirname, '../package.json'), 'utf8')) as {
    version: string;
  };
  return `ebullio-${pkg.version}`;
}

function main(): void {
  let config: Config;
  try {
    config = loadConfig(process.env);
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(`[start-up] configuration error: ${err.message}`);
      process.exit(1);
    }
    throw err;
  }
  const clock = () => new Date();
  const version = engineVersion();
  const { sqlite, db } = openDatabase(config.dbFile);
  runMigrations(db);
  const report = bootstrap(db, sqlite, config, clock(), version);
  if (report.seeded)
    console.log('[start-up] empty database: demo accounts and usage seeded (demo key secrets are not shown)');
  if (report.apiKeyRegistered)
    console.log('[start-up] BOOTSTRAP_API_KEY registered on the demo account with all scopes');
  if (report.adminCreated) console.log(`[start-up] admin user ${config.bootstrapAdminEmail} created`);
  console.log(
    `[start-up] server secret from ${config.secretSource === 'env' ? 'EBULLIO_SECRET' : config.secretSource}`,
  );

  const prune = () => {
    const n = pruneRequestLog(sqlite, clock(), config.requestLogRetentionDays);
    if (n > 0)
      console.log(
        `[maintenance] pruned ${n} request-log rows older than ${config.requestLogRetentionDays} days`,
      );
  };
  prune();
  const pruneTimer = setInterval(prune, PRUNE_INTERVAL_MS);
  pruneTimer.unref();

  const app = createApp({ db, sqlite, config, clock, engineVersion: version });
  const server = app.listen(config.port, (err?: Error) => {
    if (err) {
      console.error(`[start-up] cannot listen on port ${config.port}: ${err.message}`);
      sqlite.close();
      process.exit(1);
    }
    const { port } = server.address() as AddressInfo;
    console.log(`[start-up] Ebullio ${version} listening on http://localhost:${port}`);
  });

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[shutdown] ${signal}: no new connections; finishing in-flight requests`);
    clearInterval(pruneTimer);
    const force = setTimeout(() => {
      console.error(`[shutdown] requests still open after ${SHUTDOWN_TIMEOUT_MS} ms; closing them`);
      server.closeAllConnections();
    }, SHUTDOWN_TIMEOUT_MS);
    force.unref();
    // Keep-alive connections become idle once their in-flight request is answered: close them then,
    // instead of waiting for the keep-alive timeout.
    const reaper = setInterval(() => server.closeIdleConnections(), 100);
    reaper.unref();
    server.close(() => {
      clearTimeout(force);
      clearInterval(reaper);
      sqlite.close();
      console.log('[shutdown] done');
      process.exit(0);
    });
    server.closeIdleConnections();
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

main();
