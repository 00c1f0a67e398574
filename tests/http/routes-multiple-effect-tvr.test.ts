// POST /v1/evaporators/multiple-effect with a thermocompressor, condensate flash and figures of
// merit; the single effect's figures of merit; a batch case. The numbers are checked in the
// engine's tests (tests/engine/evaporators/multiple-effect-tvr.test.ts); here: what the API says,
// in its units, and how it refuses.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, usageRows, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });
const ME = '/v1/evaporators/multiple-effect';

/** An invented four-effect seawater distiller: chest 35 kPa, last effect 8 kPa, motive 10 bar. */
const distiller = {
  liquor: 'seawater',
  effects: 4,
  feed: { massFlow: 20, massFraction: 0.042, temperature: 35 },
  product: { massFraction: 0.07 },
  steam: { pressure: 35 },
  lastEffectPressure: 8,
  overallHeatTransferCoefficients: [2400, 2300, 2200, 2100],
  thermocompressor: { motivePressure: '10 bar' },
};

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

describe('POST /v1/evaporators/multiple-effect with a thermocompressor', () => {
  it('answers the ejector, the chest of effect 1 and the economy per kg of motive steam', async () => {
    const res = await request(h.app).post(ME).set(auth()).send(distiller);
    expect(res.status).toBe(200);
    const t = res.body.thermocompressor;
    expect(t.entrainedFromEffect).toBe(4);
    expect(t.suctionPressure).toBeCloseTo(8, 9); // kPa
    expect(t.compressionRatio).toBeCloseTo(35 / 8, 9);
    expect(t.expansionRatio).toBeCloseTo(1000 / 8, 9);
    expect(t.entrainmentRatio * t.motivePerEntrained).toBeCloseTo(1, 9);
    expect(rel(t.motiveSteamFlow / t.entrainedVaporFlow, t.motivePerEntrained)).toBeLessThan(1e-9);
    // steam = the discharge into the chest: 35 kPa, motive + entrained
    expect(res.body.steam.pressure).toBeCloseTo(35, 9);
    expect(rel(res.body.steam.massFlow, t.motiveSteamFlow + t.entrainedVaporFlow)).toBeLessThan(1e-9);
    expect(rel(res.body.steamEconomy, res.body.evaporation / t.motiveSteamFlow)).toBeLessThan(1e-9);
    expect(t.dischargeEnthalpy).toBeGreaterThan(2600); // kJ/kg, superheated vapour
    expect(t.dischargeTemperature).toBeGreaterThan(res.body.steam.temperature); // °C
    expect(res.body.cautions.map((c: { code: string }) => c.code)).toContain('thermocompressor');
  });

  it('reports the seawater figures of merit with the motive steam as heating steam', async () => {
    const res = await request(h.app).post(ME).set(auth()).send(distiller);
    const f = res.body.figuresOfMerit;
    const t = res.body.thermocompressor;
    expect(rel(f.gainOutputRatio, res.body.evaporation / t.motiveSteamFlow)).toBeLessThan(1e-9);
    expect(rel(f.specificHeatTransferArea, res.body.totalArea / res.body.evaporation)).toBeLessThan(1e-9);
    // PR·Q_in = M_d·2326 kJ/kg and specific thermal energy = Q_in/V_d (kWh/m³): both give Q_in
    const heatFromPr = (res.body.evaporation * 2326) / f.performanceRatio; // kW
    const heatFromSte = f.specificThermalEnergy * 3600 * (res.body.evaporation / 1000); // kW
    expect(rel(heatFromPr, heatFromSte)).toBeLessThan(1e-9);
    expect(f.specificElectricEnergy).toBeNull();
  });

  it('works on one effect', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, effects: 1, overallHeatTransferCoefficients: [2400] });
    expect(res.status).toBe(200);
    expect(res.body.thermocompressor.entrainedFromEffect).toBe(1);
  });

  it('entrains from the effect asked for', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, thermocompressor: { motivePressure: 1000, entrainedFromEffect: 2 } });
    expect(res.status).toBe(200);
    expect(res.body.thermocompressor.entrainedFromEffect).toBe(2);
    expect(res.body.thermocompressor.suctionPressure).toBeCloseTo(res.body.effects[1].pressure, 6);
  });

  it('reports the flash vapour of each effect with condensate flash', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, condensateFlash: true });
    expect(res.status).toBe(200);
    expect(res.body.effects.map((e: { flashVapor: number }) => e.flashVapor > 0)).toEqual([
      false,
      true,
      true,
      false,
    ]);
  });

  it('warns in kPa when the motive pressure leaves the correlation', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, thermocompressor: { motivePressure: 4000 } });
    expect(res.status).toBe(200);
    const w = res.body.warnings.find(
      (x: { field?: string }) => x.field === 'thermocompressor.motivePressure',
    );
    expect(w.code).toBe('model-extrapolated');
    expect(w.message).toContain('4000 kPa');
    expect(w.message).toContain('3500 kPa');
  });
});

describe('Thermocompressor refusals', () => {
  it('refuses a motive pressure not above the discharge, naming it in kPa', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, thermocompressor: { motivePressure: 30 } });
    expect(res.status).toBe(422);
    const e = res.body.errors[0];
    expect(e.field).toBe('thermocompressor.motivePressure');
    expect(e.value).toBeCloseTo(30, 9);
    expect(e.validRange.min).toBeCloseTo(35, 9);
    expect(e.validRange.unit).toBe('kPa');
  });

  it('refuses a discharge not above the suction pressure, naming steam.pressure in kPa', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, lastEffectPressure: 35 });
    expect(res.status).toBe(422);
    const e = res.body.errors[0];
    expect(e.field).toBe('steam.pressure');
    expect(e.validRange.min).toBeCloseTo(35, 9);
    expect(e.message).toContain('vapour it entrains');
  });

  it('refuses an entrained effect beyond the train and a chest-steam superheat', async () => {
    const beyond = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, thermocompressor: { motivePressure: 1000, entrainedFromEffect: 5 } });
    expect(beyond.status).toBe(422);
    expect(beyond.body.errors[0].field).toBe('thermocompressor.entrainedFromEffect');
    const superheat = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, steam: { pressure: 35, superheat: 10 } });
    expect(superheat.status).toBe(422);
    expect(superheat.body.errors[0].field).toBe('steam.superheat');
  });

  it('refuses unknown keys inside the thermocompressor', async () => {
    const res = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...distiller, thermocompressor: { motivePressure: 1000, nozzle: 3 } });
    expect(res.status).toBe(422);
  });
});

describe('figuresOfMerit on other liquors', () => {
  const caustic = {
    liquor: 'sodium-hydroxide',
    effects: 3,
    feed: { massFlow: 3, massFraction: 0.1, temperature: 50 },
    product: { massFraction: 0.3 },
    steam: { pressure: '4 barg' },
    lastEffectPressure: 15,
    overallHeatTransferCoefficients: [2500, 2000, 1500],
  };

  it('leaves them out for caustic unless asked, and gives them when asked', async () => {
    const plain = await request(h.app).post(ME).set(auth()).send(caustic);
    expect(plain.status).toBe(200);
    expect(plain.body.figuresOfMerit).toBeUndefined();
    const asked = await request(h.app)
      .post(ME)
      .set(auth())
      .send({ ...caustic, figuresOfMerit: true });
    expect(asked.status).toBe(200);
    const f = asked.body.figuresOfMerit;
    expect(rel(f.gainOutputRatio, asked.body.evaporation / asked.body.steam.massFlow)).toBeLessThan(1e-9);
    expect(rel(f.specificHeatTransferArea, asked.body.totalArea / asked.body.evaporation)).toBeLessThan(1e-9);
  });

  it('gives them on a seawater single effect and leaves them out when turned off', async () => {
    const body = {
      liquor: 'seawater',
      feed: { massFlow: 10, massFraction: 0.035, temperature: 30 },
      product: { massFraction: 0.06 },
      steam: { pressure: 40 },
      body: { pressure: 10, overallHeatTransferCoefficient: 2200 },
    };
    const on = await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(body);
    expect(on.status).toBe(200);
    const f = on.body.figuresOfMerit;
    expect(rel(f.gainOutputRatio, on.body.vapor.massFlow / on.body.steam.massFlow)).toBeLessThan(1e-9);
    expect(rel(f.specificHeatTransferArea, on.body.area / on.body.vapor.massFlow)).toBeLessThan(1e-9);
    // PR = M_d·2326/(S·q): q = latentHeat here (saturated steam, saturated condensate)
    const pr = (on.body.vapor.massFlow * 2326) / (on.body.steam.massFlow * on.body.steam.latentHeat);
    expect(rel(f.performanceRatio, pr)).toBeLessThan(1e-9);
    const off = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({ ...body, figuresOfMerit: false });
    expect(off.body.figuresOfMerit).toBeUndefined();
  });
});

describe('a thermocompressor case in a batch', () => {
  it('runs and is billed like the single call', async () => {
    const hb = await makeHarness({ quota: 1000 });
    const rest = distiller;
    const res = await request(hb.app)
      .post('/v1/batch')
      .set({ Authorization: `Bearer ${hb.token}` })
      .send({
        operation: 'multiple-effect',
        cases: [rest, { ...rest, thermocompressor: { motivePressure: 30 } }],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 2, succeeded: 1, failed: 1 });
    expect(res.body.results[0].result.thermocompressor.entrainedFromEffect).toBe(4);
    expect(res.body.results[1].problem.errors[0].field).toBe('cases[1].thermocompressor.motivePressure');
    expect((await usageRows(hb.store)).map((r) => r.operation)).toEqual(['batch']);
  });
});
