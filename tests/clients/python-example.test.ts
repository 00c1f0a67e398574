// The Python example (openapi/examples/python, standard library only) run by Debian's Python 3
// against a listening server: the numbers it prints must be the server's own single calls.
import { execFile } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEbullioClient, type EbullioClient, type Schema } from '../../openapi/client/index.js';
import { usageRows } from '../http/helpers.js';
import { startLiveServer, type LiveServer } from './live-server.js';

const run = promisify(execFile);
const PYTHON = '/usr/bin/python3';
const EXAMPLE_DIR = fileURLToPath(new URL('../../openapi/examples/python/', import.meta.url));

// No proxy from the environment may stand between the example and the loopback server.
const pythonEnv = {
  PATH: process.env.PATH ?? '/usr/bin:/bin',
  LANG: 'C.UTF-8',
  PYTHONDONTWRITEBYTECODE: '1',
};

interface PointSummary {
  values: Record<string, number | string>;
  status: string;
  area?: number;
  steamEconomy?: number;
  steamMassFlow?: number;
}
interface Summary {
  design: { request: Schema<'SingleEffectRequest'>; result: Record<string, unknown> };
  pressureSweep: {
    request: { base: Schema<'SingleEffectRequest'> };
    result: {
      count: number;
      succeeded: number;
      failed: number;
      unitsCharged: number;
      smallestArea: PointSummary;
      rows: PointSummary[];
    };
  };
  cautions: string[];
  job: {
    request: Schema<'SweepRequest'>;
    async: boolean;
    id: string;
    state: string;
    progress: { done: number; total: number };
    unitsCharged: number;
    result: { count: number; unitsCharged: number; rows: PointSummary[] };
  };
}

let live: LiveServer;
let ebullio: EbullioClient;

beforeAll(async () => {
  live = await startLiveServer();
  ebullio = createEbullioClient({ baseUrl: live.baseUrl, apiKey: live.apiKey });
});
afterAll(async () => {
  await live.close();
});

async function single(body: Schema<'SingleEffectRequest'>): Promise<Schema<'SingleEffectResponse'>> {
  const { data, error } = await ebullio.POST('/v1/evaporators/single-effect', { body });
  if (!data) throw new Error(`single call refused: ${JSON.stringify(error)}`);
  return data;
}

describe('the Python worked example', () => {
  it('prints a design and a pressure sweep whose numbers equal the server’s single calls', async () => {
    const { stdout } = await run(
      PYTHON,
      ['worked_example.py', '--base-url', live.baseUrl, '--api-key', live.apiKey],
      { cwd: EXAMPLE_DIR, env: pythonEnv, timeout: 60_000 },
    );
    const summary = JSON.parse(stdout) as Summary;

    const design = await single(summary.design.request);
    expect(summary.design.result).toEqual({
      area: design.area,
      steamMassFlow: design.steam.massFlow,
      vaporMassFlow: design.vapor.massFlow,
      productMassFlow: design.product.massFlow,
      steamEconomy: design.steamEconomy,
      boilingPointRise: design.boilingPointRise,
      temperatureDifference: design.temperatureDifference,
      duty: design.duty,
      warnings: design.warnings.map((w) => w.code),
    });
    expect(summary.cautions).toEqual(design.cautions.map((c) => c.code));
    expect(summary.cautions).toContain('vacuum-equipment');

    const sweep = summary.pressureSweep.result;
    expect(sweep).toMatchObject({ count: 5, succeeded: 5, failed: 0, unitsCharged: 25 });
    expect(sweep.rows.map((r) => r.values['body.pressure'])).toEqual([15, 20, 25, 30, 35]);
    const base = summary.pressureSweep.request.base;
    for (const row of sweep.rows) {
      const point = await single({ ...base, body: { ...base.body, pressure: row.values['body.pressure']! } });
      expect(row).toEqual({
        values: row.values,
        status: 'ok',
        area: point.area,
        steamEconomy: point.steamEconomy,
        steamMassFlow: point.steam.massFlow,
      });
    }
    expect(sweep.smallestArea.area).toBe(Math.min(...sweep.rows.map((r) => r.area!)));

    // Its calls were metered to the invented account: one design (5 units), one sweep of 5 points,
    // then the job: its 202 at 0 units and its points as they completed (20 points of 5 units).
    const usage = await usageRows(live.harness.store);
    expect(usage.slice(0, 3)).toMatchObject([
      { operation: 'evaporators.single-effect', status: 200, units: 5 },
      { operation: 'sweeps.run', status: 200, units: 25 },
      { operation: 'sweeps.run', status: 202, units: 0 },
    ]);
    const chunks = usage.filter((row) => row.request_id.startsWith(`${summary.job.id}:`));
    expect(chunks.reduce((sum, row) => sum + row.units, 0)).toBe(100);

    // The job: asked with Prefer: respond-async, polled to its end, its result the sweep's own.
    const job = summary.job;
    expect(job).toMatchObject({
      async: true,
      state: 'succeeded',
      progress: { done: 20, total: 20 },
      unitsCharged: 100,
    });
    const { data: direct } = await ebullio.POST('/v1/sweeps', { body: job.request });
    // 200 with the rows (a sweep above the job threshold would answer 202 with a job instead).
    if (!direct || typeof direct === 'string' || !('rows' in direct)) throw new Error('no rows answered');
    expect(job.result.count).toBe(20);
    expect(job.result.rows).toEqual(
      direct.rows.map((row) => {
        const result = row.result as Schema<'SingleEffectResponse'>;
        return {
          values: row.values,
          status: row.status,
          area: result.area,
          steamEconomy: result.steamEconomy,
          steamMassFlow: result.steam.massFlow,
        };
      }),
    );
  });

  it('raises a refused request as a problem that names the field, and exits 1 with it', async () => {
    const script = [
      'import json, sys',
      'from ebullio_client import EbullioClient, EbullioProblem',
      'c = EbullioClient(sys.argv[1], sys.argv[2])',
      'body = {"liquor": "sucrose", "feed": {"massFlow": 2, "massFraction": "120 %", "temperature": 50},',
      '        "product": {"massFraction": 0.4}, "steam": {"pressure": 200},',
      '        "body": {"pressure": 20, "overallHeatTransferCoefficient": 1500}}',
      'try:',
      '    c.single_effect(body)',
      'except EbullioProblem as p:',
      '    print(json.dumps({"status": p.status, "type": p.type, "fields": p.fields, "detail": p.detail}))',
      '    sys.exit(1)',
    ].join('\n');
    const failed = await run(PYTHON, ['-c', script, live.baseUrl, live.apiKey], {
      cwd: EXAMPLE_DIR,
      env: pythonEnv,
      timeout: 30_000,
    }).then(
      () => undefined,
      (e: { code: number; stdout: string }) => e,
    );
    expect(failed?.code).toBe(1);
    const problem = JSON.parse(failed!.stdout) as {
      status: number;
      type: string;
      fields: string[];
      detail: string;
    };
    expect(problem).toMatchObject({
      status: 422,
      type: '/problems/validation-failed',
      fields: ['feed.massFraction'],
    });
    expect(problem.detail).toMatch(/between 0 and 1/);
  });

  it('says which server it cannot reach and exits 1, without a traceback', async () => {
    // Port 1 on loopback: nothing listens there, so the connection is refused at once.
    const failed = await run(
      PYTHON,
      ['worked_example.py', '--base-url', 'http://127.0.0.1:1', '--api-key', live.apiKey],
      { cwd: EXAMPLE_DIR, env: pythonEnv, timeout: 30_000 },
    ).then(
      () => undefined,
      (e: { code: number; stderr: string }) => e,
    );
    expect(failed?.code).toBe(1);
    expect(failed?.stderr).toMatch(/cannot reach http:\/\/127\.0\.0\.1:1/);
    expect(failed?.stderr).not.toMatch(/Traceback/);
  });

  it('refuses to start without a key and says how to give one', async () => {
    const failed = await run(PYTHON, ['worked_example.py', '--base-url', live.baseUrl], {
      cwd: EXAMPLE_DIR,
      env: pythonEnv,
      timeout: 30_000,
    }).then(
      () => undefined,
      (e: { code: number; stderr: string }) => e,
    );
    expect(failed?.code).toBe(2);
    expect(failed?.stderr).toMatch(/--api-key or EBULLIO_API_KEY/);
  });
});
