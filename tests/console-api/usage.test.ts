// Console usage routes: totals and groupings from usage_daily over a day range (UTC, `to`
// inclusive), CSV export, developer scoping.
import { parse as parseCsv } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKey } from '../../server/accounts/keys.js';
import { USAGE_CSV_COLUMNS } from '../../shared/console/usage.js';
import { makeConsoleHarness, meter, type ConsoleHarness } from './data-harness.js';

let h: ConsoleHarness;
const day = (d: number, hour = 12) => new Date(Date.UTC(2031, 2, d, hour));

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
  // Alpha: 3 requests on 1 March (one error), 2 on 13 March; Beta: 4 on 13 March; one in February.
  await meter(h, { accountId: h.alphaId, keyId: a, at: day(1), units: 5 });
  await meter(h, { accountId: h.alphaId, keyId: a, at: day(1, 23), units: 5, operation: 'liquors.enthalpy' });
  await meter(h, { accountId: h.alphaId, keyId: a, at: day(1), units: 0, status: 422 });
  await meter(h, { accountId: h.alphaId, keyId: a, at: day(13), units: 7 });
  await meter(h, { accountId: h.alphaId, keyId: a, at: day(13), units: 1, operation: 'liquors.enthalpy' });
  for (let i = 0; i < 4; i++) await meter(h, { accountId: h.betaId, keyId: b, at: day(13), units: 10 });
  await meter(h, { accountId: h.alphaId, keyId: a, at: new Date(Date.UTC(2031, 1, 28, 23, 59)), units: 100 });
});
afterAll(async () => {
  await h.close();
});

type Row = { group: string; label: string; requests: number; units: number; errors: number };

describe('GET /console-api/usage', () => {
  it('defaults to this calendar month up to today and groups by day', async () => {
    const res = await h.admin.agent.get('/console-api/usage').expect(200);
    expect(res.body).toMatchObject({
      from: '2031-03-01',
      to: '2031-03-14',
      groupBy: 'day',
      accountIds: null,
    });
    expect(res.body.rows as Row[]).toEqual([
      { group: '2031-03-01', label: '2031-03-01', requests: 3, units: 10, errors: 1 },
      { group: '2031-03-13', label: '2031-03-13', requests: 6, units: 48, errors: 0 },
    ]);
    // Sums of the seeded rows: 9 requests, 58 units, 1 error (February excluded).
    expect(res.body.totals).toEqual({ requests: 9, units: 58, errors: 1 });
  });

  it('groups by operation and by account; `to` is inclusive', async () => {
    const op = await h.admin.agent
      .get('/console-api/usage?groupBy=operation&from=2031-03-01&to=2031-03-01')
      .expect(200);
    expect((op.body.rows as Row[]).map((r) => [r.group, r.requests, r.units])).toEqual([
      ['liquors.enthalpy', 1, 5],
      ['steam.state', 2, 5],
    ]);
    const acct = await h.billing.agent
      .get('/console-api/usage?groupBy=account&from=2031-02-01&to=2031-03-31')
      .expect(200);
    expect((acct.body.rows as Row[]).map((r) => [r.label, r.units])).toEqual([
      ['Invented Alpha Works', 118],
      ['Invented Beta Mills', 40],
    ]);
  });

  it('limits a developer to their accounts and refuses another account with 403', async () => {
    const res = await h.developer.agent.get('/console-api/usage?groupBy=account').expect(200);
    expect(res.body.accountIds).toEqual([h.alphaId]);
    expect((res.body.rows as Row[]).map((r) => r.group)).toEqual([String(h.alphaId)]);
    await h.developer.agent.get(`/console-api/usage?accountId=${h.betaId}`).expect(403);
  });

  it('rejects a reversed range, an impossible date and more than 400 days', async () => {
    await h.admin.agent.get('/console-api/usage?from=2031-03-10&to=2031-03-01').expect(422);
    // ISO 8601 calendar date: there is no 30 February.
    await h.admin.agent.get('/console-api/usage?from=2031-02-30').expect(422);
    await h.admin.agent.get('/console-api/usage?from=2029-01-01&to=2031-03-01').expect(422);
  });
});

describe('GET /console-api/usage/export.csv', () => {
  it('exports one RFC 4180 row per day, account and operation', async () => {
    const res = await h.admin.agent
      .get('/console-api/usage/export.csv?from=2031-03-01&to=2031-03-14')
      .expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.text.split('\r\n')[0]).toBe(USAGE_CSV_COLUMNS.join(','));
    const rows = parseCsv(res.text, { columns: true }) as Record<string, string>[];
    expect(
      rows.map((r) => `${r.day} ${r.accountName} ${r.operation} ${r.requests} ${r.units} ${r.errors}`),
    ).toEqual([
      '2031-03-01 Invented Alpha Works liquors.enthalpy 1 5 0',
      '2031-03-01 Invented Alpha Works steam.state 2 5 1',
      '2031-03-13 Invented Alpha Works liquors.enthalpy 1 1 0',
      '2031-03-13 Invented Alpha Works steam.state 1 7 0',
      '2031-03-13 Invented Beta Mills steam.state 4 40 0',
    ]);
  });
});
