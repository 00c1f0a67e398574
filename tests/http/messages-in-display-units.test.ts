// Every message of the API speaks its own units (°C, kPa, mass fraction), rounded for reading,
// with the request path and, in a train, the effect number; gauge readings refer to the request's
// stated atmosphere; units that fit one liquor only are refused elsewhere, naming the field.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { physicalRanges } from '../../shared/contracts/common.js';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const post = (path: string, body: object) =>
  request(h.app)
    .post(path)
    .set({ Authorization: `Bearer ${h.token}` })
    .send(body);
const get = (path: string) =>
  request(h.app)
    .get(path)
    .set({ Authorization: `Bearer ${h.token}` });

const caustic = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 2, massFraction: 0.1, temperature: 95 },
  product: { massFraction: 0.3 },
  steam: { pressure: 300 },
  body: { pressure: 20, overallHeatTransferCoefficient: 1500 },
};
type Warning = {
  code: string;
  message: string;
  field?: string;
  validRange?: { min: number | null; max: number | null };
};

/**
 * No kelvin temperature or pascal pressure in a text ("363.15 K", "206422.9 Pa"); a temperature
 * difference in K ("ΔT = 5.2 K") is the API's unit and passes.
 */
const SI_TEXT = /\d{3}(\.\d+)? K\b|\d Pa\b/;
/** A number with more digits than a reader needs (binary noise or 12-digit rounding). */
const LONG_NUMBER = /\d\.\d{5,}|\d{7,}/;

describe('single effect: warnings and problems in °C and kPa', () => {
  it('says the feed-flash warning in °C to 0.01 °C, with a physical lower bound', async () => {
    const res = await post('/v1/evaporators/single-effect', caustic);
    expect(res.status).toBe(200);
    const w = (res.body.warnings as Warning[]).find((x) => x.code === 'feed-flash')!;
    expect(w.field).toBe('feed.temperature');
    expect(w.message).toMatch(/^The feed at 95 °C is above its boiling point \d+(\.\d{1,2})? °C/);
    expect(w.message).not.toMatch(SI_TEXT);
    // The range starts at the API's lowest temperature, not at absolute zero (−273.15 °C).
    expect(w.validRange!.min).toBe(physicalRanges.temperature.min);
  });

  it('says a steam-too-cold problem in °C and kPa, not K and Pa', async () => {
    const res = await post('/v1/evaporators/single-effect', {
      ...caustic,
      feed: { ...caustic.feed, temperature: 50 },
      body: { ...caustic.body, pressure: '5 bar' },
    });
    expect(res.status).toBe(422);
    expect(res.body.type).toMatch(/no-solution/);
    expect(res.body.detail).toMatch(/condenses at \d+(\.\d{1,2})? °C/);
    expect(res.body.detail).toContain('at 500 kPa');
    expect(res.body.detail).not.toMatch(SI_TEXT);
  });
});

describe('multiple effect: messages name the effect and the field', () => {
  it('says liquor warnings with "effect i:", the effect field and °C', async () => {
    const res = await post('/v1/evaporators/multiple-effect', {
      liquor: 'sucrose',
      effects: 2,
      feed: { massFlow: 10, massFraction: 0.15, temperature: 50 },
      product: { massFraction: 0.88 },
      steam: { pressure: 400 },
      lastEffectPressure: 15,
      overallHeatTransferCoefficients: [2000, 2000],
    });
    expect(res.status).toBe(200);
    const warnings = res.body.warnings as Warning[];
    const extrapolated = warnings.find((w) => w.field === 'effects[0].boilingTemperature')!;
    expect(extrapolated.message).toMatch(
      /^effect 1: effects\[0\]\.boilingTemperature = \d+(\.\d{1,2})? °C lies outside the sucrose model's data range \(0 °C to 100 °C\)/,
    );
    for (const w of warnings) {
      expect(w.message).not.toMatch(SI_TEXT);
      expect(w.message).not.toMatch(LONG_NUMBER);
    }
  });

  it('says a refusal inside the train in °C with the effect number', async () => {
    const res = await post('/v1/evaporators/multiple-effect', {
      liquor: 'seawater',
      effects: 3,
      feed: { massFlow: 10, massFraction: 0.035, temperature: 50 },
      product: { massFraction: 0.07 },
      steam: { pressure: 500 },
      lastEffectPressure: 250,
      overallHeatTransferCoefficients: [2000, 2000, 2000],
    });
    expect(res.status).toBe(422);
    // Sharqawy et al. (2010): the seawater correlation stops at 120 °C.
    expect(res.body.detail).toMatch(
      /^effect \d: effects\[\d\]\.boilingTemperature = \d+(\.\d{1,2})? °C is outside the valid range 0 °C to 120 °C/,
    );
    expect(res.body.detail).not.toMatch(SI_TEXT);
  });
});

describe('steam routes: problems in kPa with 4 significant digits', () => {
  it('refuses a region-5 state above 50 MPa in kPa', async () => {
    // IAPWS-IF97 region 5 (1073.15–2273.15 K) reaches 50 MPa only.
    const res = await post('/v1/steam/state', { pressure: 60_000, temperature: 1500 });
    expect(res.status).toBe(422);
    expect(res.body.detail).toBe('pressure = 60000 kPa is outside the valid range 0 kPa to 50000 kPa');
  });
});

describe('gauge readings and the request atmosphere', () => {
  it('reads 0.5 barg against a stated 950 mbar as 145 kPa absolute (common practice)', async () => {
    const gauge = await post('/v1/liquors/sodium-hydroxide/boiling-point', {
      massFraction: 0.3,
      pressure: '0.5 barg',
      atmosphericPressure: '950 mbar',
    });
    const absolute = await post('/v1/liquors/sodium-hydroxide/boiling-point', {
      massFraction: 0.3,
      pressure: 145,
    });
    expect(gauge.status).toBe(200);
    expect(gauge.body.boilingPoint).toBe(absolute.body.boilingPoint);
  });

  it('reads 0 barg in a steam query against the stated atmosphere', async () => {
    const res = await get('/v1/steam/saturation?pressure=0%20barg&atmosphericPressure=95');
    expect(res.status).toBe(200);
    expect(res.body.pressure).toBeCloseTo(95, 9);
  });

  it('reads inHg vac against 101.325 kPa when no atmosphere is stated', async () => {
    // 20 inHg vac = 101.325 − 20 × 3.386389 kPa = 33.59722 kPa (NIST SP 811; common practice).
    const vac = await post('/v1/liquors/sucrose/boiling-point', {
      massFraction: 0.5,
      pressure: '20 inHg vac',
    });
    const abs = await post('/v1/liquors/sucrose/boiling-point', { massFraction: 0.5, pressure: 33.5972235 });
    expect(vac.status).toBe(200);
    expect(vac.body.boilingPoint).toBeCloseTo(abs.body.boilingPoint, 4);
  });

  it('refuses a gauge reading as the atmosphere itself, naming the field', async () => {
    const res = await post('/v1/liquors/sodium-hydroxide/boiling-point', {
      massFraction: 0.3,
      pressure: 20,
      atmosphericPressure: '2 barg',
    });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('atmosphericPressure');
  });

  it('refuses an atmosphere outside 30–110 kPa', async () => {
    const res = await post('/v1/liquors/sodium-hydroxide/boiling-point', {
      massFraction: 0.3,
      pressure: 20,
      atmosphericPressure: 500,
    });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('atmosphericPressure');
  });
});

describe('units that fit one liquor, and fractions typed as percents', () => {
  it('refuses °Bx for caustic, naming the field and the liquor it fits', async () => {
    const res = await post('/v1/evaporators/single-effect', {
      ...caustic,
      feed: { ...caustic.feed, massFraction: '10 Bx' },
    });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('feed.massFraction');
    expect(res.body.errors[0].message).toMatch(/does not fit this liquor \(sodium-hydroxide\).*sucrose/);
  });

  it('accepts °Bx for sucrose (ICUMSA: °Brix = sucrose mass percent)', async () => {
    const bx = await post('/v1/liquors/sucrose/boiling-point', { massFraction: '60 Bx', pressure: 50 });
    const x = await post('/v1/liquors/sucrose/boiling-point', { massFraction: 0.6, pressure: 50 });
    expect(bx.status).toBe(200);
    expect(bx.body.boilingPoint).toBe(x.body.boilingPoint);
  });

  it('refuses a plain 60 as a mass fraction with "did you mean 60 %"', async () => {
    const res = await post('/v1/evaporators/single-effect', {
      ...caustic,
      feed: { ...caustic.feed, massFraction: 60 },
    });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('feed.massFraction');
    expect(res.body.errors[0].message).toContain('did you mean "60 %" (0.6)?');
    // The range is said once, not "0 to 1 mass fraction 0–1".
    expect(res.body.errors[0].message).toBe(
      '60 lies outside the accepted range 0 to 1 (mass fraction); did you mean "60 %" (0.6)?',
    );
  });

  it('explains that a built-in liquor is named by its id string when sent as {"id": …}', async () => {
    const res = await post('/v1/evaporators/single-effect', {
      ...caustic,
      liquor: { id: 'sodium-hydroxide' },
    });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('liquor.id');
    expect(res.body.detail).toContain('named by its id as a plain string, e.g. "liquor": "sodium-hydroxide"');
  });
});

describe('batch cases get the same units rules', () => {
  it('reads each case against its own atmosphere and its liquor, and names the case of a refusal', async () => {
    const res = await post('/v1/batch', {
      operation: 'liquor-boiling-point',
      liquor: 'sodium-hydroxide',
      cases: [
        { massFraction: 0.3, pressure: '0.5 barg', atmosphericPressure: '950 mbar' },
        { massFraction: '30 Bx', pressure: 145 },
        { massFraction: 0.3, pressure: 145 },
      ],
    });
    expect(res.status).toBe(200);
    const [gauge, brix, absolute] = res.body.results as {
      status: string;
      result?: { boilingPoint: number };
      problem?: { errors: { field: string }[] };
    }[];
    expect(gauge!.status).toBe('ok');
    expect(gauge!.result!.boilingPoint).toBe(absolute!.result!.boilingPoint);
    expect(brix!.status).toBe('error');
    expect(JSON.stringify(brix)).toContain('cases[1].massFraction');
    expect(JSON.stringify(brix)).toContain('does not fit this liquor');
  });
});

describe('the API description states the unit grammar once', () => {
  it('puts the grammar in info.description and points every quantity at it', async () => {
    const res = await request(h.app).get('/openapi.json');
    expect(res.status).toBe(200);
    const doc = res.body as { info: { description: string } };
    expect(doc.info.description).toContain('## Quantities and units');
    expect(doc.info.description).toContain('W/m2-K');
    const text = JSON.stringify(doc);
    expect(text).toContain('grammar: see \\"Quantities and units\\"');
    expect(text).toContain('atmosphericPressure');
  });
});
