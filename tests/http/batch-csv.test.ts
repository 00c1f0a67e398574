// Batch cases sent as CSV, as a first user writes them: problems and output name the CSV line
// (header = line 1) and column, each error once, and a thousands separator is refused, not read
// as a unit.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });

function csvBatch(query: string, csv: string, accept = 'application/json') {
  return request(h.app)
    .post(`/v1/batch?${query}`)
    .set(auth())
    .set('Content-Type', 'text/csv')
    .set('Accept', accept)
    .send(csv);
}

describe('batch CSV input', () => {
  it('names a bad cell of a CSV case by its line and column, with one dot in the path', async () => {
    const res = await csvBatch(
      'operation=liquor-boiling-point&liquor=sodium-hydroxide',
      'massFraction,pressure\n0.2,20\n1.5,20\n',
    );
    expect(res.status).toBe(200);
    expect(res.body.results[0]).toMatchObject({ index: 0, line: 2, status: 'ok' });
    const bad = res.body.results[1];
    expect(bad).toMatchObject({ index: 1, line: 3, status: 'error' });
    expect(bad.problem.errors[0].field).toBe('line 3, column massFraction');
    for (const e of bad.problem.errors) expect(e.field).not.toContain('..');
  });

  it('names JSON cases by index with a single dot (cases[0].massFraction)', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'liquor-boiling-point',
        liquor: 'sodium-hydroxide',
        cases: [{ massFraction: 1.5, pressure: 20 }],
      });
    expect(res.body.results[0].problem.errors[0].field).toBe('cases[0].massFraction');
    expect(res.body.results[0].line).toBeUndefined();
  });

  it('numbers CSV output rows by their input line and gives each error once', async () => {
    const res = await csvBatch(
      'operation=liquor-boiling-point&liquor=sodium-hydroxide',
      'massFraction,pressure\n0.2,20\n1.5,20\n',
      'text/csv',
    );
    expect(res.status).toBe(200);
    const [header, ok, bad] = res.text.trim().split('\r\n');
    const columns = header!.split(',');
    expect(columns[0]).toBe('line');
    expect(columns).not.toContain('index');
    expect(ok!.split(',')[0]).toBe('2');
    expect(bad!.split(',')[0]).toBe('3');
    const error = bad!.slice(bad!.indexOf('"'));
    // One clear message: the place is named once, not in a title, a detail and a field list.
    expect(error.match(/line 3, column massFraction/g)).toHaveLength(1);
    expect(error).not.toContain('Validation failed');
  });

  it('refuses a quoted 1,800 with a 422 saying thousands separators are not accepted, naming line and column', async () => {
    const res = await csvBatch(
      'operation=single-effect',
      'liquor,feed.massFlow,feed.massFraction,feed.temperature,product.massFraction,steam.pressure,body.pressure,body.overallHeatTransferCoefficient\n' +
        'sodium-hydroxide,2,0.1,60,0.3,300,15,2000\n' +
        'sodium-hydroxide,"1,800",0.1,60,0.3,300,15,2000\n',
    );
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('line 3, column feed.massFlow');
    expect(res.body.errors[0].message).toContain('thousands separators are not accepted (write 1800)');
  });

  it('refuses an unquoted 1,800 as a row with one cell too many, naming its line', async () => {
    const res = await csvBatch('operation=steam-saturation', 'pressure\n1,800\n');
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'line 2' });
    expect(res.body.errors[0].message).toContain('2 cells where 1 are expected');
  });

  it('names a header column that is no field by line 1 and its column', async () => {
    const res = await csvBatch('operation=steam-saturation', '__proto__.x\n1\n');
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('line 1, column __proto__.x');
  });
});
