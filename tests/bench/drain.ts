/**
 * Drain benchmark: SIGTERM in the middle of a keep-alive load on the real server process
 * (tests/support/drain-load.ts, the same scenario as tests/http/drain.test.ts), and what the
 * clients and the database saw. Target: no request written to an open connection is reset, and
 * the usage rows (2xx) equal the 2xx answers. For comparison the same load against a server with
 * SHUTDOWN_GRACE_MS=0, which closes the idle keep-alive connections at the signal.
 *
 *   npx tsx tests/bench/drain.ts
 */
import { pathToFileURL } from 'node:url';
import { runDrainLoad, type DrainFigures } from '../support/drain-load.js';

const CLIENTS = 16;

function line(f: DrainFigures): string {
  return (
    `  grace ${String(f.graceMs).padStart(4)} ms: clients ${f.clients}, requests sent ${f.sent}, 2xx ${f.ok2xx} ` +
    `(${f.ok2xxAfterSigterm} after SIGTERM), answered with Connection: close ${f.connectionClose}, ` +
    `resets ${f.resets}, refused ${f.refused}, metered 2xx rows ${f.metered2xx} ` +
    `(unmetered 2xx ${f.unmetered.length}, rows without an answer ${f.meteredUnseen.length}), ` +
    `SIGTERM to exit ${f.drainMs} ms, exit ${f.exitCode ?? f.exitSignal}`
  );
}

export async function runDrainBench(): Promise<void> {
  for (const graceMs of [3000, 0]) {
    const f = await runDrainLoad({
      clients: CLIENTS,
      graceMs,
      sigtermAfterOk: 150,
      sigtermAfterMs: 5000,
      maxRequests: 500,
    });
    console.log(line(f));
    if (f.resetCodes.length > 0) console.log(`    resets: ${f.resetCodes.slice(0, 4).join('; ')}`);
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runDrainBench();
}
