/**
 * Multiple-effect trains with a thermocompressor (thermal vapour recompression), condensate flash
 * and the desalination figures of merit. Property-free checks: every balance is recomputed here
 * from the result's streams with IAPWS-IF97 (the project's adapter) and the liquor model; the
 * ejector from El-Dessouky's printed correlation (El-Dessouky and Ettouney, Fundamentals of Salt
 * Water Desalination, 2002); the figures of merit from their definitions in the same book.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../../../server/engine/errors.js';
import { figuresOfMerit } from '../../../server/engine/evaporators/figures-of-merit.js';
import {
  solveMultipleEffect,
  type MultipleEffectInput,
  type MultipleEffectResult,
} from '../../../server/engine/evaporators/multiple-effect.js';
import { designSingleEffect } from '../../../server/engine/evaporators/single-effect.js';
import {
  dischargeEnthalpy,
  elDessoukyMotivePerEntrained,
} from '../../../server/engine/evaporators/thermocompressor.js';
import { seawater } from '../../../server/engine/liquors/seawater.js';
import { sodiumHydroxide } from '../../../server/engine/liquors/sodium-hydroxide.js';
import {
  saturatedLiquidEnthalpy,
  saturatedVaporEnthalpy,
  saturationTemperature,
} from '../../../server/engine/steam/if97.js';
import { expectRangeError } from '../expect-range-error.js';

const C = 273.15;

/** An invented seawater distiller: 20 kg/s of 42 g/kg seawater to 70 g/kg brine, chest at 35 kPa. */
const distiller: MultipleEffectInput = {
  mode: 'equal-area',
  liquor: seawater,
  feed: { massFlow: 20, massFraction: 0.042, temperature: 35 + C },
  productMassFraction: 0.07,
  steam: { pressure: 35e3 },
  lastEffectPressure: 8e3,
  overallHeatTransferCoefficients: [2400, 2300, 2200, 2100],
};
const tvr = { motivePressure: 1000e3 };

function solve(over: Partial<MultipleEffectInput> = {}): MultipleEffectResult {
  return solveMultipleEffect({ ...distiller, ...over });
}

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

/**
 * The whole train's energy balance from its streams, motive steam included (no bleeds, no flash):
 * M·h_m + F·h_F = D·h_f(p_c) + Σ_{i<N} (V_i − E_i)·h_f(p_i) + (V_N − E_N)·H_V,N + L·h_L.
 */
function energyResidual(r: MultipleEffectResult, input: MultipleEffectInput): number {
  const t = r.thermocompressor!;
  const n = r.effects.length;
  const entrained = (i: number) => (i + 1 === t.entrainedFromEffect ? t.entrainedVaporFlow : 0);
  const hF = input.liquor.enthalpy(input.feed.massFraction, input.feed.temperature);
  const energyIn = t.motiveSteamFlow * t.motiveEnthalpy + input.feed.massFlow * hF;
  let energyOut = r.steam.massFlow * saturatedLiquidEnthalpy(r.steam.pressure);
  r.effects.forEach((e, i) => {
    const v = e.vaporFlow - entrained(i);
    energyOut += i < n - 1 ? v * saturatedLiquidEnthalpy(e.pressure) : v * e.vaporEnthalpy;
  });
  energyOut += r.product.massFlow * r.product.enthalpy;
  return Math.abs(energyIn - energyOut) / energyIn;
}

function expectClosed(r: MultipleEffectResult): void {
  expect(r.balances.mass).toBeLessThan(1e-9);
  expect(r.balances.solute).toBeLessThan(1e-9);
  expect(r.balances.energy).toBeLessThan(1e-9);
  for (const e of r.balances.effects) expect(e).toBeLessThan(1e-9);
  expect(r.residual).toBeLessThan(1e-9);
}

describe('Thermal vapour recompression on a four-effect seawater train', () => {
  const input = { ...distiller, thermocompressor: tvr };
  const r = solveMultipleEffect(input);
  const t = r.thermocompressor!;
  const last = r.effects[3]!;

  it('closes every balance, the motive steam included, to 1e-9', () => {
    expectClosed(r);
    expect(energyResidual(r, input)).toBeLessThan(1e-9);
  });

  it("entrains the last effect's vapour at El-Dessouky's ratio for the converged pressures", () => {
    const ra = elDessoukyMotivePerEntrained(1000e3, 35e3, 8e3, saturationTemperature(8e3));
    expect(t.entrainedFromEffect).toBe(4);
    expect(rel(t.motivePerEntrained, ra)).toBeLessThan(1e-12);
    expect(rel(t.entrainmentRatio, 1 / ra)).toBeLessThan(1e-12);
    expect(rel(t.motiveSteamFlow / t.entrainedVaporFlow, ra)).toBeLessThan(1e-9);
    expect(t.compressionRatio).toBeCloseTo(35 / 8, 12);
    expect(t.expansionRatio).toBeCloseTo(1000 / 8, 12);
  });

  it('heats effect 1 with the discharge: flow = motive + entrained, enthalpy from the mixing balance', () => {
    expect(rel(r.steam.massFlow, t.motiveSteamFlow + t.entrainedVaporFlow)).toBeLessThan(1e-12);
    expect(r.steam.pressure).toBe(35e3);
    // the entrained vapour leaves the last effect superheated by its BPR
    const hd = dischargeEnthalpy(t.motivePerEntrained, saturatedVaporEnthalpy(1000e3), last.vaporEnthalpy);
    expect(rel(t.dischargeEnthalpy, hd)).toBeLessThan(1e-12);
    // the chest gives the superheat and the latent heat down to saturated liquid at 35 kPa
    expect(t.dischargeTemperature).toBeGreaterThan(saturationTemperature(35e3));
    expect(rel(r.effects[0]!.duty, r.steam.massFlow * (hd - saturatedLiquidEnthalpy(35e3)))).toBeLessThan(
      1e-9,
    );
  });

  it('reports the economy per kg of motive steam, above the same train without the ejector', () => {
    // common practice: TVR recycles low-pressure vapour and raises the gain output ratio
    const plain = solve();
    expect(rel(r.steamEconomy, r.evaporation / t.motiveSteamFlow)).toBeLessThan(1e-12);
    expect(r.steamEconomy).toBeGreaterThan(plain.steamEconomy * 1.2);
    expect(r.evaporation).toBeCloseTo(plain.evaporation, 9);
  });

  it('names the correlation among the sources and cautions on the ejector and the motive line', () => {
    expect(r.sources.map((s) => s.key)).toContain('el-dessouky-ettouney-2002');
    expect(r.cautions.map((c) => c.code)).toEqual(
      expect.arrayContaining(['thermocompressor', 'pressure-equipment']),
    );
  });

  it('rates its own design areas back to the same motive steam', () => {
    const rated = solveMultipleEffect({
      ...input,
      mode: 'given-areas',
      productMassFraction: undefined,
      areas: r.effects.map((e) => e.area),
    });
    expectClosed(rated);
    expect(rel(rated.thermocompressor!.motiveSteamFlow, t.motiveSteamFlow)).toBeLessThan(1e-6);
    expect(Math.abs(rated.product.massFraction - 0.07)).toBeLessThan(1e-6);
  });
});

describe('Thermal vapour recompression on one effect', () => {
  const input = { ...distiller, overallHeatTransferCoefficients: [2400], thermocompressor: tvr };
  const r = solveMultipleEffect(input);

  it('closes the balances and recycles part of its own vapour', () => {
    expectClosed(r);
    expect(energyResidual(r, input)).toBeLessThan(1e-9);
    expect(r.thermocompressor!.entrainedFromEffect).toBe(1);
    // the condenser gets the vapour less what the ejector takes back
    expect(r.thermocompressor!.entrainedVaporFlow).toBeLessThan(r.evaporation);
  });

  it('beats the single effect heated by steam at the same chest pressure', () => {
    const single = designSingleEffect({
      liquor: seawater,
      feed: { massFlow: 20, massFraction: 0.042, temperature: 35 + C },
      product: { massFraction: 0.07 },
      steam: { pressure: 35e3 },
      body: { pressure: 8e3, overallHeatTransferCoefficient: 2400 },
    });
    expect(r.steamEconomy).toBeGreaterThan(single.steamEconomy);
    expect(rel(r.totalArea, single.area)).toBeLessThan(1e-6);
  });
});

describe('Entraining from an effect other than the last', () => {
  const input = { ...distiller, thermocompressor: { ...tvr, entrainedFromEffect: 2 } };
  const r = solveMultipleEffect(input);
  const t = r.thermocompressor!;
  const second = r.effects[1]!;

  it("takes effect 2's vapour at effect 2's pressure, out of chest 3's heating vapour", () => {
    expectClosed(r);
    expect(energyResidual(r, input)).toBeLessThan(1e-9);
    expect(t.entrainedFromEffect).toBe(2);
    expect(t.suctionPressure).toBe(second.pressure);
    expect(t.compressionRatio).toBeCloseTo(35e3 / second.pressure, 12);
    const ra = elDessoukyMotivePerEntrained(1000e3, 35e3, second.pressure, second.vaporTemperature);
    expect(rel(t.motivePerEntrained, ra)).toBeLessThan(1e-12);
    // chest 3 condenses what effect 2 makes less what the ejector takes
    const third = r.effects[2]!;
    const lat = second.vaporEnthalpy - saturatedLiquidEnthalpy(second.pressure);
    expect(rel(third.duty, (second.vaporFlow - t.entrainedVaporFlow) * lat)).toBeLessThan(1e-9);
  });
});

describe('Condensate flash', () => {
  it('closes the balances with a thermocompressor and raises the economy (common practice)', () => {
    // common practice: flashing each chest's condensate into the next chest recovers its sensible heat
    const without = solve({ thermocompressor: tvr });
    const r = solve({ thermocompressor: tvr, condensateFlash: true });
    expectClosed(r);
    // chest j's condensate flashes to effect j's pressure and joins its vapour to chest j+1; the
    // steam chest's returns to the boiler and the last chest's leaves the train
    expect(r.effects.map((e) => e.flashVapor > 0)).toEqual([false, true, true, false]);
    expect(r.steamEconomy).toBeGreaterThan(without.steamEconomy);
  });

  it('raises the economy of a plain train too', () => {
    expect(solve({ condensateFlash: true }).steamEconomy).toBeGreaterThan(solve().steamEconomy);
  });
});

describe('Thermocompressor refusals', () => {
  it('refuses a discharge (steam.pressure) not above the last effect it entrains from', () => {
    const e = expectRangeError(() => solve({ thermocompressor: tvr, lastEffectPressure: 35e3 }), {
      field: 'steam.pressure',
      value: 35e3,
    });
    expect(e.validRange.min).toBe(35e3);
  });

  it('refuses a motive pressure not above the discharge', () => {
    expectRangeError(() => solve({ thermocompressor: { motivePressure: 30e3 } }), {
      field: 'thermocompressor.motivePressure',
      value: 30e3,
    });
  });

  it('refuses an effect that does not exist and a superheat on the chest steam', () => {
    expectRangeError(() => solve({ thermocompressor: { ...tvr, entrainedFromEffect: 5 } }), {
      field: 'thermocompressor.entrainedFromEffect',
      value: 5,
    });
    expect(() => solve({ thermocompressor: tvr, steam: { pressure: 35e3, superheat: 10 } })).toThrow(
      EngineInputError,
    );
  });

  it('refuses, with a typed no-solution error, an ejector and a bleed that leave the next chest no vapour', () => {
    let caught: unknown;
    try {
      solve({
        overallHeatTransferCoefficients: [2400, 2300],
        lastEffectPressure: 20e3,
        feed: { massFlow: 20, massFraction: 0.042, temperature: 10 + C },
        vaporBleeds: [{ effect: 1, massFlow: 4 }],
        thermocompressor: { ...tvr, entrainedFromEffect: 1 },
      });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(EngineNoSolutionError);
    expect((caught as EngineNoSolutionError).detail.reason).toBe('negative-flow');
  });

  it('warns outside the correlation: a 4 MPa motive steam', () => {
    const r = solve({ thermocompressor: { motivePressure: 4000e3 } });
    expectClosed(r);
    expect(r.warnings.map((w) => [w.code, w.field])).toContainEqual([
      'model-extrapolated',
      'thermocompressor.motivePressure',
    ]);
  });

  it('takes superheated motive steam, whose extra enthalpy lowers the motive flow', () => {
    const sat = solve({ thermocompressor: tvr });
    const hot = solve({ thermocompressor: { ...tvr, motiveSuperheat: 50 } });
    expectClosed(hot);
    expect(hot.thermocompressor!.motiveSteamFlow).toBeLessThan(sat.thermocompressor!.motiveSteamFlow);
  });
});

describe('Figures of merit, recomputed from the result streams (El-Dessouky and Ettouney 2002)', () => {
  it('of a steam-heated seawater train', () => {
    const r = solve();
    const f = r.figuresOfMerit;
    const heat = r.steam.massFlow * r.steam.heatPerKg;
    expect(rel(f.gainOutputRatio!, r.evaporation / r.steam.massFlow)).toBeLessThan(1e-12);
    expect(rel(f.performanceRatio!, (r.evaporation * 2326e3) / heat)).toBeLessThan(1e-12);
    expect(rel(f.specificHeatTransferArea!, r.totalArea / r.evaporation)).toBeLessThan(1e-12);
    expect(rel(f.specificThermalEnergy! / 3.6e6, heat / 3.6e6 / (r.evaporation / 1000))).toBeLessThan(1e-12);
    expect(f.specificElectricEnergy).toBeNull();
  });

  it('of a train with a thermocompressor: the motive steam is the heating steam', () => {
    const r = solve({ thermocompressor: tvr });
    const t = r.thermocompressor!;
    const f = r.figuresOfMerit;
    const heat = t.motiveSteamFlow * (saturatedVaporEnthalpy(1000e3) - saturatedLiquidEnthalpy(35e3));
    expect(rel(f.gainOutputRatio!, r.evaporation / t.motiveSteamFlow)).toBeLessThan(1e-12);
    expect(rel(f.performanceRatio!, (r.evaporation * 2326e3) / heat)).toBeLessThan(1e-9);
    expect(f.gainOutputRatio).toBeGreaterThan(solve().figuresOfMerit.gainOutputRatio!);
  });

  it('of a caustic single effect too', () => {
    const r = designSingleEffect({
      liquor: sodiumHydroxide,
      feed: { massFlow: 1.25, massFraction: 0.1, temperature: 40 + C },
      product: { massFraction: 0.3 },
      steam: { pressure: 400e3 },
      body: { pressure: 20e3, overallHeatTransferCoefficient: 1800 },
    });
    const heat = r.steam.massFlow * (r.steam.enthalpyIn - r.steam.enthalpyOut);
    expect(rel(r.figuresOfMerit.gainOutputRatio!, r.vapor.massFlow / r.steam.massFlow)).toBeLessThan(1e-12);
    expect(rel(r.figuresOfMerit.performanceRatio!, (r.vapor.massFlow * 2326e3) / heat)).toBeLessThan(1e-12);
    expect(rel(r.figuresOfMerit.specificHeatTransferArea!, r.area / r.vapor.massFlow)).toBeLessThan(1e-12);
  });

  it('without heating steam (vapour recompression by a compressor): GOR and PR null with a warning', () => {
    const warnings: { code: string }[] = [];
    const f = figuresOfMerit({ distillateFlow: 2, electricPower: 72e3, totalArea: 400 }, warnings as never);
    expect(f.gainOutputRatio).toBeNull();
    expect(f.performanceRatio).toBeNull();
    expect(f.specificHeatTransferArea).toBe(200);
    // 72 kW over 2 kg/s = 0.002 m³/s: 36 MJ/m³ = 10 kWh/m³
    expect(f.specificElectricEnergy! / 3.6e6).toBeCloseTo(10, 12);
    expect(warnings.map((w) => w.code)).toEqual(['no-heating-steam']);
  });

  it('gives null, never an infinity, for the figures per unit of distillate when nothing is distilled', () => {
    const f = figuresOfMerit({ distillateFlow: 0, heatingSteamFlow: 1, heatPerKgSteam: 2e6, totalArea: 10 });
    expect(f.gainOutputRatio).toBe(0);
    expect(f.specificHeatTransferArea).toBeNull();
    expect(f.specificThermalEnergy).toBeNull();
  });
});

describe('Random trains with a thermocompressor', () => {
  const arrangement = fc.constantFrom<MultipleEffectInput['feedArrangement']>(
    'forward',
    'backward',
    'parallel',
  );
  const train = fc.integer({ min: 1, max: 6 }).chain((n) =>
    fc.record({
      n: fc.constant(n),
      from: fc.integer({ min: 1, max: n }),
      u: fc.array(fc.double({ min: 1500, max: 3000, noNaN: true }), { minLength: n, maxLength: n }),
      arrangement,
      chestC: fc.double({ min: 60, max: 75, noNaN: true }),
      lastKPa: fc.double({ min: 5, max: 12, noNaN: true }),
      motiveKPa: fc.double({ min: 300, max: 3000, noNaN: true }),
      flash: fc.boolean(),
    }),
  );

  it('converge with every balance closed and rate back to the design, or refuse with a typed error', () => {
    let solved = 0;
    let refused = 0;
    fc.assert(
      fc.property(train, (t) => {
        const input: MultipleEffectInput = {
          ...distiller,
          steam: { saturationTemperature: t.chestC + C },
          lastEffectPressure: t.lastKPa * 1e3,
          overallHeatTransferCoefficients: t.u,
          feedArrangement: t.arrangement,
          condensateFlash: t.flash,
          thermocompressor: { motivePressure: t.motiveKPa * 1e3, entrainedFromEffect: t.from },
        };
        try {
          const r = solveMultipleEffect(input);
          expectClosed(r);
          if (!t.flash) expect(energyResidual(r, input)).toBeLessThan(1e-9);
          const rated = solveMultipleEffect({
            ...input,
            mode: 'given-areas',
            productMassFraction: undefined,
            areas: r.effects.map((e) => e.area),
          });
          expect(
            rel(rated.thermocompressor!.motiveSteamFlow, r.thermocompressor!.motiveSteamFlow),
          ).toBeLessThan(1e-6);
          solved++;
        } catch (e) {
          refused++;
          expect(
            e instanceof EngineNoSolutionError ||
              e instanceof EngineRangeError ||
              e instanceof EngineInputError,
          ).toBe(true);
          if (e instanceof EngineNoSolutionError) expect(e.detail.reason).not.toBe('not-converged');
        }
      }),
      { numRuns: 150, seed: 20261 },
    );
    expect(solved).toBeGreaterThan(2 * refused);
  });
});
