// Console overview: today / this month, error rate, p95 latency by the nearest-rank method,
// top operations, accounts near quota, 30-day series; developer scoping.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKey } from '../../server/accounts/keys.js';
import { nearestRank, overview } from '../../server/accounts/usage-report.js';
import { makeConsoleHarness, meter, type ConsoleHarness } from './data-harness.js';

let h: ConsoleHarness;

beforeAll(async () => {
  h = await makeConsoleHarness();
  const a = (
    await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'a',
      scopes: ['steam'],
      now: h.clock.now,
    })
  ).key.id;
  const b = (
    await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.betaId,
      name: 'b',
      scopes: ['steam'],
      now: h.clock.now,
    })
  ).key.id;
  // Alpha today: latencies 15, 20, 35, 40, 50 ms (the list of the nearest-rank example below),
  // 850 units in all (85 % of its 1000 quota), one 500.
  const alpha = [15, 20, 35, 40, 50];
  for (const [i, latencyMs] of alpha.entries()) {
    await meter(h, {
      accountId: h.alphaId,
      keyId: a,
      latencyMs,
      units: 170,
      status: i === 4 ? 500 : 200,
      operation: i < 3 ? 'steam.state' : 'liquors.enthalpy',
    });
  }
  // Beta, 2 March: 20 requests, latencies 1..20 ms, 10 units each (200 of 500 = 40 %).
  for (let i = 1; i <= 20; i++) {
    await meter(h, {
      accountId: h.betaId,
      keyId: b,
      at: new Date(Date.UTC(2031, 2, 2, 8)),
      latencyMs: i,
      units: 10,
      status: i <= 5 ? 404 : 200,
    });
  }
  // Last month: outside every "this month" figure, inside the 30-day series (14 Feb … 14 Mar).
  await meter(h, {
    accountId: h.betaId,
    keyId: b,
    at: new Date(Date.UTC(2031, 1, 20, 8)),
    latencyMs: 9999,
    units: 1,
  });
});
afterAll(async () => {
  await h.close();
});

describe('nearest-rank percentile', () => {
  it('reproduces the worked nearest-rank example (list 15, 20, 35, 40, 50)', () => {
    // Wikipedia, "Percentile", nearest-rank method worked example (from memory): for the
    // ordered list 15, 20, 35, 40, 50 the 5th, 30th, 40th, 50th and 100th percentiles are
    // 15, 20, 20, 35, 50, i.e. ranks 1, 2, 2, 3, 5 (rank = ⌈P/100 · N⌉).
    expect([5, 30, 40, 50, 100].map((p) => nearestRank(p, 5))).toEqual([1, 2, 2, 3, 5]);
  });
});

describe('GET /console-api/overview', () => {
  it('gives an admin this month’s totals, error rate and the nearest-rank p95 over all accounts', async () => {
    const res = await h.admin.agent.get('/console-api/overview').expect(200);
    expect(res.body.month).toBe('2031-03');
    expect(res.body.today).toEqual({ requests: 5, units: 850, errors: 1 });
    expect(res.body.thisMonth).toEqual({ requests: 25, units: 1050, errors: 6 });
    // 6 errors of 25 requests (status ≥ 400 share).
    expect(res.body.errorRate).toBeCloseTo(6 / 25, 12);
    // 25 latencies: 1..20 and 15, 20, 35, 40, 50. Nearest rank ⌈0.95 · 25⌉ = 24 → sorted[23] = 40.
    expect(res.body.p95LatencyMs).toBe(40);
  });

  it('lists accounts at or above 80 % of their quota, and the top operations', async () => {
    const res = await h.admin.agent.get('/console-api/overview').expect(200);
    // 850 of 1000 units = 85 %; Beta at 40 % is not listed.
    expect(res.body.nearQuota).toEqual([
      {
        accountId: h.alphaId,
        accountName: 'Invented Alpha Works',
        unitsUsed: 850,
        monthlyUnitQuota: 1000,
        percent: 85,
      },
    ]);
    expect(res.body.topOperations[0]).toMatchObject({ operation: 'steam.state', requests: 23 });
  });

  it('gives a 30-day series ending today, zero-filled, oldest first', async () => {
    const res = await h.billing.agent.get('/console-api/overview').expect(200);
    const daily = res.body.daily as { day: string; requests: number }[];
    expect(daily).toHaveLength(30);
    // 14 March 2031 minus 29 days = 13 February 2031 (calendar arithmetic; February 2031 has 28 days).
    expect(daily[0]!.day).toBe('2031-02-13');
    expect(daily.at(-1)).toMatchObject({ day: '2031-03-14', requests: 5 });
    expect(daily.find((d) => d.day === '2031-03-02')?.requests).toBe(20);
    expect(daily.find((d) => d.day === '2031-02-20')?.requests).toBe(1);
    expect(daily.filter((d) => d.requests === 0)).toHaveLength(27);
  });

  it('shows a developer only their account’s figures and refuses another account', async () => {
    const res = await h.developer.agent.get('/console-api/overview').expect(200);
    expect(res.body.thisMonth).toEqual({ requests: 5, units: 850, errors: 1 });
    // Alpha alone: ⌈0.95 · 5⌉ = 5 → 50 ms (the example list above).
    expect(res.body.p95LatencyMs).toBe(50);
    await h.developer.agent.get(`/console-api/overview?accountId=${h.betaId}`).expect(403);
  });

  it('reports no error rate and no p95 for a month without requests', async () => {
    // Service level: moving the clock a month on would end the console session.
    const may = await overview(h.deps.store, new Date('2031-05-02T00:00:00Z'), null, {
      nearQuotaPercent: 80,
      days: 30,
      topOperations: 5,
    });
    expect(may).toMatchObject({
      errorRate: null,
      p95LatencyMs: null,
      thisMonth: { requests: 0, units: 0, errors: 0 },
      topOperations: [],
    });
  });
});
