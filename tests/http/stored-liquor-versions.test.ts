// Stored liquors as a first user meets them: the upload is checked as the OpenAPI document says
// (heat capacity required), an update stores a new version that calculations use at once and
// name in their provenance, and the Dühring CSV reads like the batch CSV (units in cells, errors
// by line and column). The tables are invented; checks of numbers are against the table itself.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { beforeEach, describe, expect, it } from 'vitest';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
beforeEach(async () => {
  h = await makeHarness({ quota: 100_000, retain: true });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });

/** An invented Dühring table: a rise of `rise20` K at x = 0.2 and `rise45` K at x = 0.45, the same at 50 and 100 °C. */
function definition(rise20: number, rise45: number, withHeat = true) {
  return {
    name: 'Invented spent wash',
    boilingPoint: {
      duhring: [
        {
          massFraction: 0.2,
          points: [
            { waterBoilingPoint: 50, solutionBoilingPoint: 50 + rise20 },
            { waterBoilingPoint: 100, solutionBoilingPoint: 100 + rise20 },
          ],
        },
        {
          massFraction: 0.45,
          points: [
            { waterBoilingPoint: 50, solutionBoilingPoint: 50 + rise45 },
            { waterBoilingPoint: 100, solutionBoilingPoint: 100 + rise45 },
          ],
        },
      ],
    },
    ...(withHeat ? { heatCapacity: { polynomial: [4.18, -2.4] } } : {}),
  };
}

const CSV_HEADER = 'massFraction,waterBoilingPoint,solutionBoilingPoint\n';

function upload(
  csv: string,
  fields: Record<string, string> = { name: 'Invented table', heatCapacity: '4.18,-2.4' },
) {
  let req = request(h.app).post('/v1/stored-liquors').set(auth());
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach('file', Buffer.from(csv), 'table.csv');
}

describe('storing a liquor checks what the document requires', () => {
  it('refuses a JSON definition without heatCapacity or enthalpy with 422 naming definition.heatCapacity', async () => {
    const res = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({ id: 'no-heat', definition: definition(1, 4, false) });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('definition.heatCapacity');
    const list = await request(h.app).get('/v1/stored-liquors').set(auth());
    expect(list.body.liquors).toEqual([]);
  });

  it('refuses an uploaded table without the heatCapacity field with 422 naming it', async () => {
    const res = await upload(`${CSV_HEADER}0.2,50,51\n0.2,100,101\n`, { name: 'No heat' });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('heatCapacity');
  });

  it('stores a liquor with heatCapacity as version 1, and an evaporator can use it', async () => {
    const res = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({ id: 'wash', definition: definition(1, 4) });
    expect(res.status).toBe(201);
    expect(res.body.version).toBe(1);
    const evap = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({
        liquor: 'wash',
        feed: { massFlow: 2, massFraction: 0.2, temperature: 60 },
        product: { massFraction: 0.4 },
        steam: { pressure: '3 barg' },
        body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
      });
    expect(evap.status).toBe(200);
  });
});

describe('PUT /v1/stored-liquors/{liquorId}', () => {
  async function boilingPoint() {
    return request(h.app)
      .post('/v1/liquors/wash/boiling-point')
      .set(auth())
      .send({ massFraction: 0.2, pressure: 101.325 });
  }

  it('stores a new version that the next calculation uses and names in its provenance and log row', async () => {
    await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({ id: 'wash', definition: definition(1, 4) });
    const before = await boilingPoint();
    expect(before.status).toBe(200);
    // From the table: a rise of 1 K at x = 0.2, the same at every pressure.
    expect(before.body.boilingPointRise).toBeCloseTo(1, 6);
    expect(before.body.provenance.models).toContainEqual(
      expect.objectContaining({ id: 'custom:wash', version: 1 }),
    );

    const put = await request(h.app)
      .put('/v1/stored-liquors/wash')
      .set(auth())
      .send({ definition: definition(3, 6) });
    expect(put.status).toBe(200);
    expect(put.body).toMatchObject({ id: 'wash', version: 2 });

    const after = await boilingPoint();
    // The cache of compiled liquors is keyed on the version: the new table's 3 K at once.
    expect(after.body.boilingPointRise).toBeCloseTo(3, 6);
    expect(after.body.provenance.models).toContainEqual(
      expect.objectContaining({ id: 'custom:wash', version: 2 }),
    );

    const rows = await h.store.rows<{ response_body: string }>(
      sql`SELECT response_body FROM request_log WHERE path = '/v1/liquors/wash/boiling-point' ORDER BY id`,
    );
    expect(rows).toHaveLength(2);
    expect(JSON.parse(rows[0]!.response_body).provenance.models).toContainEqual(
      expect.objectContaining({ id: 'custom:wash', version: 1 }),
    );
    expect(JSON.parse(rows[1]!.response_body).provenance.models).toContainEqual(
      expect.objectContaining({ id: 'custom:wash', version: 2 }),
    );
    // Old versions are kept.
    const versions = await h.store.rows(
      sql`SELECT version FROM stored_liquors WHERE liquor_id = 'wash' ORDER BY version`,
    );
    expect(versions).toEqual([{ version: 1 }, { version: 2 }]);
    const list = await request(h.app).get('/v1/stored-liquors').set(auth());
    expect(list.body.liquors).toHaveLength(1);
    expect(list.body.liquors[0].version).toBe(2);
  });

  it('names the version in each batch case that used the stored liquor', async () => {
    await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({ id: 'wash', definition: definition(1, 4) });
    await request(h.app)
      .put('/v1/stored-liquors/wash')
      .set(auth())
      .send({ definition: definition(2, 5) });
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'liquor-boiling-point',
        liquor: 'wash',
        cases: [{ massFraction: 0.2, pressure: 50 }],
      });
    expect(res.body.results[0].result.provenance.models).toContainEqual(
      expect.objectContaining({ id: 'custom:wash', version: 2 }),
    );
  });

  it('refuses an update of an unknown liquor with 404 and one without heatCapacity with 422', async () => {
    const missing = await request(h.app)
      .put('/v1/stored-liquors/nothing-here')
      .set(auth())
      .send({ definition: definition(1, 4) });
    expect(missing.status).toBe(404);
    await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({ id: 'wash', definition: definition(1, 4) });
    const noHeat = await request(h.app)
      .put('/v1/stored-liquors/wash')
      .set(auth())
      .send({ definition: definition(1, 4, false) });
    expect(noHeat.status).toBe(422);
    expect(noHeat.body.errors[0].field).toBe('definition.heatCapacity');
  });

  it('takes the new version as an uploaded CSV table too', async () => {
    await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({ id: 'wash', definition: definition(1, 4) });
    const res = await request(h.app)
      .put('/v1/stored-liquors/wash')
      .set(auth())
      .field('name', 'Invented spent wash, resampled')
      .field('heatCapacity', '4.18,-2.4')
      .attach(
        'file',
        Buffer.from(`${CSV_HEADER}0.2,50,52\n0.2,100,102\n0.45,50,55\n0.45,100,105\n`),
        't.csv',
      );
    expect(res.status).toBe(200);
    expect(res.body.version).toBe(2);
    expect((await boilingPoint()).body.boilingPointRise).toBeCloseTo(2, 6);
  });
});

describe('Dühring CSV uploads read like the batch CSV', () => {
  it('accepts units in cells (10 %, 40 degC, 313.15 K), converted as in a batch', async () => {
    const res = await upload(
      `${CSV_HEADER}10 %,40 degC,41 degC\n10 %,100,102\n0.3,313.15 K,44 degC\n0.3,100,105\n`,
    );
    expect(res.status).toBe(201);
    const lines = res.body.definition.boilingPoint.duhring;
    expect(lines[0].massFraction).toBeCloseTo(0.1, 12);
    // 313.15 K = 40 °C (the kelvin offset, 273.15, by definition).
    expect(lines[1].points[0].waterBoilingPoint).toBeCloseTo(40, 9);
    expect(lines[0].points[0]).toEqual({ waterBoilingPoint: 40, solutionBoilingPoint: 41 });
  });

  it('reports a short row by its cell count, not as "not a number"', async () => {
    const res = await upload(`${CSV_HEADER}0.2,50,51\n0.2,100\n`);
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('line 3');
    expect(res.body.errors[0].message).toContain('the row has 2 cells where 3 are expected');
    expect(JSON.stringify(res.body)).not.toContain('not a number');
  });

  it('names the CSV line and column of a negative boiling-point rise, not a JSON path', async () => {
    const res = await upload(`${CSV_HEADER}0.2,50,51\n0.2,100,99\n0.45,50,54\n0.45,100,105\n`);
    expect(res.status).toBe(422);
    const text = JSON.stringify(res.body);
    expect(text).not.toContain('duhring[');
    expect(res.body.errors[0].field).toMatch(/^line 3/);
  });

  it('refuses a thousands separator in a cell, naming line and column', async () => {
    const res = await upload(`${CSV_HEADER}0.2,50,51\n0.2,"1,000",101\n`);
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'line 3, column waterBoilingPoint' });
    expect(res.body.errors[0].message).toContain('thousands separators are not accepted (write 1000)');
  });
});
