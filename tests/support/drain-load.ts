// A keep-alive load on the real server process, SIGTERM in the middle of it, and what the clients
// and the database saw: shared by the drain test (tests/http/drain.test.ts) and its bench section
// (tests/bench/drain.ts).
//
// Each client is one node http.Agent with keep-alive and a single socket, looping single-effect
// POSTs. After SIGTERM a client keeps sending until a connection is refused (ECONNREFUSED: nothing
// was sent, so a client may safely retry elsewhere). Any other failure of a request (ECONNRESET,
// "socket hang up") is one written to a connection the server then dropped: the client cannot
// know whether it was processed. Loops are bounded in requests and in time.
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { startServerProcess } from './server-process.js';

const BOOT_KEY = 'ebl_live_DrainDrainDr_0123456789abcdefghijABCDEFGHIJKL';

/** An invented caustic concentrator (design mode): 1.2 kg/s of 10 % NaOH to 30 %. */
const CASE = JSON.stringify({
  liquor: 'sodium-hydroxide',
  feed: { massFlow: '1.2 kg/s', massFraction: 0.1, temperature: '50 degC' },
  product: { massFraction: 0.3 },
  steam: { pressure: '2 barg' },
  body: { pressure: '15 kPa', overallHeatTransferCoefficient: 1600 },
});

export interface DrainOptions {
  clients: number;
  /** SHUTDOWN_GRACE_MS of the server. */
  graceMs: number;
  /** SIGTERM after this many 2xx answers, or after sigtermAfterMs, whichever comes first. */
  sigtermAfterOk: number;
  sigtermAfterMs: number;
  /** Bound on requests sent in all (the bootstrap key allows 600 a minute). */
  maxRequests: number;
}

export interface DrainFigures {
  clients: number;
  graceMs: number;
  sent: number;
  ok2xx: number;
  /** 2xx answers received after SIGTERM, and how many of all answers said Connection: close. */
  ok2xxAfterSigterm: number;
  connectionClose: number;
  otherStatus: number;
  /** Requests written to a connection the server then reset or closed without an answer. */
  resets: number;
  resetCodes: string[];
  refused: number;
  /** Clients that ended on a refused connection (the rest hit the request or time bound). */
  clientsRefused: number;
  metered2xx: number;
  /** 2xx answers with no 2xx usage row, and 2xx rows whose answer no client received. */
  unmetered: string[];
  meteredUnseen: string[];
  exitCode: number | null;
  exitSignal: NodeJS.Signals | null;
  /** SIGTERM to process exit, ms. */
  drainMs: number;
  output: string;
}

function post(agent: http.Agent, port: number, id: string): Promise<{ status: number; close: boolean }> {
  return new Promise((resolve, reject) => {
    const req = http.request(
      {
        host: '127.0.0.1',
        port,
        path: '/v1/evaporators/single-effect',
        method: 'POST',
        agent,
        headers: {
          authorization: `Bearer ${BOOT_KEY}`,
          'content-type': 'application/json',
          'content-length': Buffer.byteLength(CASE),
          'x-request-id': id,
        },
      },
      (res) => {
        res.resume();
        res.on('end', () =>
          resolve({ status: res.statusCode ?? 0, close: res.headers.connection === 'close' }),
        );
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    req.end(CASE);
  });
}

export async function runDrainLoad(opts: DrainOptions): Promise<DrainFigures> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-drain-'));
  const dbFile = path.join(dir, 'e.db');
  const server = startServerProcess({
    PORT: '0',
    DB_FILE: dbFile,
    BOOTSTRAP_API_KEY: BOOT_KEY,
    SHUTDOWN_GRACE_MS: String(opts.graceMs),
    MAIL_CAPTURE: '0',
    FAKE_PAYMENTS: '0',
  });
  try {
    const port = await server.port;
    const ok = new Set<string>();
    let okAfterSigterm = 0;
    let connectionClose = 0;
    let otherStatus = 0;
    const resetCodes: string[] = [];
    let refused = 0;
    let clientsRefused = 0;
    let sent = 0;
    let sigtermAt = 0;
    const sigterm = () => {
      if (sigtermAt !== 0) return;
      sigtermAt = Date.now();
      server.child.kill('SIGTERM');
    };
    const timer = setTimeout(sigterm, opts.sigtermAfterMs);
    // Whatever happens, the clients stop this long after the start (the server's own hard
    // timeout is grace + 10 s).
    const deadline = Date.now() + opts.sigtermAfterMs + opts.graceMs + 15_000;

    const client = async (c: number) => {
      const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
      try {
        while (sent < opts.maxRequests && Date.now() < deadline) {
          const id = `drain-${c}-${sent++}`;
          try {
            const res = await post(agent, port, id);
            if (res.close) connectionClose++;
            if (res.status >= 200 && res.status < 300) {
              ok.add(id);
              if (sigtermAt !== 0) okAfterSigterm++;
            } else otherStatus++;
            if (ok.size >= opts.sigtermAfterOk) sigterm();
          } catch (err) {
            const code = (err as NodeJS.ErrnoException).code ?? (err as Error).message;
            if (code === 'ECONNREFUSED') {
              refused++;
              clientsRefused++;
              return;
            }
            resetCodes.push(`${id}: ${code}`);
          }
        }
      } finally {
        agent.destroy();
      }
    };
    await Promise.all(Array.from({ length: opts.clients }, (_, c) => client(c)));
    clearTimeout(timer);
    sigterm();
    const exit = await server.exited;
    const drainMs = Date.now() - sigtermAt;

    const check = new Database(dbFile, { readonly: true });
    const rows = check
      .prepare("SELECT request_id AS id FROM usage_events WHERE request_id LIKE 'drain-%' AND status < 300")
      .pluck()
      .all() as string[];
    check.close();
    const metered = new Set(rows);
    return {
      clients: opts.clients,
      graceMs: opts.graceMs,
      sent,
      ok2xx: ok.size,
      ok2xxAfterSigterm: okAfterSigterm,
      connectionClose,
      otherStatus,
      resets: resetCodes.length,
      resetCodes,
      refused,
      clientsRefused,
      metered2xx: metered.size,
      unmetered: [...ok].filter((id) => !metered.has(id)),
      meteredUnseen: [...metered].filter((id) => !ok.has(id)),
      exitCode: exit.code,
      exitSignal: exit.signal,
      drainMs,
      output: server.output(),
    };
  } finally {
    if (server.child.exitCode === null && server.child.signalCode === null) server.child.kill('SIGKILL');
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
