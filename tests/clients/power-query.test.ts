// The spreadsheet recipe (openapi/examples/power-query/cases.pq): the request its literals describe
// (URL, headers, body built from the sample table by the rule at the top of the script) is read
// from the script's text and sent to a listening server, which must answer every case.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createKey } from '../../server/accounts/keys.js';
import { createEbullioClient, type Schema } from '../../openapi/client/index.js';
import { usageRows } from '../http/helpers.js';
import { startLiveServer, type LiveServer } from './live-server.js';
import { isTable, readMBinding, readMLiteral, type MRecord, type MValue } from './m-literals.js';

const SCRIPT = readFileSync(new URL('../../openapi/examples/power-query/cases.pq', import.meta.url), 'utf8');

/** `target` with `value` at the dotted `path`, records made on the way (the script's SetPath). */
function setPath(target: MRecord, path: string[], value: MValue): MRecord {
  const [name, ...rest] = path;
  const inner =
    rest.length === 0 ? value : setPath({ ...((target[name!] as MRecord | undefined) ?? {}) }, rest, value);
  return { ...target, [name!]: inner };
}

/** The request the script makes for its sample table, by the rule written at its top. */
function scriptRequest(baseUrl: string, apiKey: string) {
  const apiPath = readMBinding(SCRIPT, 'ApiPath') as string;
  const headers = readMBinding(SCRIPT, 'RequestHeaders') as Record<string, string>;
  const fixed = readMBinding(SCRIPT, 'Fixed') as MRecord;
  const columns = readMBinding(SCRIPT, 'Columns') as [string, string, string][];
  const sample = readMBinding(SCRIPT, 'SampleCases');
  if (!isTable(sample)) throw new Error('SampleCases is not a #table');
  const rows = sample.rows.map((cells) => Object.fromEntries(sample.columns.map((c, i) => [c, cells[i]!])));
  const cases = rows.map((row) =>
    columns.reduce<MRecord>((acc, [column, field, unit]) => {
      const cell = row[column];
      if (cell === null || cell === undefined || cell === '') return acc;
      const text = typeof cell === 'number' ? `${cell} ${unit}` : String(cell).trim();
      return setPath(acc, field.split('.'), text);
    }, fixed),
  );
  return {
    url: `${baseUrl}/${apiPath}`,
    init: {
      method: 'POST',
      headers: { ...headers, Authorization: `Bearer ${apiKey}` },
      body: JSON.stringify({ operation: readMBinding(SCRIPT, 'Operation'), cases }),
    },
    rows,
    cases,
  };
}

let live: LiveServer;
beforeAll(async () => {
  live = await startLiveServer();
});
afterAll(async () => {
  await live.close();
});

describe('the Power Query recipe', () => {
  it('keeps its request in literals: the workbook’s table by default, POST to base URL and relative path', () => {
    const base = readMBinding(SCRIPT, 'BaseUrl') as string;
    expect(new URL(readMBinding(SCRIPT, 'ApiPath') as string, `${base}/`).href).toBe(
      'http://localhost:8080/v1/batch',
    );
    expect(readMBinding(SCRIPT, 'CaseSource')).toBe('Cases');
    expect(readMBinding(SCRIPT, 'RequestHeaders')).toEqual({
      'Content-Type': 'application/json',
      Accept: 'application/json',
    });
    // The key is not in the script: it comes from the workbook, after the literal headers.
    expect(SCRIPT).toMatch(/Headers = RequestHeaders & \[Authorization = "Bearer " & ApiKey\]/);
    expect(SCRIPT).toMatch(/RelativePath = ApiPath/);
    expect(SCRIPT).not.toMatch(/ebk1\./);
  });

  it('sends the sample table with a batch-only key as one batch, answered case by case as the single calls', async () => {
    // The recipe advises a key with only the batch scope in the workbook: it is enough.
    const h = live.harness;
    const { token: batchOnly } = await createKey(h.store, h.config.secret, {
      accountId: h.accountId,
      name: 'workbook key',
      scopes: ['batch'],
      rateLimitPerMinute: 60,
      now: h.clock.now,
    });
    const request = scriptRequest(live.baseUrl, batchOnly);
    expect(request.cases[1]).toEqual({
      liquor: 'sucrose',
      steam: { pressure: '1 barg' },
      feed: { massFlow: '8 t/h', massFraction: '12.5 %', temperature: '60 degC' },
      product: { massFraction: '40 %' },
      body: { pressure: '30 kPa', overallHeatTransferCoefficient: '1500 W/m2-K' },
    });

    const res = await fetch(request.url, request.init);
    expect(res.status).toBe(200);
    const batch = (await res.json()) as Schema<'BatchResponse'>;
    const n = request.rows.length;
    expect(n).toBe(4);
    expect(batch).toMatchObject({
      operation: 'single-effect',
      count: n,
      succeeded: n,
      failed: 0,
      unitsCharged: 5 * n,
    });
    expect(batch.results.map((r) => r.index)).toEqual([0, 1, 2, 3]);

    const ebullio = createEbullioClient({ baseUrl: live.baseUrl, apiKey: live.apiKey });
    for (const [i, row] of batch.results.entries()) {
      const single = await ebullio.POST('/v1/evaporators/single-effect', {
        body: request.cases[i] as unknown as Schema<'SingleEffectRequest'>,
      });
      if (!single.data) throw new Error(`case ${i}: the single call was refused`);
      expect(row.status).toBe('ok');
      // A batch names a request field of a warning under its case (cases[i].<field>).
      const unbased = (w: { field?: string }) => ({ ...w, field: w.field?.replace(/^cases\[\d+\]\./, '') });
      const { warnings, ...rest } = row.result as Schema<'SingleEffectResponse'>;
      expect(rest).toEqual({ ...single.data, warnings: undefined });
      expect(warnings.map(unbased)).toEqual(single.data.warnings.map(unbased));
    }
    const usage = await usageRows(live.harness.store);
    expect(usage[0]).toMatchObject({ operation: 'batch', status: 200, units: 5 * n });
  });

  it('reads from the answer only fields the answer has', async () => {
    const request = scriptRequest(live.baseUrl, live.apiKey);
    const batch = (await (await fetch(request.url, request.init)).json()) as Schema<'BatchResponse'>;
    const result = batch.results[0]!.result as Record<string, Record<string, unknown>>;
    // Every result[a] and result[a][b] the script's ResultRow reads is a number in the answer.
    const paths = [...SCRIPT.matchAll(/\bresult\[(\w+)\](?:\[(\w+)\])?/g)].map((m) => [m[1]!, m[2]] as const);
    expect(paths.length).toBeGreaterThanOrEqual(5);
    for (const [a, b] of paths) {
      const value = b === undefined ? result[a] : result[a]?.[b];
      expect(typeof value, `result[${a}]${b ? `[${b}]` : ''}`).toBe('number');
    }
    expect(SCRIPT).toMatch(/"warnings"/);
    expect(Array.isArray(result.warnings)).toBe(true);
    expect((result.cautions as unknown as { message: string }[])[0]?.message).toEqual(expect.any(String));
  });
});

describe('the reader of M literals', () => {
  it('reads text with its escapes, numbers, logicals, lists, records and tables between comments', () => {
    const literal = `[ a = "say ""hi""#(lf)#(#)(x)", #"b c" = { 1, -2.5e3, true, null /* none */ },
      // a table
      t = #table({"x", "y"}, {{1, "u"}, {2, "v"}}) ]`;
    expect(readMLiteral(literal)).toEqual({
      a: 'say "hi"\n#(x)',
      'b c': [1, -2500, true, null],
      t: {
        kind: 'table',
        columns: ['x', 'y'],
        rows: [
          [1, 'u'],
          [2, 'v'],
        ],
      },
    });
  });

  it('refuses an expression where a literal is expected', () => {
    expect(() => readMBinding('let\n    A = "x" & B,\n    B = 1\nin\n    A', 'A')).toThrow(
      /not a literal alone/,
    );
    expect(() => readMBinding('let\n    A = Text.From(1)\nin\n    A', 'A')).toThrow(/not a literal/);
    expect(() => readMLiteral('#table({"x"}, {{1, 2}})')).toThrow(/wrong length/);
    expect(() => readMLiteral('[__proto__ = 1]')).toThrow(/__proto__/);
  });
});
