// A listening Ebullio for the client and example suites: the app of the HTTP tests' harness (an
// in-memory database, an invented account and its key) behind the HTTP server main.ts uses, on a
// loopback port, so the clients go through real sockets, headers and content negotiation.
import type { AddressInfo } from 'node:net';
import type http from 'node:http';
import { closeApp } from '../../server/app.js';
import { createHttpServer } from '../../server/http/server.js';
import { makeHarness, type Harness } from '../http/helpers.js';

export interface LiveServer {
  harness: Harness;
  /** `http://127.0.0.1:<port>`, without a trailing slash or `/v1`. */
  baseUrl: string;
  /** The invented account's key, with every scope. */
  apiKey: string;
  close(): Promise<void>;
}

export async function startLiveServer(): Promise<LiveServer> {
  // Room for the examples' sweeps (5 units a point); calculations inline, as single effects run.
  const harness = await makeHarness({
    quota: 100_000,
    config: { engineWorkers: 0, bodyLimitBytes: 1024 * 1024 },
  });
  const server: http.Server = createHttpServer(harness.app, harness.config);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    harness,
    baseUrl: `http://127.0.0.1:${port}`,
    apiKey: harness.token,
    async close() {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await closeApp(harness.deps);
    },
  };
}
