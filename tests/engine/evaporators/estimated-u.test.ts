/**
 * Evaporators with U estimated at each effect's state (server/engine/heat-transfer/overall.ts
 * through a provider) instead of a given number. The checks: the U each effect reports is the
 * standalone estimate at that effect's solved state (the same function, so to 1e-9 relative), the
 * balances still close, rating finds the state a design left, and the estimate's refusals name the
 * field and the effect. The range check of the falling-film U is a fact of the trade (below).
 */
import { describe, expect, it } from 'vitest';
import { EngineInputError, EngineRangeError } from '../../../server/engine/errors.js';
import {
  designMechanicalVaporRecompression,
  rateMechanicalVaporRecompression,
} from '../../../server/engine/evaporators/mechanical-vapor-recompression.js';
import { designMultipleEffect } from '../../../server/engine/evaporators/multiple-effect.js';
import { designSingleEffect, rateSingleEffect } from '../../../server/engine/evaporators/single-effect.js';
import {
  estimateOverallCoefficient,
  overallCoefficientProvider,
  type OverallCoefficientEstimateSpec,
} from '../../../server/engine/heat-transfer/overall.js';
import { builtInLiquors } from '../../../server/engine/liquors/registry.js';

const seawater = builtInLiquors.get('seawater')!;
const sucrose = builtInLiquors.get('sucrose')!;
const sodiumHydroxide = builtInLiquors.get('sodium-hydroxide')!;
/** A liquor model without a thermal conductivity, as a custom liquor without its polynomial is. */
const noConductivity = { ...sodiumHydroxide, id: 'custom:no-conductivity', thermalConductivity: undefined };

const fallingFilm: OverallCoefficientEstimateSpec = {
  evaporatorType: 'falling-film',
  tube: { outsideDiameter: 0.0508, wallThickness: 0.0016, length: 8, material: 'titanium-grade-2' },
  flow: { wettingRate: 0.5 },
};
const relative = (a: number, b: number): number => Math.abs(a / b - 1);

const seawaterDuty = {
  liquor: seawater,
  feed: { massFlow: 10, massFraction: 0.035, temperature: 333.15 },
  product: { massFraction: 0.07 },
  steam: { saturationTemperature: 353.15 },
};

describe('single effect with an estimated U', () => {
  const design = (spec: OverallCoefficientEstimateSpec) =>
    designSingleEffect({
      ...seawaterDuty,
      body: {
        pressure: 31_000,
        overallHeatTransferCoefficient: overallCoefficientProvider(
          seawater,
          spec,
          'body.overallHeatTransferCoefficient',
        ),
      },
    });

  it('sizes a seawater falling film with the U the standalone estimate gives at its solved state', () => {
    const r = design(fallingFilm);
    const alone = estimateOverallCoefficient({
      ...fallingFilm,
      liquor: seawater,
      massFraction: r.product.massFraction,
      boilingTemperature: r.body.meanBoilingTemperature,
      bodyPressure: r.body.meanBoilingPressure,
      steamTemperature: r.steam.temperature,
    });
    const u = r.body.overallHeatTransferCoefficient;
    expect(relative(u, alone.overallHeatTransferCoefficient)).toBeLessThan(1e-9);
    expect(r.heatTransfer?.overallHeatTransferCoefficient).toBe(u);
    expect(relative(r.area, r.duty / (u * r.temperatureDifference))).toBeLessThan(1e-12);
    for (const b of Object.values(r.balances)) expect(b).toBeLessThan(1e-9);
    // Falling-film evaporators on water-like liquors: U ≈ 1500–3000 W/(m²·K) clean (common
    // practice, from memory). With the TEMA default fouling (1.76e-4 inside + 8.81e-5 outside,
    // ≈ 2.7e-4 m²·K/W on the outside area) the same films give about 1000–2000 W/(m²·K).
    expect(u).toBeGreaterThan(1000);
    expect(u).toBeLessThan(2000);
    const clean = design({ ...fallingFilm, fouling: { inside: 0, outside: 0 } });
    expect(clean.body.overallHeatTransferCoefficient).toBeGreaterThan(1500);
    expect(clean.body.overallHeatTransferCoefficient).toBeLessThan(3000);
  });

  it('rates the designed area back to the designed product, the U re-evaluated inside the root search', () => {
    const d = design(fallingFilm);
    const provider = overallCoefficientProvider(seawater, fallingFilm, 'body.overallHeatTransferCoefficient');
    const r = rateSingleEffect({
      liquor: seawater,
      feed: seawaterDuty.feed,
      steam: seawaterDuty.steam,
      body: { pressure: 31_000, overallHeatTransferCoefficient: provider, area: d.area },
    });
    expect(relative(r.product.massFraction, 0.07)).toBeLessThan(1e-9);
    const alone = estimateOverallCoefficient({
      ...fallingFilm,
      liquor: seawater,
      massFraction: r.product.massFraction,
      boilingTemperature: r.body.meanBoilingTemperature,
      bodyPressure: r.body.meanBoilingPressure,
      steamTemperature: r.steam.temperature,
    });
    expect(
      relative(r.body.overallHeatTransferCoefficient, alone.overallHeatTransferCoefficient),
    ).toBeLessThan(1e-9);
    expect(relative(r.area, d.area)).toBeLessThan(1e-9);
    // the feed a target product allows: U at the fixed product state, F proportional to A
    const f = rateSingleEffect({
      liquor: seawater,
      feed: { massFraction: 0.035, temperature: 333.15 },
      product: { massFraction: 0.07 },
      steam: seawaterDuty.steam,
      body: { pressure: 31_000, overallHeatTransferCoefficient: provider, area: d.area },
    });
    expect(relative(f.feed.massFlow, 10)).toBeLessThan(1e-9);
  });

  it('keeps the estimate warnings in the result', () => {
    const r = design({ ...fallingFilm, flow: { wettingRate: 0.04 } });
    expect(r.warnings.map((w) => w.code)).toContain('wetting-rate-below-minimum');
    const w = r.warnings.find((x) => x.code === 'wetting-rate-below-minimum');
    expect(w?.field).toBe('body.overallHeatTransferCoefficient.estimate.flow.wettingRate');
  });

  it('refuses a liquor without thermal conductivity, naming the estimate field to give', () => {
    expect(() =>
      designSingleEffect({
        liquor: noConductivity,
        feed: { massFlow: 1, massFraction: 0.1, temperature: 313.15 },
        product: { massFraction: 0.3 },
        steam: { pressure: 400_000 },
        body: {
          pressure: 20_000,
          overallHeatTransferCoefficient: overallCoefficientProvider(
            noConductivity,
            fallingFilm,
            'body.overallHeatTransferCoefficient',
          ),
        },
      }),
    ).toThrow(
      expect.objectContaining({
        field: 'body.overallHeatTransferCoefficient.estimate.liquorProperties.thermalConductivity',
      }),
    );
  });
});

describe('six-effect train with an estimated U in each effect', () => {
  const juice: OverallCoefficientEstimateSpec = {
    evaporatorType: 'falling-film',
    tube: { outsideDiameter: 0.0508, wallThickness: 0.0016, length: 8, material: 'stainless-304' },
    flow: { wettingRate: 1 },
  };
  const train = (u: Parameters<typeof designMultipleEffect>[0]['overallHeatTransferCoefficients']) =>
    designMultipleEffect({
      liquor: sucrose,
      feed: { massFlow: 20, massFraction: 0.15, temperature: 368.15 },
      productMassFraction: 0.65,
      steam: { pressure: 300_000 },
      lastEffectPressure: 15_000,
      overallHeatTransferCoefficients: u,
    });

  it('gives each effect the standalone estimate at its own solved state, with equal areas', () => {
    const r = train(
      Array.from({ length: 6 }, (_, i) =>
        overallCoefficientProvider(
          sucrose,
          juice,
          `overallHeatTransferCoefficients[${i}]`,
          `effect ${i + 1}`,
        ),
      ),
    );
    r.effects.forEach((e, i) => {
      const condensing = i === 0 ? r.steam.temperature : r.effects[i - 1]!.vaporTemperature;
      const alone = estimateOverallCoefficient({
        ...juice,
        liquor: sucrose,
        massFraction: e.massFraction,
        boilingTemperature: e.boilingPoint,
        bodyPressure: e.pressure,
        steamTemperature: condensing,
      });
      expect(relative(e.overallHeatTransferCoefficient, alone.overallHeatTransferCoefficient)).toBeLessThan(
        1e-9,
      );
      expect(e.heatTransfer?.overallHeatTransferCoefficient).toBe(e.overallHeatTransferCoefficient);
      expect(relative(e.area, r.area)).toBeLessThan(1e-8);
    });
    // The thickening juice (viscosity up) lowers U along the train.
    expect(r.effects[5]!.overallHeatTransferCoefficient).toBeLessThan(
      r.effects[0]!.overallHeatTransferCoefficient,
    );
    for (const b of [r.balances.mass, r.balances.solute, r.balances.energy]) expect(b).toBeLessThan(1e-9);
  });

  it('mixes given and estimated coefficients', () => {
    const r = train([
      2800,
      2300,
      overallCoefficientProvider(sucrose, juice, 'overallHeatTransferCoefficients[2]', 'effect 3'),
      1800,
      1500,
      1100,
    ]);
    expect(r.effects[0]!.overallHeatTransferCoefficient).toBe(2800);
    expect(r.effects[0]!.heatTransfer).toBeUndefined();
    expect(r.effects[2]!.heatTransfer).toBeDefined();
  });

  it('labels an estimate warning with its effect and field, in the train and in the breakdown', () => {
    const thin = { ...juice, flow: { wettingRate: 0.02 } };
    const r = train([
      2800,
      2300,
      overallCoefficientProvider(sucrose, thin, 'overallHeatTransferCoefficients[2]', 'effect 3'),
      1800,
      1500,
      1100,
    ]);
    const w = r.warnings.find((x) => x.code === 'wetting-rate-below-minimum');
    expect(w?.field).toBe('overallHeatTransferCoefficients[2].estimate.flow.wettingRate');
    expect(w?.context).toBe('effect 3');
    expect(w?.message).toMatch(/^effect 3: /);
    expect(r.effects[2]!.heatTransfer?.warnings).toContainEqual(w);
  });

  it('names the effect and the missing property when an effect estimate lacks one', () => {
    const naoh = (i: number, props?: OverallCoefficientEstimateSpec['liquorProperties']) =>
      overallCoefficientProvider(
        noConductivity,
        { ...juice, ...(props ? { liquorProperties: props } : {}) },
        `overallHeatTransferCoefficients[${i}]`,
        `effect ${i + 1}`,
      );
    let error: unknown;
    try {
      designMultipleEffect({
        liquor: noConductivity,
        feed: { massFlow: 2, massFraction: 0.1, temperature: 333.15 },
        productMassFraction: 0.3,
        steam: { pressure: 600_000 },
        lastEffectPressure: 15_000,
        overallHeatTransferCoefficients: [naoh(0, { thermalConductivity: 0.6 }), 1500, naoh(2)],
      });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(EngineInputError);
    expect((error as EngineInputError).field).toBe(
      'overallHeatTransferCoefficients[2].estimate.liquorProperties.thermalConductivity',
    );
    expect((error as Error).message).toMatch(/^effect 3: /);
  });

  it('estimates every effect of a caustic train from the NaOH model alone, with its conductivity warnings', () => {
    const r = designMultipleEffect({
      liquor: sodiumHydroxide,
      feed: { massFlow: 2, massFraction: 0.1, temperature: 333.15 },
      productMassFraction: 0.3,
      steam: { pressure: 600_000 },
      lastEffectPressure: 15_000,
      overallHeatTransferCoefficients: [0, 1, 2].map((i) =>
        overallCoefficientProvider(
          sodiumHydroxide,
          juice,
          `overallHeatTransferCoefficients[${i}]`,
          `effect ${i + 1}`,
        ),
      ),
    });
    for (const e of r.effects) {
      expect(e.heatTransfer?.boilingSide.properties.source.thermalConductivity).toBe('model');
      expect(e.overallHeatTransferCoefficient).toBe(e.heatTransfer?.overallHeatTransferCoefficient);
    }
    // Above 30 °C Riedel's rule is extrapolated with water's temperature dependence: said, per effect.
    const extrapolated = r.warnings.filter(
      (w) => w.code === 'model-extrapolated' && w.property === 'thermal conductivity',
    );
    expect(extrapolated.length).toBeGreaterThan(0);
    for (const b of [r.balances.mass, r.balances.solute, r.balances.energy]) expect(b).toBeLessThan(1e-9);
  });
});

describe('mechanical vapour recompression with an estimated U', () => {
  const provider = () =>
    overallCoefficientProvider(seawater, fallingFilm, 'body.overallHeatTransferCoefficient');
  const duty = { liquor: seawater, feed: seawaterDuty.feed, product: seawaterDuty.product };

  it('designs with the estimate at the chest temperature the ΔT fixes, and rates the area back', () => {
    const d = designMechanicalVaporRecompression({
      ...duty,
      body: { pressure: 31_000, overallHeatTransferCoefficient: provider(), temperatureDifference: 5 },
    });
    const alone = estimateOverallCoefficient({
      ...fallingFilm,
      liquor: seawater,
      massFraction: d.product.massFraction,
      boilingTemperature: d.body.meanBoilingTemperature,
      bodyPressure: d.body.meanBoilingPressure,
      steamTemperature: d.condensingTemperature,
    });
    expect(
      relative(d.body.overallHeatTransferCoefficient, alone.overallHeatTransferCoefficient),
    ).toBeLessThan(1e-9);
    for (const b of Object.values(d.balances)) expect(b).toBeLessThan(1e-9);
    // Rating: T_c and U depend on each other; Brent finds the ΔT the design had.
    const r = rateMechanicalVaporRecompression({
      ...duty,
      body: { pressure: 31_000, overallHeatTransferCoefficient: provider(), area: d.area },
    });
    expect(Math.abs(r.temperatureDifference - 5)).toBeLessThan(1e-8);
    expect(
      relative(r.body.overallHeatTransferCoefficient, d.body.overallHeatTransferCoefficient),
    ).toBeLessThan(1e-9);
  });

  it('refuses a tube wall thicker than its radius, naming the estimate field', () => {
    const bad = overallCoefficientProvider(
      seawater,
      { ...fallingFilm, tube: { ...fallingFilm.tube, wallThickness: 0.03 } },
      'body.overallHeatTransferCoefficient',
    );
    expect(() =>
      designMechanicalVaporRecompression({
        ...duty,
        body: { pressure: 31_000, overallHeatTransferCoefficient: bad, temperatureDifference: 5 },
      }),
    ).toThrow(EngineRangeError);
    try {
      designMechanicalVaporRecompression({
        ...duty,
        body: { pressure: 31_000, overallHeatTransferCoefficient: bad, temperatureDifference: 5 },
      });
    } catch (e) {
      expect((e as EngineRangeError).field).toBe(
        'body.overallHeatTransferCoefficient.estimate.tube.wallThickness',
      );
    }
  });
});
