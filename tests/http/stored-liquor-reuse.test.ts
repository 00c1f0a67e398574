// A stored liquor is compiled once per stored row; deleting it and storing another definition
// under the same id (same instant: the test clock is frozen) must give the new definition.
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { makeHarness } from './helpers.js';

const polynomialLiquor = (rise: number) => ({
  name: 'Invented test brine',
  boilingPointRise: { polynomial: [0, rise] },
  heatCapacity: { polynomial: [4.0] },
  validity: { massFraction: { min: 0, max: 0.5 } },
});

describe('stored liquors across delete and re-create', () => {
  it('answers with the definition stored now, never an earlier one under the same id', async () => {
    const h = await makeHarness();
    const auth = { Authorization: `Bearer ${h.token}` };
    const boilingPoint = () =>
      request(h.app)
        .post('/v1/liquors/test-brine/boiling-point')
        .set(auth)
        .send({ massFraction: 0.2, pressure: 101.325 });

    const store = (rise: number) =>
      request(h.app)
        .post('/v1/stored-liquors')
        .set(auth)
        .send({ id: 'test-brine', definition: polynomialLiquor(rise) });

    expect((await store(10)).status).toBe(201);
    const first = await boilingPoint();
    expect(first.status).toBe(200);
    // BPR polynomial (definition): 10·x K at x = 0.2 → 2 K.
    expect(first.body.boilingPointRise).toBeCloseTo(2, 9);
    expect((await boilingPoint()).body.boilingPointRise).toBeCloseTo(2, 9);

    expect((await request(h.app).delete('/v1/stored-liquors/test-brine').set(auth)).status).toBe(204);
    expect((await boilingPoint()).status).toBe(404);
    expect((await store(20)).status).toBe(201);
    // The new definition: 20·x K at x = 0.2 → 4 K.
    expect((await boilingPoint()).body.boilingPointRise).toBeCloseTo(4, 9);
  });
});
