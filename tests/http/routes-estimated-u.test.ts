// Evaporator routes with U given as { estimate }: the estimate at each effect's solved state,
// reported with its resistances (the same shape as POST /v1/heat-transfer/overall-coefficient and,
// at the displayed state, the same U), the refusals naming the effect's estimate field, the units
// it costs (single calls and batch cases) and a train.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import { operationCatalogue } from '../../shared/operations.js';
import { makeHarness, usageRows, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const auth = () => ({ Authorization: `Bearer ${h.token}` });

const fallingFilm = {
  evaporatorType: 'falling-film',
  tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'titanium-grade-2' },
  flow: { wettingRate: '1800 kg/(m*h)' },
};
// An invented seawater concentrator: 10 kg/s from 35 to 70 g/kg, steam at 80 °C, body at 31 kPa.
const single = {
  liquor: 'seawater',
  feed: { massFlow: 10, massFraction: 0.035, temperature: 60 },
  product: { massFraction: 0.07 },
  steam: { temperature: 80 },
  body: { pressure: 31, overallHeatTransferCoefficient: { estimate: fallingFilm } },
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
const UNITS = {
  single: operationCatalogue.singleEffect.units,
  estimate: operationCatalogue.overallCoefficient.units,
  train: operationCatalogue.multipleEffect.units,
  perEffect: operationCatalogue.multipleEffect.unitsPerEffect!,
  mvr: operationCatalogue.mechanicalVaporRecompression.units,
};

/** The standalone estimate at a breakdown's state (as displayed: °C, kPa). */
async function standalone(
  ht: {
    liquorState: { massFraction: number; boilingTemperature: number; bodyPressure: number };
    steam: { temperature: number };
  },
  liquor: string,
  estimate: object,
) {
  const res = await request(h.app)
    .post('/v1/heat-transfer/overall-coefficient')
    .set(auth())
    .send({
      ...estimate,
      liquor,
      massFraction: ht.liquorState.massFraction,
      boilingTemperature: ht.liquorState.boilingTemperature,
      steam: { temperature: ht.steam.temperature },
    });
  expect(res.status).toBe(200);
  return res.body;
}

describe('single effect with an estimated U', () => {
  it('sizes the falling film on the outside area with the standalone estimate at its state', async () => {
    const res = await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(single);
    expect(res.status).toBe(200);
    const b = res.body;
    const ht = b.heatTransfer;
    expect(ht.area).toBe('outside');
    expect(ht.liquorState.massFraction).toBeCloseTo(0.07, 9);
    expect(ht.steam.temperature).toBeCloseTo(80, 9);
    // Falling films on water-like liquors with the default (TEMA) fouling: about 1000–2000
    // W/(m²·K) (1500–3000 clean; common practice, from memory).
    expect(ht.overallHeatTransferCoefficient).toBeGreaterThan(1000);
    expect(ht.overallHeatTransferCoefficient).toBeLessThan(2000);
    // A = Q/(U·ΔT), the duty in kW.
    expect((b.duty * 1000) / (ht.overallHeatTransferCoefficient * b.temperatureDifference)).toBeCloseTo(
      b.area,
      2,
    );
    // At the displayed state (6 significant digits) the standalone call gives the same U.
    const alone = await standalone(ht, 'seawater', fallingFilm);
    expect(alone.overallHeatTransferCoefficient / ht.overallHeatTransferCoefficient).toBeCloseTo(1, 5);
    expect(Object.keys(ht).sort()).toEqual(
      Object.keys(alone)
        .filter((k) => k !== 'provenance')
        .sort(),
    );
    expect(b.provenance.models.map((m: { id: string }) => m.id)).toContain('chun-seban-1971');
  });

  it('meters the calculation and the estimate together', async () => {
    const before = (await usageRows(h.store)).length;
    await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(single).expect(200);
    expect((await usageRows(h.store)).slice(before)).toEqual([
      expect.objectContaining({
        operation: 'evaporators.single-effect',
        units: UNITS.single + UNITS.estimate,
      }),
    ]);
    // a plain U costs the plain price
    const plain = { ...single, body: { pressure: 31, overallHeatTransferCoefficient: 1500 } };
    const b2 = (await usageRows(h.store)).length;
    await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(plain).expect(200);
    expect((await usageRows(h.store)).slice(b2)).toEqual([
      expect.objectContaining({ operation: 'evaporators.single-effect', units: UNITS.single }),
    ]);
  });

  it('rates a given area with the estimate re-evaluated at the state it reaches', async () => {
    const design = await request(h.app).post('/v1/evaporators/single-effect').set(auth()).send(single);
    const res = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({ ...single, product: {}, body: { ...single.body, area: design.body.area } });
    expect(res.status).toBe(200);
    expect(res.body.product.massFraction).toBeCloseTo(0.07, 5);
    expect(res.body.heatTransfer.overallHeatTransferCoefficient).toBeCloseTo(
      design.body.heatTransfer.overallHeatTransferCoefficient,
      2,
    );
  });

  it('refuses a liquor without thermal conductivity, naming the estimate field, and charges nothing', async () => {
    const before = (await usageRows(h.store)).length;
    const res = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({
        ...single,
        liquor: noConductivity,
        feed: { massFlow: 1, massFraction: 0.1, temperature: 40 },
        product: { massFraction: 0.3 },
        steam: { pressure: '3 barg' },
        body: { pressure: 20, overallHeatTransferCoefficient: { estimate: fallingFilm } },
      });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe(
      'body.overallHeatTransferCoefficient.estimate.liquorProperties.thermalConductivity',
    );
    expect((await usageRows(h.store)).slice(before).every((r) => r.units === 0)).toBe(true);
  });

  it('refuses an invalid tube with the field and range', async () => {
    const thick = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({
        ...single,
        body: {
          pressure: 31,
          overallHeatTransferCoefficient: {
            estimate: { ...fallingFilm, tube: { ...fallingFilm.tube, wallThickness: '30 mm' } },
          },
        },
      });
    expect(thick.status).toBe(422);
    expect(thick.body.errors[0].field).toBe(
      'body.overallHeatTransferCoefficient.estimate.tube.wallThickness',
    );
    const noFlow = await request(h.app)
      .post('/v1/evaporators/single-effect')
      .set(auth())
      .send({
        ...single,
        body: { pressure: 31, overallHeatTransferCoefficient: { estimate: { ...fallingFilm, flow: {} } } },
      });
    expect(noFlow.status).toBe(422);
    expect(noFlow.body.errors[0].field).toBe('body.overallHeatTransferCoefficient.estimate.flow.wettingRate');
  });

  it('runs in a batch, charging each succeeding case its estimate', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({
        operation: 'single-effect',
        cases: [
          single,
          { ...single, body: { pressure: 31, overallHeatTransferCoefficient: 1500 } },
          { ...single, liquor: noConductivity },
        ],
      });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ count: 3, succeeded: 2, failed: 1 });
    expect(res.body.unitsCharged).toBe(2 * UNITS.single + UNITS.estimate);
    expect(res.body.results[0].result.heatTransfer.area).toBe('outside');
    expect(res.body.results[1].result.heatTransfer).toBeUndefined();
  });
});

describe('six-effect train with an estimated U in each effect', () => {
  const juice = {
    evaporatorType: 'falling-film',
    tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'stainless-304' },
    flow: { wettingRate: 1 },
  };
  // An invented six-effect sugar-juice train.
  const train = {
    liquor: 'sucrose',
    effects: 6,
    feed: { massFlow: '72 t/h', massFraction: '15 Bx', temperature: 95 },
    product: { massFraction: '65 Bx' },
    steam: { pressure: 300 },
    lastEffectPressure: 15,
    overallHeatTransferCoefficients: Array.from({ length: 6 }, () => ({ estimate: juice })),
  };

  it('reports each effect’s estimate at its own state, equal to the standalone call there', async () => {
    const res = await request(h.app).post('/v1/evaporators/multiple-effect').set(auth()).send(train);
    expect(res.status).toBe(200);
    const effects = res.body.effects as {
      area: number;
      massFraction: number;
      pressure: number;
      heatTransfer: {
        overallHeatTransferCoefficient: number;
        liquorState: { massFraction: number; boilingTemperature: number; bodyPressure: number };
        steam: { temperature: number };
      };
    }[];
    for (const [i, e] of effects.entries()) {
      expect(e.heatTransfer.liquorState.massFraction).toBe(e.massFraction);
      expect(e.heatTransfer.liquorState.bodyPressure).toBe(e.pressure);
      // heated by the steam (effect 1) or the previous effect's vapour
      if (i > 0) expect(e.heatTransfer.steam.temperature).toBe(res.body.effects[i - 1].vaporTemperature);
      const alone = await standalone(e.heatTransfer, 'sucrose', juice);
      expect(
        alone.overallHeatTransferCoefficient / e.heatTransfer.overallHeatTransferCoefficient,
      ).toBeCloseTo(1, 4);
      expect(e.area).toBeCloseTo(effects[0]!.area, 3);
    }
  });

  it('costs the train plus the estimate of each estimated effect', async () => {
    const mixed = {
      ...train,
      overallHeatTransferCoefficients: [2800, 2300, { estimate: juice }, 1800, 1500, 1100],
    };
    const before = (await usageRows(h.store)).length;
    const res = await request(h.app).post('/v1/evaporators/multiple-effect').set(auth()).send(mixed);
    expect(res.status).toBe(200);
    expect(res.body.effects[0].heatTransfer).toBeUndefined();
    expect(res.body.effects[2].heatTransfer.area).toBe('outside');
    expect((await usageRows(h.store)).slice(before)).toEqual([
      expect.objectContaining({
        operation: 'evaporators.multiple-effect',
        units: UNITS.train + 6 * UNITS.perEffect + UNITS.estimate,
      }),
    ]);
  });

  it('names the effect whose estimate lacks a property', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/multiple-effect')
      .set(auth())
      .send({
        liquor: noConductivity,
        effects: 3,
        feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
        product: { massFraction: 0.3 },
        steam: { pressure: 600 },
        lastEffectPressure: 15,
        overallHeatTransferCoefficients: [
          { estimate: { ...juice, liquorProperties: { thermalConductivity: 0.6 } } },
          1500,
          { estimate: juice },
        ],
      });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].field).toBe(
      'overallHeatTransferCoefficients[2].estimate.liquorProperties.thermalConductivity',
    );
    expect(res.body.detail).toMatch(/effect 3/);
  });

  it('designs a caustic train with every U estimated from the NaOH model alone', async () => {
    const res = await request(h.app)
      .post('/v1/evaporators/multiple-effect')
      .set(auth())
      .send({
        liquor: 'sodium-hydroxide',
        effects: 3,
        feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
        product: { massFraction: 0.3 },
        steam: { pressure: 600 },
        lastEffectPressure: 15,
        overallHeatTransferCoefficients: [{ estimate: juice }, { estimate: juice }, { estimate: juice }],
      });
    expect(res.status).toBe(200);
    type Effect = {
      heatTransfer: {
        overallHeatTransferCoefficient: number;
        boilingSide: { properties: { source: Record<string, string>; thermalConductivity: number } };
      };
    };
    const effects = res.body.effects as Effect[];
    expect(effects).toHaveLength(3);
    for (const e of effects) {
      expect(e.heatTransfer.boilingSide.properties.source.thermalConductivity).toBe('model');
      // A falling film of caustic: of the order of 10² to 10³ W/(m²·K) (common practice).
      expect(e.heatTransfer.overallHeatTransferCoefficient).toBeGreaterThan(300);
      expect(e.heatTransfer.overallHeatTransferCoefficient).toBeLessThan(5000);
    }
    // The liquor thickens towards the last effect: more NaOH raises Riedel's conductivity.
    expect(effects[2]!.heatTransfer.boilingSide.properties.thermalConductivity).toBeGreaterThan(
      effects[0]!.heatTransfer.boilingSide.properties.thermalConductivity,
    );
    expect(
      (res.body.warnings as { message: string }[]).some((w) =>
        w.message.includes('the thermal conductivity is extrapolated'),
      ),
    ).toBe(true);
  });

  it('prices a batch case with its estimates', async () => {
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({ operation: 'multiple-effect', cases: [train] });
    expect(res.status).toBe(200);
    expect(res.body.unitsCharged).toBe(UNITS.train + 6 * UNITS.perEffect + 6 * UNITS.estimate);
  });
});

describe('MVR with an estimated U', () => {
  const mvr = {
    liquor: 'seawater',
    feed: { massFlow: 10, massFraction: 0.035, temperature: 60 },
    product: { massFraction: 0.07 },
    body: {
      pressure: 31,
      overallHeatTransferCoefficient: { estimate: fallingFilm },
      temperatureDifference: 5,
    },
  };

  it('estimates U at the chest temperature and reports it, metered with the estimate', async () => {
    const before = (await usageRows(h.store)).length;
    const res = await request(h.app)
      .post('/v1/evaporators/mechanical-vapor-recompression')
      .set(auth())
      .send(mvr);
    expect(res.status).toBe(200);
    const ht = res.body.heatTransfer;
    expect(ht.area).toBe('outside');
    expect(ht.steam.temperature).toBeCloseTo(res.body.condensate.temperature, 9);
    expect(ht.temperatureDifference).toBeCloseTo(5, 6);
    const alone = await standalone(ht, 'seawater', fallingFilm);
    expect(alone.overallHeatTransferCoefficient / ht.overallHeatTransferCoefficient).toBeCloseTo(1, 5);
    expect((await usageRows(h.store)).slice(before)[0]).toMatchObject({
      operation: 'evaporators.mechanical-vapor-recompression',
      units: UNITS.mvr + UNITS.estimate,
    });
  });

  it('prices a batch case with its estimate and a plain case at the plain price', async () => {
    const plain = { ...mvr, body: { ...mvr.body, overallHeatTransferCoefficient: 2000 } };
    const res = await request(h.app)
      .post('/v1/batch')
      .set(auth())
      .send({ operation: 'mechanical-vapor-recompression', cases: [mvr, plain] });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ succeeded: 2, unitsCharged: 2 * UNITS.mvr + UNITS.estimate });
    expect(res.body.results[0].result.heatTransfer.area).toBe('outside');
  });
});
