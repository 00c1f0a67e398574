// POST /v1/studies/evaporator-schemes: the study's rows are the single multiple-effect calls they
// stand for, the ranking and its ±30 % sensitivity follow from those rows by hand, infeasible and
// unavailable candidates say why, refusals name the field, and the study costs what its single
// calls would.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, usageRows, type Harness } from './helpers.js';

const STUDY = '/v1/studies/evaporator-schemes';
const SINGLE = '/v1/evaporators/multiple-effect';
const MVR = '/v1/evaporators/mechanical-vapor-recompression';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 1_000_000 });
});
const auth = (token = h.token) => ({ Authorization: `Bearer ${token}` });

/** An invented caustic duty: 12 t/h of 10 % NaOH at 60 °C to 30 %, backward feed, steam 9 barg, last effect 15 kPa. */
const duty = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: '12 t/h', massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  lowestPressure: 15,
  steam: { pressure: '9 barg' },
  overallHeatTransferCoefficient: 2000,
  feedArrangement: 'backward',
};
/** Invented prices (money in an invented currency). */
const prices = {
  steamPrice: 30,
  electricityPrice: 0.12,
  operatingHoursPerYear: 8000,
  bodyCost: { reference: 250_000, referenceArea: 100, exponent: 0.6 },
  compressorCost: { reference: 900_000, referenceShaftPower: 500, exponent: 0.7 },
  interestRate: 0.08,
  lifeYears: 15,
};
const study = (over: Record<string, unknown> = {}) => ({ ...duty, maxEffects: 4, prices, ...over });

/** The single call a train row of the study stands for. */
const single = (effects: number, d: Record<string, unknown> = duty) => {
  const { lowestPressure, overallHeatTransferCoefficient, ...rest } = d;
  return {
    ...rest,
    effects,
    lastEffectPressure: lowestPressure,
    overallHeatTransferCoefficients: Array.from({ length: effects }, () => overallHeatTransferCoefficient),
  };
};

interface Row {
  scheme: string;
  effects: number;
  feasible: boolean;
  reason?: string;
  steamMassFlow: number | null;
  electricPower: number | null;
  shaftPower: number | null;
  totalArea: number | null;
  annualEnergyCost: number | null;
  installedCost: number | null;
  capitalRecoveryFactor: number | null;
  capitalCharge: number | null;
  totalAnnualCost: number | null;
  steamEconomy: number | null;
}

describe('POST /v1/studies/evaporator-schemes', () => {
  it('gives for each train the steam and area of the separate multiple-effect call it stands for', async () => {
    const res = await request(h.app).post(STUDY).set(auth()).send(study());
    expect(res.status).toBe(200);
    const rows = res.body.candidates as Row[];
    expect(rows.map((r) => r.effects)).toEqual([1, 2, 3, 4]);
    for (const row of rows) {
      const one = await request(h.app).post(SINGLE).set(auth()).send(single(row.effects));
      expect(one.status).toBe(200);
      expect(row.scheme).toBe('multiple-effect');
      expect(row.feasible).toBe(true);
      expect(row.steamMassFlow).toBe(one.body.steam.massFlow);
      expect(row.totalArea).toBeCloseTo(one.body.totalArea, 9);
      expect(row.steamEconomy).toBeCloseTo(one.body.steamEconomy, 9);
      expect(row.electricPower).toBe(0);
      expect(row.shaftPower).toBe(0);
    }
    // More effects, less steam (a check of the physics, common practice).
    for (let i = 1; i < rows.length; i++)
      expect(rows[i]!.steamMassFlow!).toBeLessThan(rows[i - 1]!.steamMassFlow!);
  });

  it('costs each row as the stated formulas do by hand and ranks by total annual cost', async () => {
    const res = await request(h.app).post(STUDY).set(auth()).send(study());
    const rows = res.body.candidates as Row[];
    // CRF(8 %, 15 y) by hand: 1.08^15 = 3.172169…, 0.08 × 3.172169/2.172169 = 0.116830.
    let g = 1;
    for (let k = 0; k < 15; k++) g *= 1.08;
    const crf = (0.08 * g) / (g - 1);
    for (const row of rows) {
      const energy = row.steamMassFlow! * 3.6 * 30 * 8000;
      const installed = row.effects * 250_000 * Math.pow(row.totalArea! / row.effects / 100, 0.6);
      expect(row.capitalRecoveryFactor).toBeCloseTo(crf, 10);
      expect(row.annualEnergyCost).toBeCloseTo(energy, 4);
      expect(row.installedCost).toBeCloseTo(installed, 3);
      expect(row.capitalCharge).toBeCloseTo(crf * installed, 3);
      expect(row.totalAnnualCost).toBeCloseTo(energy + crf * installed, 3);
    }
    const best = rows.reduce((b, r, i) => (r.totalAnnualCost! < rows[b]!.totalAnnualCost! ? i : b), 0);
    expect(res.body.cheapest).toBe(best);
  });

  it('names the cheapest at each price −30 % and +30 %, and the switch the rows predict', async () => {
    // Ten effects: the trade between steam and bodies turns near 8–10 effects at these prices.
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ maxEffects: 10 }));
    expect(res.status).toBe(200);
    const rows = res.body.candidates as Row[];
    const crf = rows[0]!.capitalRecoveryFactor!;
    /** The cheapest row by hand, with the steam price and the body reference cost scaled. */
    const cheapestBy = (steam: number, body: number) => {
      const tac = rows.map(
        (r) =>
          r.steamMassFlow! * 3.6 * 30 * steam * 8000 +
          crf * r.effects * 250_000 * body * Math.pow(r.totalArea! / r.effects / 100, 0.6),
      );
      return tac.indexOf(Math.min(...tac));
    };
    const base = cheapestBy(1, 1);
    expect(res.body.cheapest).toBe(base);
    const sens = res.body.sensitivity as {
      price: string;
      change: number;
      cheapest: number;
      changed: boolean;
    }[];
    const at = (price: string, change: number) => sens.find((s) => s.price === price && s.change === change)!;
    expect(at('steamPrice', -0.3).cheapest).toBe(cheapestBy(0.7, 1));
    expect(at('steamPrice', 0.3).cheapest).toBe(cheapestBy(1.3, 1));
    expect(at('bodyCost.reference', -0.3).cheapest).toBe(cheapestBy(1, 0.7));
    expect(at('bodyCost.reference', 0.3).cheapest).toBe(cheapestBy(1, 1.3));
    // Worked from the rows: the base case is 9 effects; cheaper steam pays for fewer bodies (8),
    // dearer steam for more (10). Trains draw no electricity and have no compressor, so those
    // prices change nothing.
    expect(base).toBe(8);
    expect(at('steamPrice', -0.3)).toMatchObject({ cheapest: 7, changed: true });
    expect(at('steamPrice', 0.3)).toMatchObject({ cheapest: 9, changed: true });
    expect(at('electricityPrice', 0.3)).toMatchObject({ cheapest: base, changed: false });
    expect(at('compressorCost.reference', -0.3)).toMatchObject({ cheapest: base, changed: false });
    expect(sens).toHaveLength(8);
  });

  it('lists a train with too many effects for the temperature difference as infeasible, with the reason in K', async () => {
    // 2 kg/s of 10 % NaOH to 40 % between 200 kPa steam and 30 kPa: the boiling-point rises of four
    // or more effects use up the ≈ 51 K available.
    const tight = {
      ...duty,
      feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
      product: { massFraction: 0.4 },
      steam: { pressure: 200 },
      lowestPressure: 30,
      feedArrangement: 'forward',
    };
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send({ ...tight, maxEffects: 6, prices });
    expect(res.status).toBe(200);
    const rows = res.body.candidates as Row[];
    expect(rows.map((r) => r.feasible)).toEqual([true, true, true, false, false, false]);
    const four = rows[3]!;
    expect(four.reason).toMatch(/boiling-point rises .* K/);
    expect(four.steamMassFlow).toBeNull();
    expect(four.totalAnnualCost).toBeNull();
    expect(res.body.cheapest).toBeLessThan(3);
    // The same reason as the single call's refusal.
    const one = await request(h.app).post(SINGLE).set(auth()).send(single(4, tight));
    expect(one.status).toBe(422);
    expect(one.body.detail).toBe(four.reason);
  });

  it('gives the MVR row the compressor power, make-up steam and area of the separate MVR call it stands for', async () => {
    const mvr = { temperatureDifference: 8, isentropicEfficiency: '75 %', driveEfficiency: 0.95 };
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ maxEffects: 2, mvr }));
    expect(res.status).toBe(200);
    const rows = res.body.candidates as Row[];
    expect(rows.map((r) => `${r.scheme}:${r.effects}`)).toEqual([
      'multiple-effect:1',
      'multiple-effect:2',
      'mechanical-vapor-recompression:1',
    ]);
    const row = rows[2]!;
    const one = await request(h.app)
      .post(MVR)
      .set(auth())
      .send({
        liquor: duty.liquor,
        feed: duty.feed,
        product: duty.product,
        body: {
          pressure: duty.lowestPressure,
          overallHeatTransferCoefficient: duty.overallHeatTransferCoefficient,
          temperatureDifference: mvr.temperatureDifference,
        },
        compressor: { isentropicEfficiency: mvr.isentropicEfficiency, driveEfficiency: mvr.driveEfficiency },
        makeUpSteam: duty.steam,
      });
    expect(one.status).toBe(200);
    expect(row.feasible).toBe(true);
    expect(row.shaftPower).toBe(one.body.compressor.shaftPower);
    expect(row.electricPower).toBe(one.body.compressor.electricPower);
    expect(row.steamMassFlow).toBe(one.body.makeUpSteam.massFlow);
    expect(row.totalArea).toBe(one.body.area);
    expect(res.body.cautions.map((c: { code: string }) => c.code)).toContain('rotating-machinery');
  });

  it('gives each TVR row the motive steam and area of the separate multiple-effect call with a thermocompressor', async () => {
    const tvr = { motivePressure: '25 barg' };
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ maxEffects: 3, tvr }));
    expect(res.status).toBe(200);
    const rows = (res.body.candidates as Row[]).filter((r) => r.scheme === 'thermal-vapor-recompression');
    expect(rows.map((r) => r.effects)).toEqual([1, 2, 3]);
    for (const row of rows) {
      const one = await request(h.app)
        .post(SINGLE)
        .set(auth())
        .send({ ...single(row.effects), thermocompressor: tvr });
      expect(one.status).toBe(200);
      expect(row.feasible).toBe(true);
      expect(row.steamMassFlow).toBe(one.body.thermocompressor.motiveSteamFlow);
      expect(row.totalArea).toBeCloseTo(one.body.totalArea, 9);
      expect(row.steamEconomy).toBeCloseTo(one.body.steamEconomy, 6);
    }
    // Recompressing the last effect's vapour saves steam against the plain train of as many effects.
    const plain = (res.body.candidates as Row[]).filter((r) => r.scheme === 'multiple-effect');
    for (let i = 0; i < 3; i++) expect(rows[i]!.steamMassFlow!).toBeLessThan(plain[i]!.steamMassFlow!);
  });

  it('carries the economic-screening caution and the engine cautions', async () => {
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ maxEffects: 1 }));
    const codes = (res.body.cautions as { code: string }[]).map((c) => c.code);
    expect(codes[0]).toBe('economic-screening');
    expect(codes).toContain('codes-and-licensed-engineer');
    expect(codes).toContain('hot-caustic-burns');
    expect(res.body.provenance.models.map((m: { id: string }) => m.id)).toContain(
      'sullivan-engineering-economy',
    );
  });

  it('accepts quantities with units in the prices (reference area in ft², shaft power in MW)', async () => {
    const a = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ maxEffects: 1 }));
    const b = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(
        study({
          maxEffects: 1,
          prices: {
            ...prices,
            bodyCost: { ...prices.bodyCost, referenceArea: '1076.391 ft2' },
            compressorCost: { ...prices.compressorCost, referenceShaftPower: '0.5 MW' },
          },
        }),
      );
    expect(b.status).toBe(200);
    expect(b.body.candidates[0].installedCost).toBeCloseTo(a.body.candidates[0].installedCost, 0);
  });
});

describe('refusals', () => {
  type Errors = { field: string; message: string }[];
  const cases: { name: string; body: Record<string, unknown>; field: string }[] = [
    {
      name: 'an exponent above 1.5',
      body: study({ prices: { ...prices, bodyCost: { ...prices.bodyCost, exponent: 2 } } }),
      field: 'prices.bodyCost.exponent',
    },
    {
      name: 'an interest rate above 1',
      body: study({ prices: { ...prices, interestRate: 1.2 } }),
      field: 'prices.interestRate',
    },
    {
      name: 'a life under a year',
      body: study({ prices: { ...prices, lifeYears: 0.5 } }),
      field: 'prices.lifeYears',
    },
    {
      name: 'more hours than a leap year has',
      body: study({ prices: { ...prices, operatingHoursPerYear: 8785 } }),
      field: 'prices.operatingHoursPerYear',
    },
    {
      name: 'a negative steam price',
      body: study({ prices: { ...prices, steamPrice: -1 } }),
      field: 'prices.steamPrice',
    },
    {
      name: 'a zero reference shaft power',
      body: study({
        prices: { ...prices, compressorCost: { ...prices.compressorCost, referenceShaftPower: 0 } },
      }),
      field: 'prices.compressorCost.referenceShaftPower',
    },
    { name: 'eleven effects', body: study({ maxEffects: 11 }), field: 'maxEffects' },
    { name: 'a fractional effect count', body: study({ maxEffects: 2.5 }), field: 'maxEffects' },
    {
      name: 'a zero compressor efficiency',
      body: study({ mvr: { temperatureDifference: 8, isentropicEfficiency: 0, driveEfficiency: 0.95 } }),
      field: 'mvr.isentropicEfficiency',
    },
    {
      name: 'an MVR ΔT of 80 K',
      body: study({ mvr: { temperatureDifference: 80, isentropicEfficiency: 0.7, driveEfficiency: 0.95 } }),
      field: 'mvr.temperatureDifference',
    },
    { name: 'no product', body: study({ product: {} }), field: 'product.massFraction' },
    {
      name: 'a feed enthalpy',
      body: study({ feed: { ...duty.feed, enthalpy: 200 } }),
      field: 'feed.enthalpy',
    },
    {
      name: 'an unknown price',
      body: study({ prices: { ...prices, carbonPrice: 80 } }),
      field: 'prices.carbonPrice',
    },
    {
      name: 'a motive pressure below the live steam',
      body: study({ tvr: { motivePressure: '5 barg' } }),
      field: 'tvr.motivePressure',
    },
  ];
  it.each(cases)('refuses $name naming $field, and bills nothing', async ({ body, field }) => {
    const res = await request(h.app).post(STUDY).set(auth()).send(body);
    expect(res.status).toBe(422);
    expect((res.body.errors as Errors).map((e) => e.field)).toContain(field);
    expect((await usageRows(h.store)).at(-1)).toMatchObject({
      operation: 'studies.evaporator-schemes',
      units: 0,
    });
  });

  it('states both bounds of a refused price in its message and range', async () => {
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ prices: { ...prices, bodyCost: { ...prices.bodyCost, exponent: 2 } } }));
    const e = (res.body.errors as { field: string; message: string; validRange: unknown }[])[0]!;
    expect(e.message).toBe('2 lies outside the accepted range 0 to 1.5');
    expect(e.validRange).toEqual({ min: 0, max: 1.5, unit: '' });
  });

  it('refuses a lowest pressure above the live steam, naming lowestPressure in kPa', async () => {
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(study({ lowestPressure: '12 bar' }));
    expect(res.status).toBe(422);
    const e = (res.body.errors as { field: string; validRange: { max: number; unit: string } }[])[0]!;
    expect(e.field).toBe('lowestPressure');
    expect(e.validRange).toMatchObject({ max: 1001.325, unit: 'kPa' });
  });

  it('refuses costs that overflow (a vanishing reference size) rather than send a non-finite number', async () => {
    const res = await request(h.app)
      .post(STUDY)
      .set(auth())
      .send(
        study({ prices: { ...prices, bodyCost: { reference: 1e12, referenceArea: 1e-300, exponent: 1.5 } } }),
      );
    expect(res.status).toBe(422);
    expect(res.body.detail).toMatch(/reference sizes/);
  });

  it('refuses a duty no candidate can meet, as the single-effect call would', async () => {
    const bad = study({ product: { massFraction: 0.05 } }); // leaner than the feed
    const res = await request(h.app).post(STUDY).set(auth()).send(bad);
    expect(res.status).toBe(422);
    const one = await request(h.app).post(SINGLE).set(auth()).send(single(1));
    expect(one.status).toBe(200);
    const oneBad = await request(h.app)
      .post(SINGLE)
      .set(auth())
      .send({ ...single(1), product: { massFraction: 0.05 } });
    expect(res.body.detail).toBe(oneBad.body.detail);
    expect((await usageRows(h.store)).at(-3)).toMatchObject({
      operation: 'studies.evaporator-schemes',
      units: 0,
    });
  });
});

describe('metering', () => {
  it('charges the sum of the units of the single calls its candidates stand for', async () => {
    const m = await makeHarness({ quota: 10_000 });
    const res = await request(m.app)
      .post(STUDY)
      .set(auth(m.token))
      .send(study({ mvr: { temperatureDifference: 8, isentropicEfficiency: 0.75, driveEfficiency: 0.95 } }));
    expect(res.status).toBe(200);
    for (let n = 1; n <= 4; n++) {
      expect((await request(m.app).post(SINGLE).set(auth(m.token)).send(single(n))).status).toBe(200);
    }
    const mvrCall = await request(m.app)
      .post(MVR)
      .set(auth(m.token))
      .send({
        liquor: duty.liquor,
        feed: duty.feed,
        product: duty.product,
        body: {
          pressure: duty.lowestPressure,
          overallHeatTransferCoefficient: 2000,
          temperatureDifference: 8,
        },
        makeUpSteam: duty.steam,
      });
    expect(mvrCall.status).toBe(200);
    const rows = await usageRows(m.store);
    const singles = rows.slice(1).reduce((s, r) => s + r.units, 0);
    // 1…4 effects at 5 + 5·n each = 70, and the MVR call's 5.
    expect(singles).toBe(75);
    expect(rows[0]).toMatchObject({ operation: 'studies.evaporator-schemes', units: singles });
    expect(res.body.unitsCharged).toBe(singles);
  });

  it('gives back the units of infeasible candidates, as their refused single calls cost nothing', async () => {
    const m = await makeHarness({ quota: 10_000 });
    const tight = {
      ...duty,
      feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
      product: { massFraction: 0.4 },
      steam: { pressure: 200 },
      lowestPressure: 30,
      feedArrangement: 'forward',
    };
    const res = await request(m.app)
      .post(STUDY)
      .set(auth(m.token))
      .send({ ...tight, maxEffects: 5, prices });
    expect(res.status).toBe(200);
    for (let n = 1; n <= 5; n++) await request(m.app).post(SINGLE).set(auth(m.token)).send(single(n, tight));
    const rows = await usageRows(m.store);
    const singles = rows.slice(1).reduce((s, r) => s + r.units, 0);
    expect(rows.slice(1).map((r) => r.status)).toEqual([200, 200, 200, 422, 422]);
    expect(singles).toBe(10 + 15 + 20); // 1, 2 and 3 effects
    expect(rows[0]!.units).toBe(singles);
    expect(res.body.unitsCharged).toBe(singles);
  });

  it('refuses with 429 before any work a study the quota cannot cover', async () => {
    const m = await makeHarness({ quota: 60 });
    // 1…4 effects: 70 units > 60.
    const res = await request(m.app).post(STUDY).set(auth(m.token)).send(study());
    expect(res.status).toBe(429);
    expect(res.body.detail).toMatch(/costs 70 units/);
    expect((await usageRows(m.store)).at(-1)).toMatchObject({ status: 429, units: 0 });
    const ok = await request(m.app)
      .post(STUDY)
      .set(auth(m.token))
      .send(study({ maxEffects: 3 }));
    expect(ok.status).toBe(200);
    expect(ok.body.unitsCharged).toBe(45);
  });
});
