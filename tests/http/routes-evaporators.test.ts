// Routes /v1/evaporators/*, /v1/liquors/*, /v1/stored-liquors and /v1/batch: success against
// textbook and IF97 values where numbers matter, and each error class.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, usageRows, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });

/** Geankoplis, Transport Processes and Separation Process Principles, 4th ed., Example 8.4-1:
 * 9072 kg/h of 1.0 wt% salt solution at 311 K concentrated to 1.5 wt% at 101.325 kPa with
 * saturated steam at 143.3 kPa, U = 1704 W/(m²·K); BPR neglected and c_p = 4.14 kJ/(kg·K). */
const geankoplis841 = {
  liquor: {
    name: 'Dilute salt solution as in Geankoplis 8.4-1',
    boilingPointRise: { polynomial: [0] },
    heatCapacity: { polynomial: [4.14] },
    validity: { massFraction: { min: 0, max: 0.05 } },
  },
  feed: { massFlow: '9072 kg/h', massFraction: 0.01, temperature: '311 K' },
  product: { massFraction: 0.015 },
  steam: { pressure: 143.3 },
  body: { pressure: 101.325, overallHeatTransferCoefficient: 1704 },
};

describe('POST /v1/evaporators/single-effect', () => {
  it('reproduces Geankoplis Example 8.4-1 (steam 4108 kg/h, area 149.3 m²)', async () => {
    const res = await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(geankoplis841);
    expect(res.status).toBe(200);
    // Geankoplis 4th ed. Example 8.4-1 (from memory): V = 3024 kg/h, L = 6048 kg/h (mass balances, exact).
    expect(res.body.vapor.massFlow * 3600).toBeCloseTo(3024, 0);
    expect(res.body.product.massFlow * 3600).toBeCloseTo(6048, 0);
    // Same example (from memory): S = 4108 kg/h, A = 149.3 m²; the book uses rounded steam-table
    // values and c_p-based enthalpies, so 2 % is allowed.
    expect(Math.abs(res.body.steam.massFlow * 3600 - 4108) / 4108).toBeLessThan(0.02);
    expect(Math.abs(res.body.area - 149.3) / 149.3).toBeLessThan(0.02);
    expect(res.body.mode).toBe('design');
    expect(res.body.provenance.models.length).toBeGreaterThanOrEqual(2);
  });

  it('names a feed mass fraction above 1 with its valid range', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({ ...geankoplis841, feed: { ...geankoplis841.feed, massFraction: 1.4 } });
    expect(res.status).toBe(422);
    expect(res.body.type).toBe('/problems/validation-failed');
    expect(res.body.errors[0]).toMatchObject({ field: 'feed.massFraction', value: 1.4 });
    expect(res.body.errors[0].validRange).toMatchObject({ min: 0, max: 1 });
  });

  it('answers steam colder than the boiling liquor with no-solution', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({ ...geankoplis841, steam: { pressure: 50 } });
    expect(res.status).toBe(422);
    expect(res.body.type).toBe('/problems/no-solution');
  });

  it('answers an unknown liquor id with 404 naming the liquor field', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({ ...geankoplis841, liquor: 'no-such-liquor' });
    expect(res.status).toBe(404);
    expect(res.body.errors[0].field).toBe('liquor');
  });
});

describe('POST /v1/evaporators/multiple-effect', () => {
  it('designs a three-effect forward train with equal areas and charges 5 + 5 per effect', async () => {
    const before = (await usageRows(h.store)).length;
    const res = await request(h.app)
      .post('/v1/evaporators/multiple-effect')
      .set(auth())
      .send({
        liquor: 'sodium-hydroxide',
        effects: 3,
        feed: { massFlow: 2, massFraction: 0.1, temperature: 80 },
        product: { massFraction: 0.3 },
        steam: { pressure: '3 barg' },
        lastEffectPressure: 15,
        overallHeatTransferCoefficients: [2500, 2000, 1500],
      });
    expect(res.status).toBe(200);
    const areas = res.body.effects.map((e: { area: number }) => e.area);
    // Equal-area design target (domain primer §4, textbook method).
    for (const a of areas) expect(Math.abs(a - areas[0]) / areas[0]).toBeLessThan(0.01);
    // Solute balance F·x_F = L·x_L (exact): 2·0.1/0.3 kg/s of product.
    expect(res.body.product.massFlow).toBeCloseTo((2 * 0.1) / 0.3, 6);
    const row = (await usageRows(h.store)).slice(before).at(-1);
    // Operation catalogue (shared/operations.ts): 5 units + 5 per effect.
    expect(row?.units).toBe(20);
  });

  it('rejects one U per effect missing with the field path', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/multiple-effect')
      .set(auth())
      .send({
        liquor: 'sodium-hydroxide',
        effects: 3,
        feed: { massFlow: 2, massFraction: 0.1, temperature: 80 },
        product: { massFraction: 0.3 },
        steam: { pressure: 300 },
        lastEffectPressure: 15,
        overallHeatTransferCoefficients: [2500, 2000],
      });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('overallHeatTransferCoefficients');
  });

  const cold = {
    liquor: 'sodium-hydroxide',
    effects: 3,
    feed: { massFlow: 2, massFraction: 0.1, temperature: 25 },
    product: { massFraction: 0.3 },
    steam: { pressure: '3 barg', condensateSubcooling: 5 },
    lastEffectPressure: 15,
    overallHeatTransferCoefficients: [2500, 2000, 1500],
  };

  it('preheats the feed with vapour bled from an effect and reports the bleed and the duty', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/multiple-effect')
      .set(auth())
      .send({
        ...cold,
        feedPreheat: { temperature: 70, source: { vaporFromEffect: 1 } },
        condensateFlash: false,
      });
    expect(res.status).toBe(200);
    expect(res.body.feedPreheatDuty).toBeGreaterThan(0);
    // The preheat vapour is taken from effect 1's vapour (a bleed), the others bleed nothing.
    expect(res.body.effects[0].vaporBleed).toBeGreaterThan(0);
    expect(res.body.effects[1].vaporBleed).toBe(0);
    // Energy bookkeeping (first law): the preheater's duty is the bled vapour's condensing heat,
    // so it is at most the bleed times the heat of condensation of steam at that pressure
    // (< 2.4 MJ/kg below 1 MPa, IAPWS-IF97 saturation tables).
    expect(res.body.feedPreheatDuty).toBeLessThan(res.body.effects[0].vaporBleed * 2400);
    expect(res.body.residual).toBeLessThan(1e-9);
  });

  it('names feedPreheat.temperature when the preheat is hotter than the heating steam', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/multiple-effect')
      .set(auth())
      .send({ ...cold, feedPreheat: { temperature: 180 } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('feedPreheat.temperature');
    // Range in display units: from the feed temperature up to the steam's condensing temperature
    // (3 barg = 401.3 kPa: 143.7 °C, IAPWS-IF97 saturation table; common practice).
    expect(res.body.errors[0].validRange).toMatchObject({ min: 25, unit: 'degC' });
    expect(res.body.errors[0].validRange.max).toBeCloseTo(143.7, 0);
  });
});

describe('single-effect derived figures', () => {
  it('gives the specific steam consumption as the inverse of the steam economy', async () => {
    // Definitions (common practice): economy = V/S, specific steam consumption = S/V.
    const res = await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(geankoplis841);
    expect(res.status).toBe(200);
    expect(res.body.steamEconomy * res.body.specificSteamConsumption).toBeCloseTo(1, 9);
    // Pure water at 101.325 kPa boils at 99.974 °C (IAPWS-IF97; common practice).
    expect(res.body.waterBoilingPoint).toBeCloseTo(99.974, 2);
    expect(res.body.heatLoss).toBe(0);
  });
});

describe('liquor routes', () => {
  it('gives the water boiling point of IF97 beside the liquor boiling point', async () => {
    const res = await request(h.app)
      .post('/v1/liquors/sodium-hydroxide/boiling-point')
      .set(auth())
      .send({ massFraction: 0.3, pressure: '0.1 MPa' });
    expect(res.status).toBe(200);
    // IAPWS R7-97(2012) table 35: T_sat(0.1 MPa) = 372.755919 K = 99.605919 °C.
    expect(res.body.waterBoilingPoint).toBeCloseTo(99.605919, 5);
    // Strong caustic boils well above water (common practice: ~ 10–20 K at 30 % NaOH near 1 bar).
    expect(res.body.boilingPointRise).toBeGreaterThan(8);
    expect(res.body.cautions.length).toBeGreaterThan(0);
  });

  it('lists built-in liquors with validity in °C and kPa', async () => {
    const res = await request(h.app).get('/v1/liquors').set(auth());
    expect(res.status).toBe(200);
    const naoh = res.body.liquors.find((l: { id: string }) => l.id === 'sodium-hydroxide');
    // Olsson et al. (1997) enthalpy data reach 204 °C (domain primer §3).
    expect(naoh.validity.temperature.max).toBeCloseTo(204, 0);
  });

  it('stores a Dühring table from CSV, uses it, and reports a bad cell by line and column', async () => {
    const csv =
      'massFraction,waterBoilingPoint,solutionBoilingPoint\n0.2,50,51.2\n0.2,100,101.5\n0.45,50,54.1\n0.45,100,105.0\n';
    const ok = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .field('name', 'North Mill spent wash (invented)')
      .field('heatCapacity', '4.18,-2.4')
      .attach('file', Buffer.from(csv), 'spent-wash.csv');
    expect(ok.status).toBe(201);
    expect(ok.body.id).toBe('north-mill-spent-wash-invented');
    const bp = await request(h.app)
      .post(`/v1/liquors/${ok.body.id}/boiling-point`)
      .set(auth())
      .send({ massFraction: 0.2, pressure: '0.1 MPa' });
    expect(bp.status).toBe(200);
    // Dühring line through the invented points (50 → 51.2, 100 → 101.5 °C), linear in T_water
    // (Dühring's rule): at T_w = 99.605919 °C (IF97 table 35), 51.2 + 1.006·(99.605919 − 50).
    expect(bp.body.boilingPoint).toBeCloseTo(51.2 + (50.3 / 50) * (99.605919 - 50), 3);
    const bad = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .field('name', 'Broken table')
      .field('heatCapacity', '4.18,-2.4')
      .attach(
        'file',
        Buffer.from('massFraction,waterBoilingPoint,solutionBoilingPoint\n0.2,50,51\n0.2,abc,101\n'),
        't.csv',
      );
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].field).toBe('line 3, column waterBoilingPoint');
    const del = await request(h.app).delete(`/v1/stored-liquors/${ok.body.id}`).set(auth());
    expect(del.status).toBe(204);
  });
});

describe('POST /v1/batch', () => {
  it('runs each case, gives a failing case its own problem and charges only the cases that succeed', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'steam-saturation',
        cases: [{ pressure: 101.325 }, { pressure: 'lots' }, { temperature: '500 K' }],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 3, succeeded: 2, failed: 1, unitsCharged: 2 });
    // IAPWS-IF97: 99.974 °C at 101.325 kPa (common practice "99.97 °C").
    expect(res.body.results[0].result.temperature).toBeCloseTo(99.974, 2);
    expect(res.body.results[1].problem.errors[0].field).toBe('cases[1].pressure');
    // IAPWS R7-97(2012) table 35: p_sat(500 K) = 2.63889776 MPa.
    expect(res.body.results[2].result.pressure).toBeCloseTo(2638.89776, 3);
  });

  it('takes CSV in and gives CSV out', async () => {
    const res = await request(h.app)
      .post('/v1/batch?operation=steam-saturation')
      .set(auth())
      .set('Content-Type', 'text/csv')
      .set('Accept', 'text/csv')
      .send('pressure\n100\n1 MPa\n');
    expect(res.status).toBe(200);
    expect(res.type).toBe('text/csv');
    const lines = res.text.trim().split('\n');
    expect(lines).toHaveLength(3);
    const header = lines[0]!.split(',');
    const t = header.indexOf('temperature');
    // IAPWS R7-97(2012) table 35: T_sat(1 MPa) = 453.035632 K = 179.885632 °C.
    expect(Number(lines[2]!.split(',')[t])).toBeCloseTo(179.885632, 4);
  });

  it('refuses more than 1000 cases with 413', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'steam-saturation',
        cases: Array.from({ length: 1001 }, () => ({ pressure: 100 })),
      });
    expect(res.status).toBe(413);
  });
});
