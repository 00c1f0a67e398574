/**
 * The baseline of the API benchmark (tests/bench/api.ts): a bare Express 5 app with one JSON
 * route, `POST /bare`, that parses the JSON request body as the real app does and answers with a
 * fixed JSON body (the single-effect response captured by the benchmark, so both send the same
 * number of bytes and serialise the same object). No authentication, metering, rate limit, DB or
 * calculation: the gap between the two is what Ebullio's own layers cost.
 *
 *   BARE_BODY_FILE=/tmp/body.json npx tsx tests/bench/bare-server.ts
 *
 * Listens on 127.0.0.1 (an ephemeral port) and prints one line `{"port": N}` on stdout; a line
 * `cpu` on stdin is answered with `{"cpu": {"user": µs, "system": µs}}` (process.cpuUsage()).
 */
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import express from 'express';

const file = process.env.BARE_BODY_FILE;
if (!file) {
  console.error('BARE_BODY_FILE must name a JSON file holding the response body');
  process.exit(1);
}
const responseBody = JSON.parse(fs.readFileSync(file, 'utf8')) as unknown;

const app = express();
app.disable('x-powered-by');
app.use(express.json({ limit: 1024 * 1024 }));
app.post('/bare', (_req, res) => {
  res.json(responseBody);
});

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
