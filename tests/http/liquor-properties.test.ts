// The liquor catalogue says which optional properties each model provides (the heat-transfer
// estimate needs viscosity, thermal conductivity and surface tension) and the data box of each
// property's own source, in °C like every validity box.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 10_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });

interface Summary {
  id: string;
  properties: Record<string, boolean>;
  transportValidity: Record<
    string,
    { massFraction: { min: number; max: number }; temperature: { min: number; max: number } }
  >;
}

describe('liquor catalogue: transport properties', () => {
  it('lists which properties each built-in model provides', async () => {
    const res = await request(h.app).get('/v1/liquors?kind=built-in').set(auth());
    expect(res.status).toBe(200);
    const byId = new Map((res.body.liquors as Summary[]).map((l) => [l.id, l.properties]));
    expect(byId.get('seawater')).toMatchObject({
      viscosity: true,
      thermalConductivity: true,
      surfaceTension: true,
    });
    expect(byId.get('sodium-hydroxide')).toMatchObject({
      viscosity: true,
      density: true,
      thermalConductivity: true,
      surfaceTension: false,
    });
    expect(byId.get('kraft-black-liquor')).toMatchObject({
      viscosity: true,
      density: true,
      thermalConductivity: true,
      surfaceTension: false,
    });
    expect(byId.get('sucrose')).toMatchObject({ viscosity: true, density: true, thermalConductivity: true });
  });

  it('shows the viscosity data box of sodium hydroxide in °C (Laliberté: 12.5–70 °C, up to 0.56)', async () => {
    const res = await request(h.app).get('/v1/liquors/sodium-hydroxide').set(auth());
    expect(res.status).toBe(200);
    const box = (res.body as Summary).transportValidity.viscosity;
    expect(box?.temperature.min).toBeCloseTo(12.5, 6);
    expect(box?.temperature.max).toBeCloseTo(70, 6);
    expect(box?.massFraction.max).toBe(0.56);
  });

  it('shows the thermal-conductivity box of sodium hydroxide in °C (Riedel: 10–30 °C, up to 0.10)', async () => {
    const res = await request(h.app).get('/v1/liquors/sodium-hydroxide').set(auth());
    expect(res.status).toBe(200);
    const box = (res.body as Summary).transportValidity.thermalConductivity;
    expect(box?.temperature.min).toBeCloseTo(10, 6);
    expect(box?.temperature.max).toBeCloseTo(30, 6);
    expect(box?.massFraction.max).toBe(0.1);
  });

  it('stores a liquor with transport polynomials (surface tension in mN/m) and lists them as provided', async () => {
    const created = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({
        id: 'demo-transport-liquor',
        definition: {
          name: 'Demo liquor with transport data (invented)',
          boilingPointRise: { polynomial: [0, 5] },
          heatCapacity: { polynomial: [4.18, -2.5] },
          validity: { massFraction: { min: 0, max: 0.5 } },
          viscosity: { polynomial: [1, 2, 30] },
          surfaceTension: { polynomial: [60, 10] },
        },
      });
    expect(created.status).toBe(201);
    const res = await request(h.app).get('/v1/liquors/demo-transport-liquor').set(auth());
    expect(res.status).toBe(200);
    expect(res.body.properties).toMatchObject({
      viscosity: true,
      surfaceTension: true,
      thermalConductivity: false,
      density: false,
    });
  });

  it('refuses a transport polynomial that turns negative, naming the field', async () => {
    const res = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth())
      .send({
        definition: {
          name: 'Broken conductivity (invented)',
          boilingPointRise: { polynomial: [0, 5] },
          heatCapacity: { polynomial: [4.18, -2.5] },
          validity: { massFraction: { min: 0, max: 0.5 } },
          thermalConductivity: { polynomial: [0.6, -2] },
        },
      });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('definition.thermalConductivity.polynomial');
  });
});
