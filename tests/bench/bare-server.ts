/**
 * The baselines of the API benchmark (tests/bench/api.ts), bare Express 5 apps with one JSON
 * route, `POST /bare`, that parse the JSON request body as the real app does:
 *
 * - `BARE_MODE=fixed` (default): answers with a fixed JSON body (the single-effect response
 *   captured by the benchmark, so both send the same number of bytes and serialise the same
 *   object). No authentication, metering, rate limit, DB or calculation: the gap between this and
 *   the real app is what all of Ebullio's work costs, the calculation included.
 * - `BARE_MODE=calculation`: runs the real single-effect route code (validation, units, engine,
 *   output) on the body and sends its result the way the real route does, with no API key,
 *   metering or rate limit. The gap between this and the real app is what the metered layers
 *   cost; the gap between this and `fixed` is what the calculation itself costs.
 *
 *   BARE_BODY_FILE=/tmp/body.json [BARE_MODE=calculation] npx tsx tests/bench/bare-server.ts
 *
 * Listens on 127.0.0.1 (an ephemeral port) and prints one line `{"port": N}` on stdout; a line
 * `cpu` on stdin is answered with `{"cpu": {"user": µs, "system": µs}}` (process.cpuUsage()).
 */
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import express from 'express';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { sendCalculation } from '../../server/http/send.js';
import { compileOperation, runOperation } from '../../server/http/v1/operation.js';
import { singleEffect } from '../../server/http/v1/operations/evaporators.js';

const file = process.env.BARE_BODY_FILE;
if (!file) {
  console.error('BARE_BODY_FILE must name a JSON file holding the response body');
  process.exit(1);
}
const responseBody = JSON.parse(fs.readFileSync(file, 'utf8')) as unknown;

const app = express();
app.disable('x-powered-by');
app.use(express.json({ limit: 1024 * 1024 }));
app.set('etag', false); // as the real app (server/http/app.ts)
if (process.env.BARE_MODE === 'calculation') {
  // A built-in liquor needs no stored rows; the in-memory database only satisfies the signature.
  const { db, sqlite } = openDatabase(':memory:');
  runMigrations(db);
  const engineVersion = (responseBody as { provenance: { engineVersion: string } }).provenance.engineVersion;
  const op = compileOperation(singleEffect);
  const ctx = { accountId: 0, store: sqliteStore(sqlite, db), engineVersion, clock: () => new Date() };
  app.post('/bare', async (req, res) => {
    sendCalculation(res, await runOperation(op, { body: req.body }, ctx));
  });
} else {
  app.post('/bare', (_req, res) => {
    res.json(responseBody);
  });
}

const server = app.listen(0, '127.0.0.1', (err?: Error) => {
  if (err) {
    console.error(`bare server cannot listen: ${err.message}`);
    process.exit(1);
  }
  console.log(JSON.stringify({ port: (server.address() as AddressInfo).port }));
});
process.on('SIGTERM', () => server.close(() => process.exit(0)));
// `cpu` on stdin → this process's CPU time so far, one JSON line (the benchmark's per-request cost).
process.stdin.setEncoding('utf8');
process.stdin.on('data', (text: string) => {
  if (text.includes('cpu')) console.log(JSON.stringify({ cpu: process.cpuUsage() }));
});
