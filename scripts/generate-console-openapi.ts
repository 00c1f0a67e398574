/**
 * Writes the console API's OpenAPI document (built from every route declared with consoleRoute)
 * to openapi/console.json. Run: `npx tsx scripts/generate-console-openapi.ts`
 * (tests/console-api/console-openapi-drift.test.ts fails when the committed file differs).
 *
 * The routes register themselves when the console router is built, so this builds one against
 * an in-memory database (nothing is listened on or stored).
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { loadConfig } from '../server/config.js';
import { openDatabase } from '../server/db/client.js';
import { sqliteStore } from '../server/db/store.js';
import { createConsoleRouter } from '../server/console/index.js';
import { buildConsoleOpenApiDocument } from '../server/console/openapi.js';
import { consoleRouteTable } from '../server/console/route.js';

export function serialiseConsoleOpenApi(): string {
  const { sqlite, db } = openDatabase(':memory:');
  const store = sqliteStore(sqlite, db);
  try {
    const config = loadConfig({
      EBULLIO_SECRET: 'openapi-generation-only-not-a-secret-0000',
      DB_FILE: ':memory:',
    });
    createConsoleRouter({ store, config, clock: () => new Date(0), engineVersion: 'openapi' });
  } finally {
    sqlite.close();
  }
  return JSON.stringify(buildConsoleOpenApiDocument(consoleRouteTable), null, 2) + '\n';
}

export const consoleOpenApiPath = fileURLToPath(new URL('../openapi/console.json', import.meta.url));

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  writeFileSync(consoleOpenApiPath, serialiseConsoleOpenApi());
  console.log(`wrote ${consoleOpenApiPath}`);
}
