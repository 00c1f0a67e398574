// SIGTERM under keep-alive load, against the real server process (tests/support/drain-load.ts):
// 16 keep-alive clients loop single-effect POSTs, SIGTERM lands mid-load, and the clients keep
// sending until a connection is refused. A request written to a connection must never be reset:
// the server answers what reaches it (with Connection: close) and closes only idle connections,
// after the grace period. Time bounds are generous (a loaded 2-core CI machine); the load is
// bounded in requests.
import { describe, expect, it } from 'vitest';
import { runDrainLoad } from '../support/drain-load.js';

describe('SIGTERM drain under keep-alive load', () => {
  it('resets no request written to an open connection, meters every 2xx, and exits 0', async () => {
    const f = await runDrainLoad({
      clients: 16,
      graceMs: 3000,
      sigtermAfterOk: 120,
      sigtermAfterMs: 5000,
      maxRequests: 450,
    });
    console.log(
      `[drain] clients ${f.clients}, sent ${f.sent}, 2xx ${f.ok2xx} (${f.ok2xxAfterSigterm} after SIGTERM), ` +
        `Connection: close ${f.connectionClose}, resets ${f.resets}, refused ${f.refused}, metered 2xx ${f.metered2xx}, drain ${f.drainMs} ms`,
    );
    expect(f.exitCode, f.output).toBe(0);
    expect(f.output).toContain('[shutdown] done');
    expect(f.resetCodes).toEqual([]);
    expect(f.otherStatus).toBe(0);
    // SIGTERM landed mid-load: clients were answered after it, told to close, then refused.
    expect(f.ok2xx).toBeGreaterThanOrEqual(20);
    expect(f.ok2xxAfterSigterm).toBeGreaterThan(0);
    expect(f.connectionClose).toBeGreaterThan(0);
    expect(f.clientsRefused).toBe(16);
    // Every 2xx answer has its usage row, and no request was processed without its answer.
    expect(f.unmetered).toEqual([]);
    expect(f.meteredUnseen).toEqual([]);
    expect(f.metered2xx).toBe(f.ok2xx);
  }, 60_000);
});
