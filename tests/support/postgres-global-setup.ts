// Global setup of the `server-pg` vitest project: one throw-away PostgreSQL server for the whole
// run, with a migrated template database that every test harness copies (tests/support/test-store.ts).
// The URL reaches the test workers through vitest's provide/inject.
import type { TestProject } from 'vitest/node';
import { startPostgres, type PostgresServer } from './postgres-server.js';
import { prepareTemplate } from './test-store.js';

let server: PostgresServer | undefined;

export async function setup(project: TestProject): Promise<void> {
  server = await startPostgres();
  await prepareTemplate(server.url);
  project.provide('postgresUrl', server.url);
}

export async function teardown(): Promise<void> {
  await server?.stop();
}
