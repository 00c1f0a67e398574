// The generated TypeScript client (openapi/client) against a listening server: what a tool that
// embeds Ebullio does. The scenario is invented: a juice concentrator of a small fruit-syrup plant.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  createEbullioClient,
  isProblem,
  type EbullioClient,
  type Schema,
} from '../../openapi/client/index.js';
import { usageRows } from '../http/helpers.js';
import { startLiveServer, type LiveServer } from './live-server.js';

const design: Schema<'SingleEffectRequest'> = {
  liquor: 'sucrose',
  feed: { massFlow: '6 t/h', massFraction: '15 %', temperature: '60 degC' },
  product: { massFraction: '45 %' },
  steam: { pressure: '1.5 barg' },
  body: { pressure: '30 kPa', overallHeatTransferCoefficient: 1600 },
};

let live: LiveServer;
let ebullio: EbullioClient;

beforeAll(async () => {
  live = await startLiveServer();
  ebullio = createEbullioClient({ baseUrl: live.baseUrl, apiKey: live.apiKey });
});
afterAll(async () => {
  await live.close();
});

describe('the TypeScript client on a live server', () => {
  it('designs a single effect whose answer closes its mass and solute balances, metered to the key', async () => {
    const { data, error, response } = await ebullio.POST('/v1/evaporators/single-effect', { body: design });
    expect(error).toBeUndefined();
    expect(response.status).toBe(200);
    if (!data) throw new Error('no result');
    expect(data.mode).toBe('design');
    // 6 t/h = 1.6667 kg/s at 15 %, concentrated to 45 %: a third of the feed leaves as product.
    expect(data.feed.massFlow).toBeCloseTo(6000 / 3600, 9);
    expect(data.product.massFlow).toBeCloseTo((6000 / 3600) * (0.15 / 0.45), 9);
    expect(data.feed.massFlow).toBeCloseTo(data.product.massFlow + data.vapor.massFlow, 9);
    expect(data.area).toBeGreaterThan(0);
    expect(data.steamEconomy).toBeCloseTo(data.vapor.massFlow / data.steam.massFlow, 6);
    // The bearer key the client sent is the invented account's: the call is on its usage.
    const usage = await usageRows(live.harness.store);
    expect(usage.at(-1)).toMatchObject({ operation: 'evaporators.single-effect', status: 200, units: 5 });
  });

  it('runs a sweep as a job: 202 with its Location, polled to its end, its result the sweep answered at once', async () => {
    const sweep: Schema<'SweepRequest'> = {
      operation: 'single-effect',
      base: design,
      vary: [{ field: 'body.pressure', from: 15, to: 40, steps: 6 }],
    };
    const started = await ebullio.POST('/v1/sweeps', {
      body: sweep,
      headers: { Prefer: 'respond-async' },
    });
    expect(started.response.status).toBe(202);
    expect(started.response.headers.get('Preference-Applied')).toBe('respond-async');
    const accepted = started.data;
    if (!accepted || !('state' in accepted)) throw new Error('no job answered');
    expect(started.response.headers.get('Location')).toBe(`/v1/jobs/${accepted.id}`);

    // Polled with a generous deadline: the job runs beside the test on a shared machine.
    let job = accepted;
    const deadline = Date.now() + 30_000;
    while (job.state === 'queued' || job.state === 'running') {
      if (Date.now() > deadline) throw new Error(`job still ${job.state}`);
      await new Promise((resolve) => setTimeout(resolve, 50));
      const polled = await ebullio.GET('/v1/jobs/{jobId}', { params: { path: { jobId: accepted.id } } });
      if (!polled.data) throw new Error(`poll refused: ${JSON.stringify(polled.error)}`);
      job = polled.data;
    }
    expect(job).toMatchObject({ state: 'succeeded', progress: { done: 6, total: 6 }, unitsCharged: 30 });

    const result = await ebullio.GET('/v1/jobs/{jobId}/result', {
      params: { path: { jobId: accepted.id } },
    });
    const direct = await ebullio.POST('/v1/sweeps', { body: sweep });
    expect(direct.response.status).toBe(200);
    expect(result.data).toEqual(direct.data);
  });

  it('sweeps the body pressure, and every point equals the single call through the same client', async () => {
    const pressures = [20, 25, '30 kPa', '0.4 bar'];
    const { data, error } = await ebullio.POST('/v1/sweeps', {
      body: {
        operation: 'single-effect',
        base: design,
        vary: [{ field: 'body.pressure', values: pressures }],
      },
    });
    expect(error).toBeUndefined();
    // 200 with the rows: a sweep this small is answered at once (a job answers 202 instead).
    if (!data || !('rows' in data)) throw new Error('no sweep rows');
    expect(data).toMatchObject({
      operation: 'single-effect',
      count: 4,
      succeeded: 4,
      failed: 0,
      unitsCharged: 20,
    });
    expect(data.rows.map((r) => r.values['body.pressure'])).toEqual(pressures);
    for (const [i, row] of data.rows.entries()) {
      const single = await ebullio.POST('/v1/evaporators/single-effect', {
        body: { ...design, body: { ...design.body, pressure: pressures[i]! } },
      });
      if (!single.data) throw new Error(`point ${i}: no single result`);
      // Cautions and provenance are the same for every point and given once at the sweep's top.
      const { cautions, provenance, ...rest } = single.data;
      expect(row.status).toBe('ok');
      expect(row.result).toEqual(rest);
      expect(data.cautions).toEqual(cautions);
      expect(data.provenance).toEqual(provenance);
    }
    // A higher body pressure boils hotter: less temperature difference, more area.
    const areas = data.rows.map((r) => (r.result as Schema<'SingleEffectResponse'>).area);
    expect([...areas].sort((a, b) => a - b)).toEqual(areas);
  });

  it('reads a refused mass fraction as an RFC 9457 problem naming the field and its range', async () => {
    const { data, error, response } = await ebullio.POST('/v1/evaporators/single-effect', {
      body: { ...design, feed: { ...design.feed, massFraction: '120 %' } },
    });
    expect(data).toBeUndefined();
    expect(response.status).toBe(422);
    expect(response.headers.get('content-type')).toMatch(/^application\/problem\+json/);
    expect(isProblem(error)).toBe(true);
    expect(error).toMatchObject({ type: '/problems/validation-failed', status: 422 });
    expect(error?.errors?.[0]).toMatchObject({ field: 'feed.massFraction', value: '120 %' });
    expect(error?.detail).toMatch(/between 0 and 1/);
  });

  it('does not compile a body of the wrong type, which the server would refuse too', async () => {
    const { error, response } = await ebullio.POST('/v1/evaporators/single-effect', {
      body: {
        ...design,
        // @ts-expect-error a mass fraction is a number or a string with a unit, never a boolean
        feed: { ...design.feed, massFraction: true },
      },
    });
    expect(response.status).toBe(422);
    expect(error?.errors?.[0]).toMatchObject({ field: 'feed.massFraction', value: true });
  });

  it('answers a wrong key with the 401 problem and charges nothing', async () => {
    const before = (await usageRows(live.harness.store)).length;
    const stranger = createEbullioClient({
      baseUrl: live.baseUrl,
      apiKey: 'ebk1.Invented0000.0123456789abcdefghijklmnopqrstuv',
    });
    const { error, response } = await stranger.POST('/v1/evaporators/single-effect', { body: design });
    expect(response.status).toBe(401);
    expect(response.headers.get('www-authenticate')).toMatch(/^Bearer/);
    expect(error).toMatchObject({ type: '/problems/unauthorized', status: 401 });
    expect((await usageRows(live.harness.store)).length).toBe(before);
  });

  it('refuses a key that would break the Authorization header before sending anything', () => {
    expect(() => createEbullioClient({ baseUrl: live.baseUrl, apiKey: 'ebk1.a b' })).toThrow(
      /printable ASCII/,
    );
    expect(() => createEbullioClient({ baseUrl: live.baseUrl, apiKey: 'ebk1.a\r\nX-Evil: 1' })).toThrow();
    expect(() => createEbullioClient({ baseUrl: 'ftp://example.test', apiKey: 'ebk1.a' })).toThrow(/http/);
  });
});
