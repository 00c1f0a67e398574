// Route /v1/evaporators/mechanical-vapor-recompression: the IF97 hand calculation through the API
// in display units, refusals naming the field and range, warnings, metering and a batch case.
import { readFileSync } from 'node:fs';
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, usageRows, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });
const PATH = '/v1/evaporators/mechanical-vapor-recompression';

/** python3-iapws hand calculation: tests/fixtures/recompression/generate_mvr_fixture.py (SI). */
const fixture = JSON.parse(
  readFileSync(new URL('../fixtures/recompression/mvr-iapws.json', import.meta.url), 'utf8'),
) as {
  cases: {
    name: string;
    shaftPower: number;
    electricPower: number;
    dischargeTemperature: number;
    dischargePressure: number;
    desuperheatingWater: number;
    makeUpSteam: number;
    surplusVapor: number;
    evaporation: number;
    stages: number;
  }[];
};
const oneStage = fixture.cases.find((c) => c.name === 'one-stage-make-up')!;
const threeStages = fixture.cases.find((c) => c.name === 'three-stages')!;
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** The fixture's "one-stage-make-up" case in the API's units (test liquor: BPR 1.5 K, c_p = 4.18 − 2.5·x kJ/(kg·K)). */
const oneStageBody = {
  liquor: {
    name: 'Dilute test liquor',
    boilingPointRise: { polynomial: [1.5] },
    heatCapacity: { polynomial: [4.18, -2.5] },
    validity: { massFraction: { min: 0, max: 0.2 } },
  },
  feed: { massFlow: 10, massFraction: 0.03, temperature: '333.15 K' },
  product: { massFraction: 0.06 },
  body: { pressure: 31, overallHeatTransferCoefficient: 2500, temperatureDifference: 5 },
  compressor: { isentropicEfficiency: 0.75, driveEfficiency: 0.95 },
  heatLossFraction: 0.01,
  suctionPressureDrop: '5 mbar',
  makeUpSteam: { pressure: '2 bar' },
};

describe(`POST ${PATH}`, () => {
  it('gives the hand-calculated compressor, make-up steam and specific energy in display units', async () => {
    const res = await request(h.app).post(PATH).set(auth()).send(oneStageBody);
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.mode).toBe('design');
    expect(b.compressor.suctionPressure).toBeCloseTo(30.5, 9); // kPa: 31 − 0.5
    expect(rel(b.compressor.dischargePressure, oneStage.dischargePressure / 1e3)).toBeLessThan(1e-5);
    expect(rel(b.compressor.shaftPower, oneStage.shaftPower / 1e3)).toBeLessThan(1e-5); // kW
    expect(rel(b.compressor.electricPower, oneStage.electricPower / 1e3)).toBeLessThan(1e-5);
    expect(b.compressor.dischargeTemperature).toBeCloseTo(oneStage.dischargeTemperature - 273.15, 3); // °C
    expect(rel(b.compressor.desuperheatingWater, oneStage.desuperheatingWater)).toBeLessThan(1e-5);
    expect(rel(b.makeUpSteam.massFlow, oneStage.makeUpSteam)).toBeLessThan(1e-5);
    expect(b.makeUpSteam.pressure).toBeCloseTo(200, 9);
    expect(b.surplusVapor.massFlow).toBe(0);
    expect(b.compressor.stages).toBe(1);
    // kWh per tonne evaporated: W_el [W] / V [kg/s] / 3600 (1 kWh/t = 3600 J/kg, exact)
    expect(rel(b.specificEnergy, oneStage.electricPower / oneStage.evaporation / 3600)).toBeLessThan(1e-5);
    expect(b.temperatureDifference).toBeCloseTo(5, 9);
    expect(b.balances.energy).toBeLessThan(1e-9);
    expect(b.balances.mass).toBeLessThan(1e-9);
    expect(b.cautions.map((c: { code: string }) => c.code)).toEqual(
      expect.arrayContaining(['rotating-machinery', 'hot-compressor-discharge', 'vacuum-equipment']),
    );
    const row = (await usageRows(h.store)).at(-1)!;
    expect(row).toMatchObject({
      operation: 'evaporators.mechanical-vapor-recompression',
      status: 200,
      units: 5,
    });
  });

  it('splits a pressure ratio of 2.5 into three stages at 1.4 per stage', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        ...oneStageBody,
        feed: { massFlow: 4, massFraction: 0.02, temperature: '340.15 K' },
        product: { massFraction: 0.05 },
        body: { pressure: 30, overallHeatTransferCoefficient: 2500 },
        compressor: { isentropicEfficiency: 0.8, driveEfficiency: 0.95, dischargePressure: 75 },
        heatLossFraction: undefined,
        suctionPressureDrop: undefined,
        makeUpSteam: undefined,
      });
    expect(res.status).toBe(200);
    expect(res.body.compressor.stages).toBe(threeStages.stages);
    expect(res.body.compressor.pressureRatio).toBeCloseTo(2.5, 9);
    expect(res.body.compressor.stagePressureRatio).toBeCloseTo(2.5 ** (1 / 3), 5);
    expect(rel(res.body.compressor.shaftPower, threeStages.shaftPower / 1e3)).toBeLessThan(1e-5);
    expect(rel(res.body.surplusVapor.massFlow, threeStages.surplusVapor)).toBeLessThan(1e-4);
  });

  it('rates a given area: the design’s area gives back its ΔT', async () => {
    const design = await request(h.app).post(PATH).set(auth()).send(oneStageBody);
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        ...oneStageBody,
        body: { pressure: 31, overallHeatTransferCoefficient: 2500, area: design.body.area },
      });
    expect(res.status).toBe(200);
    expect(res.body.mode).toBe('rating');
    expect(res.body.temperatureDifference).toBeCloseTo(5, 4);
  });

  it('refuses ΔT and a discharge pressure together, naming both fields', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, compressor: { dischargePressure: 45 } });
    expect(res.status).toBe(422);
    const fields = res.body.errors.map((e: { field: string }) => e.field);
    expect(fields).toEqual(
      expect.arrayContaining(['body.temperatureDifference', 'compressor.dischargePressure']),
    );
    expect(res.body.errors[0].message).toMatch(
      /body\.temperatureDifference and compressor\.dischargePressure/,
    );
  });

  it('refuses ΔT and an area together, and none of ΔT, area and discharge pressure', async () => {
    const both = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, body: { ...oneStageBody.body, area: 100 } });
    expect(both.status).toBe(422);
    expect(both.body.errors.map((e: { field: string }) => e.field)).toEqual(
      expect.arrayContaining(['body.temperatureDifference', 'body.area']),
    );
    const none = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, body: { pressure: 31, overallHeatTransferCoefficient: 2500 } });
    expect(none.status).toBe(422);
    expect(none.body.errors[0].field).toBe('body.temperatureDifference');
    // a refused request costs nothing
    expect((await usageRows(h.store)).at(-1)).toMatchObject({ status: 422, units: 0 });
  });

  it('refuses an isentropic efficiency outside (0, 1] with the range, and warns outside 0.5–0.9', async () => {
    const bad = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, compressor: { isentropicEfficiency: 1.2 } });
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0]).toMatchObject({
      field: 'compressor.isentropicEfficiency',
      validRange: { min: 0, max: 1 },
    });
    const low = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, compressor: { isentropicEfficiency: 0.45 } });
    expect(low.status).toBe(200);
    expect(low.body.warnings.map((w: { code: string }) => w.code)).toContain('unusual-isentropic-efficiency');
  });

  it('refuses a discharge pressure not above the suction pressure, in kPa', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        ...oneStageBody,
        body: { pressure: 31, overallHeatTransferCoefficient: 2500 },
        compressor: { dischargePressure: 30 },
      });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('compressor.dischargePressure');
    expect(res.body.errors[0].validRange).toMatchObject({ min: 30.5, unit: 'kPa' });
  });

  it('refuses make-up steam below the discharge pressure, giving the range in kPa', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, makeUpSteam: { pressure: 35 } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe('makeUpSteam.pressure');
    expect(res.body.errors[0].validRange.unit).toBe('kPa');
    // the minimum is the discharge pressure of the hand calculation
    expect(rel(res.body.errors[0].validRange.min, oneStage.dischargePressure / 1e3)).toBeLessThan(1e-3);
  });

  it('refuses stages that are not a whole number from 1 to 10', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, compressor: { stages: 11 } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'compressor.stages', validRange: { min: 1, max: 10 } });
    expect(res.body.errors[0].message).toMatch(/whole number from 1 to 10/);
  });

  it('warns when given stages exceed the ratio one stage gives, and when the BPR is large against the lift', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        ...oneStageBody,
        liquor: { ...oneStageBody.liquor, boilingPointRise: { polynomial: [8] } },
        body: { pressure: 31, overallHeatTransferCoefficient: 2500, temperatureDifference: 4 },
        compressor: { stages: 1, maxPressureRatioPerStage: 1.3 },
        makeUpSteam: undefined,
      });
    expect(res.status).toBe(200);
    const byCode = new Map(res.body.warnings.map((w: { code: string }) => [w.code, w]));
    const stages = byCode.get('stage-pressure-ratio-above-limit') as { field: string; message: string };
    expect(stages.field).toBe('compressor.stages');
    expect(stages.message).toMatch(/needs \d+ stages/);
    const bpr = byCode.get('boiling-point-rise-large-for-recompression') as { message: string };
    // said in display units: the BPR is 8 K
    expect(bpr.message).toMatch(/boiling-point rise 8 K/);
  });

  it('runs in a batch and charges only the cases that succeed', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'mechanical-vapor-recompression',
        cases: [oneStageBody, { ...oneStageBody, compressor: { isentropicEfficiency: 0 } }],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 2, succeeded: 1, failed: 1, unitsCharged: 5 });
    expect(rel(res.body.results[0].result.compressor.shaftPower, oneStage.shaftPower / 1e3)).toBeLessThan(
      1e-5,
    );
    expect(res.body.results[1].problem.errors[0].field).toBe('cases[1].compressor.isentropicEfficiency');
  });
});

describe(`${PATH}: desalination figures of merit`, () => {
  // Definitions: El-Dessouky & Ettouney, Fundamentals of Salt Water Desalination (2002): GOR =
  // distillate / heating steam; PR = distillate·2326 kJ/kg / heat input; specific electric energy
  // = electric power per m³ of distillate at 1000 kg/m³. Recomputed here from the result's streams.
  it('reports them when asked, with the make-up steam as the heating steam and the drive power per m³', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({ ...oneStageBody, figuresOfMerit: true });
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.makeUpSteam.massFlow).toBeGreaterThan(0);
    const f = b.figuresOfMerit;
    expect(f.gainOutputRatio).toBeCloseTo(b.vapor.massFlow / b.makeUpSteam.massFlow, 6);
    // kW / (m³/s) = kJ/m³; / 3600 → kWh/m³
    const volumeFlow = b.vapor.massFlow / 1000;
    expect(f.specificElectricEnergy).toBeCloseTo(b.compressor.electricPower / volumeFlow / 3600, 4);
    expect(f.specificHeatTransferArea).toBeCloseTo(b.area / b.vapor.massFlow, 6);
    expect(f.performanceRatio).toBeGreaterThan(0);
  });

  it('gives null ratios with a warning when no make-up steam is drawn, and reports them for seawater unasked', async () => {
    const res = await request(h.app)
      .post(PATH)
      .set(auth())
      .send({
        liquor: 'seawater',
        feed: { massFlow: 20, massFraction: '42 g/kg', temperature: 58 },
        product: { massFraction: '70 g/kg' },
        body: { pressure: 20, overallHeatTransferCoefficient: 2400, temperatureDifference: 5 },
      });
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.makeUpSteam.massFlow).toBe(0);
    expect(b.figuresOfMerit.gainOutputRatio).toBeNull();
    expect(b.figuresOfMerit.performanceRatio).toBeNull();
    expect(b.figuresOfMerit.specificElectricEnergy).toBeGreaterThan(0);
    expect(b.warnings.map((w: { code: string }) => w.code)).toContain('no-heating-steam');
  });

  it('leaves them out for other liquors unless asked', async () => {
    const res = await request(h.app).post(PATH).set(auth()).send(oneStageBody);
    expect(res.status).toBe(200);
    expect(res.body.figuresOfMerit).toBeUndefined();
  });
});

describe(`${PATH}: the suction pressure drop is a difference`, () => {
  it('refuses a gauge or vacuum reading for it, naming the field, instead of reading it as absolute', async () => {
    for (const drop of ['0.05 barg', '2 inHg vac']) {
      const res = await request(h.app)
        .post(PATH)
        .set(auth())
        .send({ ...oneStageBody, suctionPressureDrop: drop });
      expect(res.status).toBe(422);
      expect(res.body.errors[0].field).toBe('suctionPressureDrop');
      expect(res.body.errors[0].message).toContain(
        'a pressure difference is not read against the atmosphere',
      );
    }
  });

  it('still takes a plain difference in mbar, kPa or bar', async () => {
    for (const drop of ['5 mbar', '0.5 kPa', '0.005 bar']) {
      const res = await request(h.app)
        .post(PATH)
        .set(auth())
        .send({ ...oneStageBody, suctionPressureDrop: drop });
      expect(res.status).toBe(200);
      // 5 mbar = 0.5 kPa = 0.005 bar (SI definitions): suction = 31 − 0.5 kPa
      expect(res.body.compressor.suctionPressure).toBeCloseTo(30.5, 9);
    }
  });
});
