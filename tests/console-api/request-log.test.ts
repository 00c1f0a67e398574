// Console request-log routes: server-side paging, sort and filters on seeded rows, detail with
// bodies and timings, CSV export (RFC 4180), developer scoping.
import { parse as parseCsv } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKey } from '../../server/accounts/keys.js';
import { REQUEST_LOG_CSV_COLUMNS } from '../../shared/console/request-log.js';
import { makeConsoleHarness, meter, type ConsoleHarness } from './data-harness.js';

let h: ConsoleHarness;
let alphaKey: number;
let betaKey: number;

/** The seeded rows: [account, minute, status, latency, operation]. */
const SEED: ['alpha' | 'beta', number, number, number, string][] = [
  ['alpha', 1, 200, 12, 'steam.state'],
  ['alpha', 2, 200, 40, 'steam.saturation'],
  ['alpha', 3, 404, 3, 'liquors.get'],
  ['alpha', 4, 422, 7, 'steam.state'],
  ['alpha', 5, 200, 95, 'evaporators.multiple-effect'],
  ['alpha', 6, 429, 1, 'steam.state'],
  ['alpha', 7, 500, 30, 'steam.state'],
  ['beta', 8, 200, 22, 'steam.state'],
  ['beta', 9, 401, 2, 'steam.state'],
  ['beta', 10, 200, 61, 'liquors.list'],
  ['beta', 11, 200, 18, 'steam.saturation'],
  ['beta', 12, 404, 5, 'liquors.get'],
];
const at = (minute: number) => new Date(Date.UTC(2031, 2, 14, 9, minute));

beforeAll(async () => {
  h = await makeConsoleHarness();
  alphaKey = (
    await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'a',
      scopes: ['steam'],
      now: h.clock.now,
    })
  ).key.id;
  betaKey = (
    await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.betaId,
      name: 'b',
      scopes: ['steam'],
      now: h.clock.now,
    })
  ).key.id;
  for (const [acct, minute, status, latencyMs, operation] of SEED) {
    await meter(h, {
      accountId: acct === 'alpha' ? h.alphaId : h.betaId,
      keyId: acct === 'alpha' ? alphaKey : betaKey,
      at: at(minute),
      status,
      latencyMs,
      operation,
      requestId: `seed-${minute}`,
      units: status < 400 ? 2 : 0,
      requestBody: minute === 1 ? '{"pressure":"101.325 kPa","apiKey":"[redacted]"}' : null,
      responseBody: minute === 1 ? '{"temperature":99.97}' : null,
      // A path with a comma and a quote, to exercise CSV quoting.
      path: minute === 2 ? '/v1/steam/saturation?p=1,"2"' : '/v1/steam/state',
    });
  }
});
afterAll(async () => {
  await h.close();
});

type Item = {
  id: number;
  requestId: string;
  status: number;
  latencyMs: number;
  at: string;
  operation: string;
  accountId: number;
};
const items = (body: unknown) => (body as { items: Item[] }).items;

describe('GET /console-api/request-log paging and sorting', () => {
  it('pages through every row exactly once, newest first, with the total', async () => {
    const seen: string[] = [];
    for (const page of [1, 2, 3]) {
      const res = await h.admin.agent.get(`/console-api/request-log?page=${page}&pageSize=5`).expect(200);
      expect(res.body).toMatchObject({ total: 12, page, pageSize: 5 });
      seen.push(...items(res.body).map((i) => i.requestId));
    }
    // Newest first: minutes 12 down to 1.
    expect(seen).toEqual(SEED.map((s) => `seed-${s[1]}`).reverse());
    const beyond = await h.admin.agent.get('/console-api/request-log?page=4&pageSize=5').expect(200);
    expect(items(beyond.body)).toEqual([]);
  });

  it('sorts by latency ascending and by status descending', async () => {
    const lat = items(
      (await h.admin.agent.get('/console-api/request-log?sort=latency&order=asc&pageSize=200').expect(200))
        .body,
    );
    expect(lat.map((i) => i.latencyMs)).toEqual(SEED.map((s) => s[3]).sort((a, b) => a - b));
    const st = items(
      (await h.admin.agent.get('/console-api/request-log?sort=status&order=desc&pageSize=200').expect(200))
        .body,
    );
    expect(st.map((i) => i.status)).toEqual(SEED.map((s) => s[2]).sort((a, b) => b - a));
  });

  it('rejects a page size above 200 and an unknown sort key', async () => {
    const res = await h.admin.agent.get('/console-api/request-log?pageSize=201').expect(422);
    // The field names the query parameter as the caller sent it.
    expect(res.body.errors[0].field).toBe('query.pageSize');
    await h.admin.agent.get('/console-api/request-log?sort=path').expect(422);
  });
});

describe('GET /console-api/request-log filters', () => {
  it('filters by status class 4xx (400–499, RFC 9110 §15) and by an exact status', async () => {
    const cls = items(
      (await h.admin.agent.get('/console-api/request-log?status=4xx&pageSize=200').expect(200)).body,
    );
    expect(cls.map((i) => i.status).sort()).toEqual(
      SEED.filter((s) => s[2] >= 400 && s[2] < 500)
        .map((s) => s[2])
        .sort(),
    );
    const exact = items((await h.admin.agent.get('/console-api/request-log?status=404').expect(200)).body);
    expect(exact.map((i) => i.requestId).sort()).toEqual(['seed-12', 'seed-3']);
    await h.admin.agent.get('/console-api/request-log?status=4x').expect(422);
  });

  it('filters by operation (from the metered usage event), key, time window and request id', async () => {
    const op = items(
      (await h.admin.agent.get('/console-api/request-log?operation=liquors.get').expect(200)).body,
    );
    expect(op.map((i) => i.requestId).sort()).toEqual(['seed-12', 'seed-3']);
    const key = await h.admin.agent.get(`/console-api/request-log?keyId=${betaKey}`).expect(200);
    expect(key.body.total).toBe(5);
    // from inclusive, to exclusive: minutes 3, 4, 5.
    const win = items(
      (
        await h.admin.agent
          .get(`/console-api/request-log?from=${at(3).toISOString()}&to=${at(6).toISOString()}&order=asc`)
          .expect(200)
      ).body,
    );
    expect(win.map((i) => i.requestId)).toEqual(['seed-3', 'seed-4', 'seed-5']);
    const rid = items(
      (await h.admin.agent.get('/console-api/request-log?requestId=seed-7').expect(200)).body,
    );
    expect(rid).toHaveLength(1);
    expect(rid[0]).toMatchObject({ status: 500, latencyMs: 30, operation: 'steam.state', units: 0 });
  });

  it('shows a developer only their account’s rows and refuses another account with 403', async () => {
    const res = await h.developer.agent.get('/console-api/request-log?pageSize=200').expect(200);
    expect(res.body.total).toBe(7);
    expect(new Set(items(res.body).map((i) => i.accountId))).toEqual(new Set([h.alphaId]));
    await h.developer.agent.get(`/console-api/request-log?accountId=${h.betaId}`).expect(403);
  });
});

describe('GET /console-api/request-log/:id', () => {
  it('gives the redacted bodies as stored and the timings', async () => {
    const first = items(
      (await h.admin.agent.get('/console-api/request-log?requestId=seed-1').expect(200)).body,
    )[0]!;
    const res = await h.developer.agent.get(`/console-api/request-log/${first.id}`).expect(200);
    expect(res.body).toMatchObject({
      requestBody: '{"pressure":"101.325 kPa","apiKey":"[redacted]"}',
      responseBody: '{"temperature":99.97}',
      bodiesRetained: true,
      engineVersion: 'test-engine',
      // 09:01:00.000 minus 12 ms latency (arithmetic on the seeded row).
      timings: {
        receivedAt: '2031-03-14T09:00:59.988Z',
        completedAt: '2031-03-14T09:01:00.000Z',
        latencyMs: 12,
      },
    });
  });

  it('names the account and the key of an entry, in the detail and in the list', async () => {
    const listed = items(
      (await h.developer.agent.get('/console-api/request-log?requestId=seed-1').expect(200)).body,
    )[0]! as Item & { accountName: string; keyName: string };
    const res = await h.developer.agent.get(`/console-api/request-log/${listed.id}`).expect(200);
    // The names given in data-harness.ts and in beforeAll above.
    const accountName = 'Invented Alpha Works';
    expect(res.body).toMatchObject({ keyId: alphaKey, keyName: 'a', accountName });
    expect(listed).toMatchObject({ keyName: 'a', accountName });
  });

  it('refuses a developer another account’s entry (403) and answers 404 for an unknown id', async () => {
    const beta = items(
      (await h.admin.agent.get('/console-api/request-log?requestId=seed-8').expect(200)).body,
    )[0]!;
    await h.developer.agent.get(`/console-api/request-log/${beta.id}`).expect(403);
    await h.admin.agent.get('/console-api/request-log/99999').expect(404);
  });
});

describe('GET /console-api/request-log/export.csv', () => {
  it('exports the filtered rows as RFC 4180 CSV: header, CRLF record ends, quoted comma and doubled quote', async () => {
    const res = await h.billing.agent
      .get(`/console-api/request-log/export.csv?accountId=${h.alphaId}&order=asc`)
      .expect(200);
    // RFC 4180 §3 registers text/csv; §2 rules 1, 3, 6, 7 for the record and quoting rules.
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toContain('attachment');
    const text = res.text;
    expect(text.split('\r\n')[0]).toBe(REQUEST_LOG_CSV_COLUMNS.join(','));
    expect(text).toContain('"/v1/steam/saturation?p=1,""2"""');
    expect(text.replace(/\r\n/g, '')).not.toContain('\n');
    // Read back with an independent RFC 4180 parser (csv-parse).
    const rows = parseCsv(text, { columns: true }) as Record<string, string>[];
    expect(rows).toHaveLength(7);
    expect(rows[1]).toMatchObject({
      requestId: 'seed-2',
      path: '/v1/steam/saturation?p=1,"2"',
      status: '200',
      latencyMs: '40',
      operation: 'steam.saturation',
    });
    expect(rows[0]!.at).toBe('2031-03-14T09:01:00.000Z');
  });

  it('neutralises a cell that a spreadsheet would run as a formula', async () => {
    await meter(h, {
      accountId: h.alphaId,
      keyId: alphaKey,
      at: at(30),
      requestId: '-2+3',
      path: '/v1/steam/state',
    });
    const res = await h.admin.agent.get('/console-api/request-log/export.csv?requestId=-2%2B3').expect(200);
    // OWASP "CSV Injection": prefix cells starting with = + - @ with a single quote.
    const rows = parseCsv(res.text, { columns: true }) as Record<string, string>[];
    expect(rows[0]!.requestId).toBe("'-2+3");
  });

  it('applies the developer’s scope to the export too', async () => {
    await h.developer.agent.get(`/console-api/request-log/export.csv?accountId=${h.betaId}`).expect(403);
    const res = await h.developer.agent.get('/console-api/request-log/export.csv').expect(200);
    const rows = parseCsv(res.text, { columns: true }) as Record<string, string>[];
    expect(new Set(rows.map((r) => r.accountId))).toEqual(new Set([String(h.alphaId)]));
  });
});
