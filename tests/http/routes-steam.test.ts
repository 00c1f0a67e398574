// Routes /v1/steam/*: success values against IAPWS-IF97 published tables, and each error class.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness();
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });

describe('GET /v1/steam/saturation', () => {
  it('gives 99.97 °C at 101.325 kPa', async () => {
    const res = await request(h.app).get('/v1/steam/saturation').query({ pressure: 101.325 }).set(auth());
    expect(res.status).toBe(200);
    // IAPWS-IF97: T_sat(101.325 kPa) = 373.124 K = 99.974 °C (common practice: "99.97 °C at 1 atm").
    expect(res.body.temperature).toBeCloseTo(99.974, 2);
    // Latent heat of water at 100 °C ≈ 2256.5 kJ/kg (steam tables, common practice, from memory);
    // 0.03 K lower changes it by < 0.1 kJ/kg, so 1 kJ/kg is a safe bound.
    expect(Math.abs(res.body.latentHeat - 2256.5)).toBeLessThan(1);
    expect(res.body.provenance.models.map((m: { id: string }) => m.id)).toContain('iapws-if97');
  });

  it('accepts a pressure with a unit ("1 bar") and returns kPa absolute', async () => {
    const res = await request(h.app).get('/v1/steam/saturation').query({ pressure: '1 bar' }).set(auth());
    expect(res.status).toBe(200);
    expect(res.body.pressure).toBeCloseTo(100, 9); // 1 bar = 100 kPa (definition of the bar)
    // IAPWS R7-97(2012) table 35: T_sat(0.1 MPa) = 372.755 919 K = 99.605 919 °C.
    expect(res.body.temperature).toBeCloseTo(99.605919, 5);
  });

  it('gives the IF97 saturation pressure at 500 K', async () => {
    const res = await request(h.app).get('/v1/steam/saturation').query({ temperature: '500 K' }).set(auth());
    expect(res.status).toBe(200);
    // IAPWS R7-97(2012) table 35: p_sat(500 K) = 0.263 889 776 × 10¹ MPa = 2638.89776 kPa.
    expect(res.body.pressure).toBeCloseTo(2638.89776, 3);
  });

  it('rejects a query with both pressure and temperature with 422 naming temperature', async () => {
    const res = await request(h.app)
      .get('/v1/steam/saturation')
      .query({ pressure: 100, temperature: 100 })
      .set(auth());
    expect(res.status).toBe(422);
    expect(res.type).toBe('application/problem+json');
    expect(res.body.type).toBe('/problems/validation-failed');
    expect(res.body.errors[0].field).toBe('temperature');
  });

  it('rejects an unknown unit with the field and the accepted units', async () => {
    const res = await request(h.app)
      .get('/v1/steam/saturation')
      .query({ pressure: '3 furlongs' })
      .set(auth());
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('pressure');
    expect(res.body.errors[0].message).toMatch(/accepted units/);
  });

  it('answers a pressure above the IF97 saturation line with out-of-range in kPa', async () => {
    const res = await request(h.app).get('/v1/steam/saturation').query({ pressure: '30 MPa' }).set(auth());
    expect(res.status).toBe(422);
    expect(res.body.type).toBe('/problems/out-of-range');
    expect(res.body.errors[0].field).toBe('pressure');
    expect(res.body.errors[0].value).toBeCloseTo(30000, 6);
    expect(res.body.errors[0].validRange.unit).toBe('kPa');
    // IAPWS-IF97: the critical pressure 22.064 MPa bounds the saturation line.
    expect(res.body.errors[0].validRange.max).toBeLessThanOrEqual(22064);
  });
});

describe('POST /v1/steam/state', () => {
  it('reproduces the IF97 region 2 check point at 3.5 kPa, 300 K', async () => {
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set(auth())
      .send({ pressure: '0.0035 MPa', temperature: '300 K' });
    expect(res.status).toBe(200);
    // IAPWS R7-97(2012) table 15 (T = 300 K, p = 0.0035 MPa): h = 0.254 991 145e4 kJ/kg, v = 0.394 913 866e2 m³/kg.
    expect(res.body.enthalpy).toBeCloseTo(2549.91145, 4);
    expect(res.body.specificVolume).toBeCloseTo(39.4913866, 5);
    expect(res.body.region).toBe(2);
  });

  it('reproduces the IF97 region 1 check point at 3 MPa, 300 K', async () => {
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set(auth())
      .send({ pressure: '3 MPa', temperature: 26.85 });
    expect(res.status).toBe(200);
    // IAPWS R7-97(2012) table 5: h = 0.115 331 273e3 kJ/kg at 3 MPa, 300 K.
    expect(res.body.enthalpy).toBeCloseTo(115.331273, 4);
  });

  it('gives a two-phase state with its quality from (p, h)', async () => {
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set(auth())
      .send({ pressure: 100, enthalpy: 1500 });
    expect(res.status).toBe(200);
    expect(res.body.phase).toBe('two-phase');
    // Saturated water at 100 kPa: h_f = 417.44, h_g = 2674.9 kJ/kg (steam tables, from memory);
    // quality by the lever rule (common practice) x = (1500 − 417.44)/(2674.9 − 417.44) = 0.4795.
    expect(res.body.quality).toBeCloseTo(0.4795, 3);
  });

  it('rejects a body without temperature or enthalpy', async () => {
    const res = await request(h.app).post('/v1/steam/state').set(auth()).send({ pressure: 100 });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('temperature');
  });

  it('rejects a negative pressure with its valid range', async () => {
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set(auth())
      .send({ pressure: -5, temperature: 20 });
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'pressure', value: -5 });
    expect(res.body.errors[0].validRange.unit).toBe('kPa');
  });
});
