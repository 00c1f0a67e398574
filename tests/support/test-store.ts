// The data store a test harness runs on: an in-memory SQLite database by default, or, with
// EBULLIO_TEST_DATABASE=postgres (the `server-pg` vitest project), a fresh PostgreSQL database for
// every harness, so the same server-side suites hold both databases to the same behaviour.
//
// PostgreSQL: the project's global setup (tests/support/postgres-global-setup.ts) starts one
// throw-away server and migrates a template database; each harness copies the template with
// CREATE DATABASE … TEMPLATE (tens of milliseconds, against seconds for the migrations). Run
// outside that project (one file by hand), the first harness of the worker starts its own server.
import pg from 'pg';
import { inject } from 'vitest';
import { openPostgresStore, openSqliteStore, type Store } from '../../server/db/store.js';
import { startPostgres } from './postgres-server.js';

declare module 'vitest' {
  export interface ProvidedContext {
    /** The `server-pg` project's PostgreSQL server (its `postgres` database). */
    postgresUrl: string;
  }
}

export const TEMPLATE_DATABASE = 'ebullio_template';

export function testDatabaseKind(): 'sqlite' | 'postgres' {
  return process.env.EBULLIO_TEST_DATABASE === 'postgres' ? 'postgres' : 'sqlite';
}

/** Migrates the template database on a server (its `postgres` database at `url`). */
export async function prepareTemplate(url: string): Promise<void> {
  const admin = new pg.Client({ connectionString: url });
  await admin.connect();
  try {
    await admin.query(`DROP DATABASE IF EXISTS ${TEMPLATE_DATABASE}`);
    await admin.query(`CREATE DATABASE ${TEMPLATE_DATABASE}`);
  } finally {
    await admin.end();
  }
  const template = openPostgresStore(databaseUrl(url, TEMPLATE_DATABASE), { max: 1 });
  try {
    await template.migrate();
  } finally {
    await template.close();
  }
}

function databaseUrl(serverUrl: string, database: string): string {
  const url = new URL(serverUrl);
  url.pathname = `/${database}`;
  return url.toString();
}

let ownServer: Promise<string> | undefined;
/** The server URL: the global setup's, or one started (and its template made) for this worker. */
function serverUrl(): Promise<string> {
  const shared = inject('postgresUrl');
  if (shared) return Promise.resolve(shared);
  ownServer ??= (async () => {
    const server = await startPostgres();
    await prepareTemplate(server.url);
    return server.url;
  })();
  return ownServer;
}

let created = 0;
const open = new Set<Store>();

/** A new, migrated, empty database of the kind this run tests. */
export async function openTestStore(): Promise<Store> {
  if (testDatabaseKind() === 'sqlite') {
    const store = openSqliteStore(':memory:');
    await store.migrate();
    return store;
  }
  const url = await serverUrl();
  created += 1;
  const name = `t_${process.pid}_${created}`;
  const admin = new pg.Client({ connectionString: url });
  await admin.connect();
  try {
    // Two workers copying the template at the same instant: PostgreSQL refuses the second while
    // the first holds the template; wait and try again.
    for (let attempt = 0; ; attempt++) {
      try {
        await admin.query(`CREATE DATABASE ${name} TEMPLATE ${TEMPLATE_DATABASE}`);
        break;
      } catch (err) {
        if (attempt >= 50 || !/being accessed by other users/.test((err as Error).message)) throw err;
        await new Promise((r) => setTimeout(r, 50 + Math.random() * 100));
      }
    }
  } finally {
    await admin.end();
  }
  const store = openPostgresStore(databaseUrl(url, name), { max: 4 });
  open.add(store);
  return store;
}

/** Closes every PostgreSQL store this worker opened (an afterAll of the harness users). */
export async function closeTestStores(): Promise<void> {
  const stores = [...open];
  open.clear();
  await Promise.all(stores.map((s) => s.close().catch(() => undefined)));
}
