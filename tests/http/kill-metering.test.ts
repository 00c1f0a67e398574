// Metering survives a hard crash: the real server (node --import tsx server/main.ts, a temp
// file database in WAL mode) is SIGKILLed in the middle of a bounded load of concurrent
// authenticated single-effect and batch requests (JSON and CSV answers). Afterwards the database must hold a 2xx usage row for
// every 2xx response the client saw (a row is committed before the response leaves), and its
// extra 2xx rows can only belong to requests that were still in flight at the kill.
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { startServerProcess } from '../support/server-process.js';

const BOOT_KEY = 'ebl_live_KillKillKill_0123456789abcdefghijABCDEFGHIJKL';
/** Concurrent client workers; each sends its next request as soon as the last one is answered. */
const WORKERS = 8;
/** Kill after this many 2xx responses (or KILL_AFTER_MS, whichever comes first). */
const KILL_AFTER_OK = 150;
const KILL_AFTER_MS = 4000;
/** Hard bound on requests sent, below the bootstrap key's 600 per minute. */
const MAX_REQUESTS = 400;

/** An invented caustic concentrator (design mode): 1.6 kg/s of 15 % NaOH to 35 %. */
const CASE = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: '1.6 kg/s', massFraction: 0.15, temperature: '60 degC' },
  product: { massFraction: 0.35 },
  steam: { pressure: '3 barg' },
  body: { pressure: '20 kPa', overallHeatTransferCoefficient: 1400 },
};
/** A batch of the same case at 30 product strengths: slower, so the kill tends to land inside one. */
const BATCH = {
  operation: 'single-effect',
  cases: Array.from({ length: 30 }, (_, i) => ({ ...CASE, product: { massFraction: 0.3 + i * 0.004 } })),
};
/**
 * What each worker sends: half single-effect (JSON out), the rest batches, some answered as JSON
 * and some as CSV (Accept: text/csv), so every kind of 2xx body is covered.
 */
const KINDS = [
  { path: '/v1/evaporators/single-effect', body: JSON.stringify(CASE), accept: 'application/json' },
  { path: '/v1/batch', body: JSON.stringify(BATCH), accept: 'application/json' },
  { path: '/v1/evaporators/single-effect', body: JSON.stringify(CASE), accept: 'application/json' },
  { path: '/v1/batch', body: JSON.stringify(BATCH), accept: 'text/csv' },
] as const;

/** True once nothing accepts connections on the port (polls for up to 3 s). */
async function portClosed(port: number): Promise<boolean> {
  for (let i = 0; i < 30; i++) {
    const open = await new Promise<boolean>((resolve) => {
      const socket = net.connect(port, '127.0.0.1');
      socket.once('connect', () => {
        socket.destroy();
        resolve(true);
      });
      socket.once('error', () => resolve(false));
    });
    if (!open) return true;
    await new Promise((r) => setTimeout(r, 100));
  }
  return false;
}

describe('metering across a SIGKILL', () => {
  it('holds a committed 2xx usage row for every 2xx the client received, and extra rows only for requests in flight at the kill', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-kill-'));
    const dbFile = path.join(dir, 'e.db');
    // Detached, so the SIGKILL below goes to the server's whole process group (see server-process.ts).
    const server = startServerProcess(
      { PORT: '0', DB_FILE: dbFile, BOOTSTRAP_API_KEY: BOOT_KEY },
      { detached: true },
    );
    const port = await server.port;

    const ok = new Set<string>(); // request ids answered 2xx
    const otherStatus = new Map<string, number>();
    const inFlight = new Set<string>();
    let sent = 0;
    let killed = false;
    let inFlightAtKill = new Set<string>();
    const started = Date.now();
    const kill = () => {
      if (killed) return;
      killed = true;
      inFlightAtKill = new Set(inFlight);
      process.kill(-server.child.pid!, 'SIGKILL');
    };
    const timer = setTimeout(kill, KILL_AFTER_MS);

    const worker = async (w: number) => {
      const kind = KINDS[w % KINDS.length]!;
      while (!killed && sent < MAX_REQUESTS) {
        const id = `kill-${w}-${sent++}`;
        inFlight.add(id);
        try {
          const res = await fetch(`http://127.0.0.1:${port}${kind.path}`, {
            method: 'POST',
            headers: {
              authorization: `Bearer ${BOOT_KEY}`,
              'content-type': 'application/json',
              accept: kind.accept,
              'x-request-id': id,
            },
            body: kind.body,
          });
          // The status line is enough: the row is committed before any byte of the response.
          if (res.status >= 200 && res.status < 300) ok.add(id);
          else otherStatus.set(id, res.status);
          await res.arrayBuffer().catch(() => undefined);
        } catch {
          // connection refused or reset by the kill: no response
        } finally {
          inFlight.delete(id);
        }
        if (ok.size >= KILL_AFTER_OK) kill();
      }
    };
    await Promise.all(Array.from({ length: WORKERS }, (_, w) => worker(w)));
    clearTimeout(timer);
    kill();
    expect((await server.exited).signal).toBe('SIGKILL');
    expect(await portClosed(port)).toBe(true); // nothing of the server is left listening

    // Opening read-write lets SQLite recover the WAL the killed process left behind.
    const check = new Database(dbFile);
    const rows = check
      .prepare("SELECT request_id AS id, status FROM usage_events WHERE request_id LIKE 'kill-%'")
      .all() as { id: string; status: number }[];
    check.close();
    const rows2xx = new Set(rows.filter((r) => r.status >= 200 && r.status < 300).map((r) => r.id));

    // The load was real and the kill landed mid-load.
    expect(otherStatus.size).toBe(0);
    expect(ok.size).toBeGreaterThanOrEqual(20);
    expect(inFlightAtKill.size).toBeGreaterThan(0);
    expect(Date.now() - started).toBeLessThan(15_000);

    // Every 2xx the client saw was metered as 2xx …
    const unmetered = [...ok].filter((id) => !rows2xx.has(id));
    expect(unmetered).toEqual([]);
    expect(rows2xx.size).toBeGreaterThanOrEqual(ok.size);
    // … and every extra 2xx row is a request that was in flight when the server died.
    const extra = [...rows2xx].filter((id) => !ok.has(id));
    expect(extra.every((id) => inFlightAtKill.has(id))).toBe(true);
    expect(rows2xx.size - ok.size).toBeLessThanOrEqual(inFlightAtKill.size);
    console.log(
      `[kill-metering] 2xx received ${ok.size}, 2xx rows ${rows2xx.size}, in flight at kill ${inFlightAtKill.size}, requests sent ${sent}, never answered ${sent - ok.size - otherStatus.size}`,
    );
    fs.rmSync(dir, { recursive: true, force: true });
  }, 30_000);
});
