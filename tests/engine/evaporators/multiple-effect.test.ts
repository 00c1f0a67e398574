/**
 * Multiple-effect evaporator: checks against published worked examples, plus property-free
 * checks (balances, equal areas, rating ↔ design, feed arrangements, no-solution errors).
 *
 * Liquors: the examples state their own property assumptions (a BPR polynomial and a c_p line),
 * so those liquors are built here with the project's custom polynomial liquor (createCustomLiquor);
 * the water/steam side is IAPWS-IF97 through the project's adapter. The books use rounded
 * steam-table values and stop after two trials, which is why their tolerances are a few %.
 */
import { describe, expect, it } from 'vitest';
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../../../server/engine/errors.js';
import {
  solveMultipleEffect,
  type MultipleEffectInput,
  type MultipleEffectResult,
} from '../../../server/engine/evaporators/multiple-effect.js';
import { designSingleEffect } from '../../../server/engine/evaporators/single-effect.js';
import { createCustomLiquor } from '../../../server/engine/liquors/custom.js';
import { sodiumHydroxide } from '../../../server/engine/liquors/sodium-hydroxide.js';
import { saturationTemperature } from '../../../server/engine/steam/if97.js';

const C = 273.15;
const HOUR = 3600;

/** Geankoplis Example 8.5-1 liquor: BPR = 1.78x + 6.22x² °C, c_p = 4.19 − 2.35x kJ/(kg·K). */
const geankoplisLiquor = createCustomLiquor({
  name: 'Geankoplis 8.5-1 sugar solution',
  boilingPointRise: { polynomial: [0, 1.78, 6.22] },
  heatCapacity: { polynomial: [4190, -2350] },
  validity: { massFraction: { min: 0, max: 0.7 } },
});

/** Geankoplis Example 8.5-1 inputs (from memory, as stated in the brief). */
const geankoplis: Omit<MultipleEffectInput, 'mode'> = {
  liquor: geankoplisLiquor,
  feed: { massFlow: 22_680 / HOUR, massFraction: 0.1, temperature: 26.7 + C },
  productMassFraction: 0.5,
  steam: { pressure: 205.5e3 },
  lastEffectPressure: 13.4e3,
  overallHeatTransferCoefficients: [3123, 1987, 1136],
  feedArrangement: 'forward',
};

function design(over: Partial<MultipleEffectInput> = {}): MultipleEffectResult {
  return solveMultipleEffect({ ...geankoplis, mode: 'equal-area', ...over });
}

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

function expectBalancesClosed(r: MultipleEffectResult): void {
  // property-free: conservation of mass, solute and energy must hold to solver precision
  expect(r.balances.mass).toBeLessThan(1e-9);
  expect(r.balances.solute).toBeLessThan(1e-9);
  expect(r.balances.energy).toBeLessThan(1e-9);
  for (const e of r.balances.effects) expect(e).toBeLessThan(1e-9);
  expect(r.residual).toBeLessThan(1e-9);
  expect(Number.isFinite(r.steam.massFlow)).toBe(true);
}

describe('Geankoplis Example 8.5-1 (triple effect, forward feed, equal areas)', () => {
  const r = design();

  it('matches the book area of about 104.5 m² per effect within 1.5 %', () => {
    // Source: C.J. Geankoplis, Transport Processes and Separation Process Principles, 4th ed.,
    // Example 8.5-1, second trial: A ≈ 104.5 m² (from memory). Tolerance: the book rounds
    // steam-table values and stops after two trials (its areas still differ by ~1 %).
    expect(rel(r.area, 104.5)).toBeLessThan(0.015);
  });

  it('matches the book steam rate of about 8936 kg/h and economy of about 2.03 within 1.5 %', () => {
    // Source: Geankoplis (4th ed.) Example 8.5-1: S ≈ 8936 kg/h, economy ≈ 2.03 (from memory).
    expect(rel(r.steam.massFlow * HOUR, 8936)).toBeLessThan(0.015);
    expect(rel(r.steamEconomy, 2.03)).toBeLessThan(0.015);
  });

  it('evaporates F·(1 − x_F/x_P) = 18 144 kg/h and leaves the product at 50 %', () => {
    // Source: the mass balance stated in Geankoplis Example 8.5-1 (22 680 − 4536 kg/h).
    expect(rel(r.evaporation * HOUR, 18_144)).toBeLessThan(1e-9);
    expect(r.product.massFraction).toBeCloseTo(0.5, 12);
    // the last effect's BPR is that of the 50 % product: 1.78·0.5 + 6.22·0.25 = 2.445 K
    // (Geankoplis Example 8.5-1, BPR3 = 2.45 °C).
    expect(r.effects[2]?.boilingPointRise).toBeCloseTo(2.445, 9);
  });

  it('gives equal areas to 1e-6 relative and closes every balance', () => {
    // property-free: the equal-area design condition and conservation laws
    for (const e of r.effects) expect(rel(e.area, r.area)).toBeLessThan(1e-6);
    expectBalancesClosed(r);
  });

  it('reports the heating medium of each effect and ΔT including the BPR', () => {
    // property-free: effect i+1 is heated by effect i's vapour condensing at T_sat(p_i);
    // ΔT = T_cond − (T_sat + BPR) by definition (Geankoplis section 8.5).
    expect(r.effects[0]?.heatingMedium.source).toBe('steam');
    expect(r.effects[1]?.heatingMedium.source).toBe(1);
    for (const [i, e] of r.effects.entries()) {
      const tCond = e.heatingMedium.condensingTemperature;
      expect(e.temperatureDifference).toBeCloseTo(tCond - e.vaporTemperature - e.boilingPointRise, 9);
      if (i > 0) expect(tCond).toBe(r.effects[i - 1]?.vaporTemperature);
    }
    expect(r.iterations).toBeGreaterThan(0);
    expect(r.iterations).toBeLessThan(50);
  });
});

describe('Coulson & Richardson Example 14.1 as a one-effect train', () => {
  // Source: J.M. Coulson and J.F. Richardson, Chemical Engineering Vol. 2 (5th ed.), Example 14.1
  // (book values as reproduced in a published worked-example companion): 7 kg/s of 10 % solids at
  // 294 K concentrated to 50 %; dry saturated steam at 205 kN/m² (394 K); evaporation at
  // 13.5 kN/m² (325 K); no boiling-point rise; c_p 3.76 kJ/(kg·K) for the feed and 3.14 for the
  // product (a straight line in x through both, as the book's two values imply); condensate
  // leaves at 352.7 K; U = 3 kW/(m²·K). Book: heat from the steam 14 202 kW, area 68.6 m².
  // The book's steam figure (6.47 kg/s) uses 2530 kJ/kg for dry saturated steam at 205 kN/m²,
  // where IAPWS-IF97 gives 2706 kJ/kg, so it is not asserted; duty and area do not depend on it.
  const liquor = createCustomLiquor({
    name: 'Coulson-Richardson 14.1 liquor',
    boilingPointRise: { polynomial: [0] },
    heatCapacity: { polynomial: [3915, -1550] },
    validity: { massFraction: { min: 0, max: 0.6 } },
  });
  const condensing = saturationTemperature(205e3);

  it('reproduces the book duty and area within the steam-table rounding (1 %)', () => {
    const one = solveMultipleEffect({
      mode: 'equal-area',
      liquor,
      feed: { massFlow: 7, massFraction: 0.1, temperature: 294 },
      productMassFraction: 0.5,
      steam: { pressure: 205e3, condensateSubcooling: condensing - 352.7 },
      lastEffectPressure: 13.5e3,
      overallHeatTransferCoefficients: [3000],
    });
    // book: 5.6 kg/s evaporated (mass balance), 14 202 kW, 68.6 m² (rounded temperatures: 1 %)
    expect(rel(one.evaporation, 5.6)).toBeLessThan(1e-12);
    expect(rel(one.effects[0]!.duty, 14_202e3)).toBeLessThan(0.01);
    expect(rel(one.area, 68.6)).toBeLessThan(0.01);
    expectBalancesClosed(one);
  });
});

describe('One effect equals the single-effect design', () => {
  it('gives the same steam, area and product as designSingleEffect', () => {
    // property-free: a 1-effect train is a single effect (same IF97 states, same liquor)
    const m = design({ overallHeatTransferCoefficients: [2000], lastEffectPressure: 30e3 });
    const s = designSingleEffect({
      liquor: geankoplisLiquor,
      feed: geankoplis.feed,
      product: { massFraction: 0.5 },
      steam: geankoplis.steam,
      body: { pressure: 30e3, overallHeatTransferCoefficient: 2000 },
    });
    expect(rel(m.steam.massFlow, s.steam.massFlow)).toBeLessThan(1e-9);
    expect(rel(m.area, s.area)).toBeLessThan(1e-9);
    expect(rel(m.product.temperature, s.product.temperature)).toBeLessThan(1e-12);
  });
});

describe('Feed arrangements and options (property-free checks)', () => {
  const arrangements: MultipleEffectInput['feedArrangement'][] = [
    'forward',
    'backward',
    'parallel',
    [2, 3, 1],
  ];

  it.each(arrangements.map((a) => [JSON.stringify(a), a] as const))(
    'closes every balance and equalises areas with %s feed',
    (_name, a) => {
      const r = design({ feedArrangement: a });
      expectBalancesClosed(r);
      for (const e of r.effects) expect(rel(e.area, r.area)).toBeLessThan(1e-6);
      expect(r.product.massFraction).toBeCloseTo(0.5, 10);
    },
  );

  it.each(arrangements.map((a) => [JSON.stringify(a), a] as const))(
    'rating the designed areas reproduces the design with %s feed',
    (_name, a) => {
      const d = design({ feedArrangement: a });
      const r = solveMultipleEffect({
        ...geankoplis,
        productMassFraction: undefined,
        feedArrangement: a,
        mode: 'given-areas',
        areas: d.effects.map((e) => e.area),
      });
      expect(rel(r.steam.massFlow, d.steam.massFlow)).toBeLessThan(1e-6);
      expect(Math.abs(r.product.massFraction - 0.5)).toBeLessThan(1e-6);
      for (const [i, e] of r.effects.entries()) {
        expect(Math.abs(e.pressure - d.effects[i]!.pressure)).toBeLessThan(1e-3);
      }
    },
  );

  it('needs less steam with backward feed than forward feed for a cold feed', () => {
    // common practice: backward feed heats a cold feed with the cheapest (last-effect) vapour
    // (McCabe, Smith and Harriott, Unit Operations of Chemical Engineering, ch. 16; Geankoplis 8.5).
    const fwd = design({ feedArrangement: 'forward' });
    const bwd = design({ feedArrangement: 'backward' });
    expect(bwd.steam.massFlow).toBeLessThan(fwd.steam.massFlow);
    expect(bwd.steamEconomy).toBeGreaterThan(fwd.steamEconomy);
  });

  it('splits a parallel feed so that every effect makes product at the product concentration', () => {
    // property-free: the documented split rule F_i = V_i/(1 − x_F/x_P)
    const r = design({ feedArrangement: 'parallel' });
    let total = 0;
    for (const e of r.effects) {
      expect(e.massFraction).toBeCloseTo(0.5, 12);
      expect(e.liquorInFlow * 0.1).toBeCloseTo(e.liquorOutFlow * 0.5, 10);
      total += e.liquorInFlow;
    }
    expect(rel(total, geankoplis.feed.massFlow)).toBeLessThan(1e-12);
  });

  it('takes a vapour bleed out of the next chest and needs more steam for it', () => {
    // property-free: vapour sent to another user no longer heats effect 2
    const base = design();
    const r = design({ vaporBleeds: [{ effect: 1, massFlow: 0.2 }] });
    expectBalancesClosed(r);
    expect(r.effects[0]?.vaporBleed).toBe(0.2);
    expect(r.steam.massFlow).toBeGreaterThan(base.steam.massFlow);
  });

  it('reports an external feed-preheat duty and saves steam', () => {
    // property-free: the preheat duty is F·(h(x_F,T_pre) − h(x_F,T_F)) from the liquor model
    const base = design();
    const r = design({ feedPreheat: { temperature: 80 + C } });
    expectBalancesClosed(r);
    const expected =
      geankoplis.feed.massFlow *
      (geankoplisLiquor.enthalpy(0.1, 80 + C) - geankoplisLiquor.enthalpy(0.1, geankoplis.feed.temperature));
    expect(rel(r.feedPreheat!.duty, expected)).toBeLessThan(1e-12);
    expect(r.feedPreheat?.source).toBe('external');
    expect(r.steam.massFlow).toBeLessThan(base.steam.massFlow);
  });

  it('preheats the feed with vapour bled from an effect and reports that bleed', () => {
    const r = design({ feedPreheat: { temperature: 70 + C, source: { vaporFromEffect: 2 } } });
    expectBalancesClosed(r);
    expect(r.feedPreheat?.source).toBe(2);
    expect(r.feedPreheat!.bleed).toBeGreaterThan(0);
    expect(r.effects[1]?.vaporBleed).toBeCloseTo(r.feedPreheat!.bleed, 12);
  });

  it('refuses to preheat above the condensing temperature of the bleed vapour', () => {
    // effect 3 vapour condenses at 51.67 °C (13.4 kPa): it cannot heat the feed to 70 °C
    expect(() => design({ feedPreheat: { temperature: 70 + C, source: { vaporFromEffect: 3 } } })).toThrow(
      EngineNoSolutionError,
    );
  });

  it('flashes condensate into the next vapour line and saves steam', () => {
    // common practice: condensate flashing recovers sensible heat of the condensate
    const base = design({
      overallHeatTransferCoefficients: [3000, 2500, 2000, 1500],
      steam: { pressure: 400e3 },
    });
    const r = design({
      overallHeatTransferCoefficients: [3000, 2500, 2000, 1500],
      steam: { pressure: 400e3 },
      condensateFlash: true,
    });
    expectBalancesClosed(r);
    expect(r.effects[2]!.flashVapor).toBeGreaterThan(0);
    expect(r.steam.massFlow).toBeLessThan(base.steam.massFlow);
  });

  it('solves a 6-effect caustic train with the Olsson NaOH model and closes the balances', () => {
    const r = solveMultipleEffect({
      mode: 'equal-area',
      liquor: sodiumHydroxide,
      feed: { massFlow: 10, massFraction: 0.1, temperature: 60 + C },
      productMassFraction: 0.3,
      steam: { pressure: 1000e3 },
      lastEffectPressure: 15e3,
      overallHeatTransferCoefficients: [2800, 2500, 2200, 1900, 1600, 1300],
      feedArrangement: 'backward',
    });
    expectBalancesClosed(r);
    for (const e of r.effects) expect(rel(e.area, r.area)).toBeLessThan(1e-6);
    expect(r.cautions.length).toBeGreaterThan(0);
  });
});

describe('No-solution cases', () => {
  it('refuses when the boiling-point rises use up the available temperature difference', () => {
    // 40 % caustic boils ~30 K above water (Olsson et al. 1997; common practice): 3 effects between
    // 120 °C steam and a 13.4 kPa (51.7 °C) condenser cannot all carry such liquor.
    const run = () =>
      solveMultipleEffect({
        mode: 'equal-area',
        liquor: sodiumHydroxide,
        feed: { massFlow: 5, massFraction: 0.35, temperature: 60 + C },
        productMassFraction: 0.6,
        steam: { saturationTemperature: 100 + C },
        lastEffectPressure: 13.4e3,
        overallHeatTransferCoefficients: [3000, 2000, 1000],
        feedArrangement: 'backward',
      });
    expect(run).toThrow(EngineNoSolutionError);
  });

  it('refuses 10 effects over 20 K with a clear reason', () => {
    let err: unknown;
    try {
      design({
        overallHeatTransferCoefficients: Array.from({ length: 10 }, () => 2000),
        steam: { saturationTemperature: 80 + C },
        lastEffectPressure: 19.946e3, // ≈ 60 °C (IF97 saturation pressure at 333.15 K, from memory)
      });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(EngineNoSolutionError);
    expect((err as EngineNoSolutionError).detail.reason).toMatch(/temperature-difference|boiling-point-rise/);
  });

  it('refuses a bleed larger than the vapour the effect makes', () => {
    expect(() => design({ vaporBleeds: [{ effect: 1, massFlow: 5.5 }] })).toThrow(EngineNoSolutionError);
  });

  it('refuses given areas so large that they would evaporate all the feed', () => {
    expect(() =>
      solveMultipleEffect({
        ...geankoplis,
        productMassFraction: undefined,
        mode: 'given-areas',
        areas: [5000, 5000, 5000],
      }),
    ).toThrow(EngineNoSolutionError);
  });
});

describe('Input validation', () => {
  it('rejects 0 and 11 effects naming "effects"', () => {
    for (const u of [[], Array.from({ length: 11 }, () => 2000)]) {
      try {
        design({ overallHeatTransferCoefficients: u });
        expect.unreachable();
      } catch (e) {
        expect(e).toBeInstanceOf(EngineRangeError);
        expect((e as EngineRangeError).field).toBe('effects');
        expect((e as EngineRangeError).validRange).toMatchObject({ min: 1, max: 10 });
      }
    }
  });

  it('rejects a non-positive U naming its index', () => {
    expect(() => design({ overallHeatTransferCoefficients: [3000, 2000, -5] })).toThrow(
      expect.objectContaining({ field: 'overallHeatTransferCoefficients[2]' }),
    );
  });

  it('rejects a feed order that is not a permutation', () => {
    expect(() => design({ feedArrangement: [1, 1, 2] })).toThrow(EngineInputError);
    expect(() => design({ feedArrangement: [1, 2, 4] })).toThrow(
      expect.objectContaining({ field: 'feedArrangement[2]' }),
    );
    expect(() => design({ feedArrangement: [1, 2] })).toThrow(
      expect.objectContaining({ field: 'feedArrangement' }),
    );
  });

  it('rejects a bleed from an effect that does not exist', () => {
    expect(() => design({ vaporBleeds: [{ effect: 5, massFlow: 0.1 }] })).toThrow(
      expect.objectContaining({ field: 'vaporBleeds[0].effect' }),
    );
  });

  it('rejects a product leaner than the feed and missing areas in rating mode', () => {
    expect(() => design({ productMassFraction: 0.05 })).toThrow(
      expect.objectContaining({ field: 'productMassFraction' }),
    );
    expect(() =>
      solveMultipleEffect({ ...geankoplis, productMassFraction: undefined, mode: 'given-areas' }),
    ).toThrow(expect.objectContaining({ field: 'areas' }));
  });

  it('rejects a last-effect pressure above the steam pressure', () => {
    expect(() => design({ lastEffectPressure: 300e3 })).toThrow(
      expect.objectContaining({ field: 'lastEffectPressure' }),
    );
  });
});

describe('Warnings', () => {
  it('warns of small temperature differences per effect', () => {
    const r = design({
      overallHeatTransferCoefficients: Array.from({ length: 6 }, () => 2000),
      steam: { saturationTemperature: 90 + C },
    });
    expect(r.warnings.some((w) => w.code === 'small-temperature-difference')).toBe(true);
  });

  it('warns when a hot feed flashes on entry', () => {
    const r = design({ feed: { ...geankoplis.feed, temperature: 115 + C } });
    expect(r.warnings.some((w) => w.code === 'feed-flash')).toBe(true);
  });
});
