// Route /v1/heat-transfer/overall-coefficient: the estimate through HTTP (units in and out,
// the outside-area basis), the refusals with field and range, warnings in display units, metering
// and a batch.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { estimateOverallCoefficient } from '../../server/engine/heat-transfer/overall.js';
import { seawater } from '../../server/engine/liquors/seawater.js';
import { sodiumHydroxide } from '../../server/engine/liquors/sodium-hydroxide.js';
import { liquidThermalConductivity } from '../../server/engine/steam/if97.js';
import { makeHarness, usageRows, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });
const PATH = '/v1/heat-transfer/overall-coefficient';

// An invented brine falling film; viscosity and conductivity are demo values, given in the request.
const brine = {
  evaporatorType: 'falling-film',
  liquor: 'seawater',
  massFraction: 0.05,
  bodyPressure: 31,
  steam: { temperature: 80 },
  tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'titanium-grade-2' },
  flow: { wettingRate: '1800 kg/(m*h)', evaporatedFraction: 0.3 },
  liquorProperties: { viscosity: '0.45 mPa*s', thermalConductivity: 0.65 },
};

// An invented custom liquor with density and viscosity but no thermal conductivity (demo only).
const noConductivity = {
  name: 'Invented liquor without a conductivity',
  boilingPointRise: { polynomial: [0, 5] },
  heatCapacity: { polynomial: [4.18, -2.5] },
  validity: { massFraction: { min: 0, max: 0.5 } },
  density: { polynomial: [1000, 400] },
  viscosity: { polynomial: [1, 2, 30] },
};

describe('POST /v1/heat-transfer/overall-coefficient', () => {
  it('answers U on the outside area with every resistance, as the engine computes it', async () => {
    const res = await request(h.app).post(PATH).set(auth()).send(brine);
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.area).toBe('outside');
    // 1/U_o is the sum of the resistances; the shares add to one.
    expect(b.overallHeatTransferCoefficient * b.totalResistance).toBeCloseTo(1, 9);
    const shares =
      b.boilingSide.share +
      b.wall.share +
      b.condensingSide.share +
      b.fouling.inside.share +
      b.fouling.outside.share;
    expect(shares).toBeCloseTo(1, 9);
    // Units in: 1800 kg/(m·h) = 0.5 kg/(m·s); out: mPa·s, kW/m², m.
    expect(b.boilingSide.wettingRate.inlet).toBeCloseTo(0.5, 12);
    expect(b.boilingSide.properties.viscosity).toBeCloseTo(0.45, 12);
    expect(b.boilingSide.properties.source).toMatchObject({ viscosity: 'given', density: 'model' });
    expect(b.tube.insideDiameter).toBeCloseTo(0.0476, 12);
    expect(b.heatFlux).toBeCloseTo((b.overallHeatTransferCoefficient * b.temperatureDifference) / 1000, 6);
    expect(b.boilingSide.reynoldsDefinition).toContain('4Γ/μ');
    expect(b.fouling.inside.defaulted).toBe(true);
    expect(b.provenance.models.map((m: { id: string }) => m.id)).toEqual(
      expect.arrayContaining(['iapws-if97', 'seawater', 'chun-seban-1971', 'nusselt-1916', 'tema-fouling']),
    );
    // Same case straight into the engine, in SI (the body boiling point from the route).
    const e = estimateOverallCoefficient({
      evaporatorType: 'falling-film',
      liquor: seawater,
      massFraction: 0.05,
      boilingTemperature: b.liquorState.boilingTemperature + 273.15,
      bodyPressure: 31_000,
      steamTemperature: 353.15,
      tube: { outsideDiameter: 0.0508, wallThickness: 0.0016, length: 8, material: 'titanium-grade-2' },
      flow: { wettingRate: 0.5, evaporatedFraction: 0.3 },
      liquorProperties: { viscosity: 4.5e-4, thermalConductivity: 0.65 },
    });
    expect(b.overallHeatTransferCoefficient / e.overallHeatTransferCoefficient).toBeCloseTo(1, 8);
    expect(b.cautions.map((c: { code: string }) => c.code)).toContain('estimate-only');
  });

  it('meters a success at the catalogue cost', async () => {
    const before = (await usageRows(h.store)).length;
    await request(h.app).post(PATH).set(auth()).send(brine).expect(200);
    const rows = (await usageRows(h.store)).slice(before);
    expect(rows).toEqual([
      expect.objectContaining({ operation: 'heat-transfer.overall-coefficient', units: 2 }),
    ]);
  });

  it('refuses a liquor model without a needed property, naming it, and charges nothing', async () => {
    const before = (await usageRows(h.store)).length;
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, liquor: noConductivity, massFraction: 0.2, liquorProperties: undefined });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('liquorProperties.thermalConductivity');
    expect(res.body.errors[0].message).toMatch(/gives no thermal conductivity/);
    expect((await usageRows(h.store)).slice(before).every((r) => r.units === 0)).toBe(true);
  });

  it('estimates a caustic falling film from the NaOH model alone, saying its conductivity is Riedel’s, extrapolated', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, liquor: 'sodium-hydroxide', massFraction: 0.2, liquorProperties: undefined });
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.boilingSide.properties.source).toEqual({
      density: 'model',
      viscosity: 'model',
      thermalConductivity: 'model',
      heatCapacity: 'model',
    });
    // Riedel on IAPWS water at the boiling point, as the model computes it (W/(m·K) in and out).
    const T = b.liquorState.boilingTemperature + 273.15;
    expect(b.boilingSide.properties.thermalConductivity).toBeCloseTo(
      sodiumHydroxide.thermalConductivity?.(0.2, T) as number,
      3,
    );
    expect(b.boilingSide.properties.thermalConductivity / liquidThermalConductivity(T)).toBeCloseTo(1.213, 2);
    expect(b.provenance.models.map((m: { id: string }) => m.id)).toEqual(
      expect.arrayContaining(['sodium-hydroxide', 'chun-seban-1971']),
    );
    expect(b.overallHeatTransferCoefficient).toBeGreaterThan(500);
    expect(b.overallHeatTransferCoefficient).toBeLessThan(5000);
    // 20 % NaOH near 75 °C: beyond Riedel's 10–30 °C, x ≤ 0.10, said in the API's units.
    const extrapolated = b.warnings.filter(
      (w: { code: string; message: string }) =>
        w.code === 'model-extrapolated' && w.message.includes('the thermal conductivity is extrapolated'),
    );
    // The boiling temperature comes from the body pressure, so the edge names that field.
    expect(extrapolated.map((w: { field: string }) => w.field).sort()).toEqual([
      'bodyPressure',
      'massFraction',
    ]);
    const t = extrapolated.find((w: { field: string }) => w.field === 'bodyPressure');
    expect(t.message).toContain('10 °C to 30 °C');
    expect(b.cautions.map((c: { code: string }) => c.code)).toContain('hot-caustic-burns');
  });

  it('estimates a black-liquor falling film from the model alone, with the liquor-specific warnings', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        ...brine,
        liquor: 'kraft-black-liquor',
        massFraction: 0.5,
        bodyPressure: 50,
        steam: { temperature: 100 },
        liquorProperties: undefined,
      });
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.boilingSide.properties.source.thermalConductivity).toBe('model');
    const T = b.liquorState.boilingTemperature;
    // k = 1.44e-3·t − 0.335·S + 0.58 (from memory) at the boiling point t in °C.
    expect(b.boilingSide.properties.thermalConductivity).toBeCloseTo(1.44e-3 * T - 0.335 * 0.5 + 0.58, 3);
    const specific = b.warnings
      .filter((w: { code: string }) => w.code === 'liquor-specific-property')
      .map((w: { message: string }) => w.message.slice(0, 40));
    expect(specific).toEqual([
      expect.stringContaining('Black-liquor viscosity'),
      expect.stringContaining('Black-liquor thermal conductivity'),
    ]);
    expect(b.overallHeatTransferCoefficient).toBeGreaterThan(300);
    expect(b.overallHeatTransferCoefficient).toBeLessThan(4000);
    expect(b.provenance.models.map((m: { id: string }) => m.id)).toContain('kraft-black-liquor');
  });

  it('refuses a wall as thick as the tube radius with the range in m', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, tube: { ...brine.tube, wallThickness: '30 mm' } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'tube.wallThickness' });
    expect(res.body.errors[0].validRange).toMatchObject({ min: 0, max: 0.0254, unit: 'm' });
  });

  it('refuses a tube diameter outside its accepted range before any work', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, tube: { ...brine.tube, outsideDiameter: 2 } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'tube.outsideDiameter', value: 2 });
    expect(res.body.errors[0].validRange).toMatchObject({ min: 0, max: 0.5, unit: 'm' });
  });

  it('refuses steam colder than the boiling liquor, naming the steam field in °C', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, steam: { temperature: 60 } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('steam.temperature');
    expect(res.body.errors[0].validRange.unit).toBe('degC');
    expect(res.body.errors[0].validRange.min).toBeGreaterThan(60);
  });

  it('refuses a boiling temperature the liquor model cannot reach, with its range in °C', async () => {
    const { bodyPressure: _unused, ...rest } = brine;
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...rest, boilingTemperature: 300, steam: { temperature: 320 } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'boilingTemperature', value: 300 });
    expect(res.body.errors[0].validRange.unit).toBe('degC');
    expect(res.body.errors[0].validRange.max).toBeLessThan(300);
  });

  it('finds the body pressure from a given boiling temperature', async () => {
    const { bodyPressure: _unused, ...rest } = brine;
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...rest, boilingTemperature: 70 });
    expect(res.status).toBe(200);
    expect(res.body.liquorState.boilingTemperature).toBeCloseTo(70, 9);
    // Seawater boils above pure water: below p_sat(70 °C) = 31.20 kPa (IAPWS-IF97).
    expect(res.body.liquorState.bodyPressure).toBeLessThan(31.2);
  });

  it('asks for exactly one liquor state and the flow of the evaporator type', async () => {
    const both = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, boilingTemperature: 70 });
    expect(both.status).toBe(422);
    expect(both.body.errors.map((e: { field: string }) => e.field)).toContain('boilingTemperature');
    const noFlow = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, flow: {} });
    expect(noFlow.status).toBe(422);
    expect(noFlow.body.errors.map((e: { field: string }) => e.field)).toContain('flow.wettingRate');
    const forced = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, evaporatorType: 'forced-circulation' });
    expect(forced.status).toBe(422);
    const fields = forced.body.errors.map((e: { field: string }) => e.field);
    expect(fields).toEqual(expect.arrayContaining(['flow.tubeVelocity', 'flow.wettingRate']));
  });

  it('says the wetting-rate and heat-flux warnings in display units', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        ...brine,
        steam: { temperature: 110 },
        tube: { ...brine.tube, length: 2, material: 'copper-nickel-90-10' },
        flow: { wettingRate: 0.06, evaporatedFraction: 0.5 },
        fouling: { inside: 0, outside: 0 },
      });
    expect(res.status).toBe(200);
    const byCode = Object.fromEntries(res.body.warnings.map((w: { code: string }) => [w.code, w]));
    expect(byCode['wetting-rate-below-minimum'].message).toContain('0.03 kg/(m·s)');
    expect(byCode['wetting-rate-below-minimum'].field).toBe('flow.wettingRate');
    expect(byCode['falling-film-heat-flux-high'].message).toMatch(/\d kW\/m²/);
    expect(byCode['falling-film-heat-flux-high'].message).toContain('40 kW/m²');
  });

  it('estimates natural circulation with the assumed velocity stated and a warning', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...brine, evaporatorType: 'natural-circulation', flow: { circulationVelocity: '3 ft/s' } });
    expect(res.status).toBe(200);
    expect(res.body.boilingSide.velocity).toBeCloseTo(0.9144, 12);
    expect(res.body.assumptions.join(' ')).toContain('0.9144 m/s');
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain(
      'natural-circulation-approximate',
    );
  });

  it('runs in a batch, each case with its own liquor, and charges only the successes', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'overall-coefficient',
        cases: [brine, { ...brine, tube: { ...brine.tube, wallThickness: '30 mm' } }],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 2, succeeded: 1, failed: 1, unitsCharged: 2 });
    expect(res.body.results[0].result.overallHeatTransferCoefficient).toBeGreaterThan(0);
    expect(res.body.results[1].problem.errors[0].field).toBe('cases[1].tube.wallThickness');
  });
});

describe('tube materials', () => {
  it('offers in the contract exactly the materials of the engine’s table', async () => {
    const { WALL_MATERIALS } = await import('../../shared/contracts/heat-transfer.js');
    const { wallMaterials } = await import('../../server/engine/heat-transfer/materials.js');
    expect([...WALL_MATERIALS]).toEqual(wallMaterials.map((m) => m.id));
  });
});
