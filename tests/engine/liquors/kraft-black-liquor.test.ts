/**
 * Tests of the built-in "kraft-black-liquor" model against values from outside the project:
 * - pure-water IAPWS-IF97 values generated offline by Debian's python3-iapws with
 *   tests/fixtures/liquors/pure-water-iapws97.py (fixture pure-water-iapws97.json);
 * - Dühring's rule (published, general: see /work/shared/domain.md section 2);
 * - typical published black-liquor values, recalled rather than read ("from memory"), with
 *   tolerances wide enough for the mill-to-mill spread of real liquors.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import { EngineRangeError } from '../../../server/engine/errors.js';
import {
  blackLiquorEnthalpyKJPerKg,
  blackLiquorHeatCapacityKJPerKgK,
  frederickAtmosphericBoilingPointRise,
  kraftBlackLiquor,
} from '../../../server/engine/liquors/kraft-black-liquor.js';
import type { EngineWarning } from '../../../server/engine/types.js';

interface WaterFixture {
  saturationByPressure: { pressure: number; temperature: number }[];
  saturatedLiquidByTemperature: { temperature: number; enthalpy: number; heatCapacity: number }[];
}
const water = JSON.parse(
  readFileSync(new URL('../../fixtures/liquors/pure-water-iapws97.json', import.meta.url), 'utf8'),
) as WaterFixture;
const K = 273.15;

describe('kraft-black-liquor: boiling-point rise', () => {
  it('has no rise for pure water at any pressure', () => {
    // Common practice (Raoult): without dissolved solids there is no boiling-point rise.
    for (const p of [20_000, 101_325, 300_000]) expect(kraftBlackLiquor.boilingPointRise(0, p)).toBe(0);
  });

  it('gives the typical published rises at one atmosphere: ~2 K at 20 %, ~8 K at 50 %, ~20 K at 80 % solids', () => {
    // Typical values for kraft black liquor at 101.325 kPa quoted in the black-liquor literature
    // (e.g. the BPR figure of Frederick 1997, Kraft Recovery Boilers ch. 3) (from memory).
    // Tolerances ±1, ±2 and ±4 K: real liquors spread by this much (Zaman, McNally and Fricke,
    // Ind. Eng. Chem. Res. 37 (1998), found liquor-to-liquor differences growing with solids).
    const warnings: EngineWarning[] = [];
    expect(Math.abs(kraftBlackLiquor.boilingPointRise(0.2, 101_325) - 2)).toBeLessThan(1);
    expect(Math.abs(kraftBlackLiquor.boilingPointRise(0.5, 101_325) - 8)).toBeLessThan(2);
    expect(Math.abs(kraftBlackLiquor.boilingPointRise(0.8, 101_325, warnings) - 20)).toBeLessThan(4);
    // 80 % lies beyond the 50 % stated range of the polynomial: flagged, not refused.
    expect(warnings).toContainEqual(
      expect.objectContaining({ code: 'model-extrapolated', field: 'massFraction' }),
    );
  });

  it('boils on the IF97 saturation temperature plus the rise', () => {
    // Source: python3-iapws IF97 T_sat (fixture). Tolerance 1e-6 K: both are IF97.
    for (const point of water.saturationByPressure.filter(
      (p) => p.pressure >= 20_000 && p.pressure <= 200_000,
    )) {
      const t = kraftBlackLiquor.boilingPoint(0.4, point.pressure);
      const bpr = kraftBlackLiquor.boilingPointRise(0.4, point.pressure);
      expect(Math.abs(t - bpr - point.temperature)).toBeLessThan(1e-6);
    }
  });

  it('follows Dühring’s rule: at fixed solids the boiling point is linear in the water boiling point', () => {
    // Dühring's rule (published, general; domain.md section 2). Three pressures must be collinear
    // in (T_water, T_liquor) to 1e-9 K, and the slope must exceed 1 (rise grows with temperature).
    const points = [15_000, 50_000, 150_000].map((p) => {
      const t = kraftBlackLiquor.boilingPoint(0.45, p);
      return { tw: t - kraftBlackLiquor.boilingPointRise(0.45, p), t };
    });
    const [a, b, c] = points;
    if (!a || !b || !c) throw new Error('three points expected');
    const slope1 = (b.t - a.t) / (b.tw - a.tw);
    const slope2 = (c.t - b.t) / (c.tw - b.tw);
    expect(Math.abs(slope1 - slope2)).toBeLessThan(1e-9);
    expect(slope1).toBeGreaterThan(1);
  });

  it('gives a smaller rise under vacuum than at one atmosphere', () => {
    // Zaman, McNally and Fricke (1998): the BPR of black liquor is pressure dependent, more so at
    // high solids; it falls with the boiling temperature (common practice for aqueous solutions).
    const atm = kraftBlackLiquor.boilingPointRise(0.5, 101_325);
    const vacuum = kraftBlackLiquor.boilingPointRise(0.5, 20_000);
    expect(vacuum).toBeLessThan(atm);
  });

  it('matches its published atmospheric polynomial at 101.325 kPa to within 0.01 K', () => {
    // IF97 puts water at 373.124 K at 101.325 kPa (fixture), 0.036 K below the source's 373.16 K,
    // so the pressure factor is 0.99994 there: the model's 1-atm rise equals the atmospheric
    // polynomial to well within 0.01 K.
    for (const s of [0.1, 0.3, 0.5]) {
      expect(
        Math.abs(kraftBlackLiquor.boilingPointRise(s, 101_325) - frederickAtmosphericBoilingPointRise(s)),
      ).toBeLessThan(0.01);
    }
  });
});

describe('kraft-black-liquor: heat capacity and enthalpy', () => {
  const liquid = (celsius: number) => {
    const point = water.saturatedLiquidByTemperature.find(
      (p) => Math.abs(p.temperature - (celsius + K)) < 1e-9,
    );
    if (!point) throw new Error(`no fixture point at ${celsius} °C`);
    return point;
  };

  it('reduces to water within 0.04 kJ/(kg·K) of IF97 c_p from 25 to 100 °C', () => {
    // Source: python3-iapws IF97 c_p of saturated liquid (fixture). The correlation's water term is
    // a constant 4.216 kJ/(kg·K); IF97 runs 4.180–4.217 here (largest gap 0.036 at 50 °C).
    for (const c of [25, 50, 75, 100]) {
      expect(Math.abs(kraftBlackLiquor.heatCapacity!(0, c + K) - liquid(c).heatCapacity)).toBeLessThan(40);
    }
  });

  it('puts pure-water enthalpy within 3 kJ/kg of IF97 from 25 to 100 °C (same datum)', () => {
    // Source: python3-iapws IF97 saturated-liquid enthalpy (fixture). Measured gap grows to
    // +2.5 kJ/kg at 100 °C from the constant c_p of the water term.
    for (const c of [25, 50, 75, 100]) {
      expect(Math.abs(kraftBlackLiquor.enthalpy(0, c + K) - liquid(c).enthalpy)).toBeLessThan(3000);
    }
  });

  it('gives about 3.3 kJ/(kg·K) for a 50 % solids liquor at 80 °C', () => {
    // Typical published heat capacity of 50 % solids kraft liquor at evaporator temperatures,
    // about 3.3 kJ/(kg·K) (from memory). Tolerance ±0.25 kJ/(kg·K) for liquor-to-liquor spread.
    expect(Math.abs(kraftBlackLiquor.heatCapacity!(0.5, 80 + K) / 1e3 - 3.3)).toBeLessThan(0.25);
  });

  it('has zero enthalpy at the triple point and c_p as its temperature derivative', () => {
    // Identity checks (not reference values): datum of IF97 (h = 0 for liquid at 0.01 °C) and
    // h = ∫ c_p dT, checked by a central difference.
    expect(blackLiquorEnthalpyKJPerKg(0.6, 0.01)).toBeCloseTo(0, 12);
    for (const [s, t] of [
      [0.2, 60],
      [0.5, 100],
      [0.75, 130],
    ] as const) {
      const dh = (blackLiquorEnthalpyKJPerKg(s, t + 0.01) - blackLiquorEnthalpyKJPerKg(s, t - 0.01)) / 0.02;
      expect(blackLiquorHeatCapacityKJPerKgK(s, t)).toBeCloseTo(dh, 8);
    }
  });
});

describe('kraft-black-liquor: validity and limits', () => {
  it('rejects a dry-solids fraction above 0.85 with the valid range', () => {
    expectRangeError(() => kraftBlackLiquor.boilingPointRise(0.9, 101_325), {
      field: 'massFraction',
      value: 0.9,
      validRange: { min: 0, max: 0.85, unit: 'kg dry solids/kg liquor' },
    });
  });

  it('rejects negative and non-finite solids instead of returning NaN', () => {
    expect(() => kraftBlackLiquor.enthalpy(-0.1, 350)).toThrow(EngineRangeError);
    expect(() => kraftBlackLiquor.enthalpy(Number.NaN, 350)).toThrow(EngineRangeError);
    expect(() => kraftBlackLiquor.boilingPoint(0.5, Number.NaN)).toThrow(EngineRangeError);
  });

  it('rejects a liquor temperature above 200 °C', () => {
    expect(() => kraftBlackLiquor.enthalpy(0.5, 201 + K)).toThrow(EngineRangeError);
  });

  it('rejects a pressure whose water boiling point passes 200 °C', () => {
    // IF97 T_sat(2 MPa) ≈ 212 °C (from memory; the test only needs it above 200 °C).
    expect(() => kraftBlackLiquor.boilingPoint(0.5, 2e6)).toThrow(EngineRangeError);
  });

  it('is silent for a 40 % liquor boiling at 50 kPa', () => {
    const warnings: EngineWarning[] = [];
    const t = kraftBlackLiquor.boilingPoint(0.4, 50_000, warnings);
    kraftBlackLiquor.enthalpy(0.4, t, warnings);
    expect(warnings).toEqual([]);
  });

  it('warns "model-extrapolated" on water boiling below 50 °C', () => {
    // 10 kPa: IF97 T_sat ≈ 45.8 °C (fixture), below the 50 °C trusted for the pressure correction.
    const warnings: EngineWarning[] = [];
    kraftBlackLiquor.boilingPointRise(0.3, 10_000, warnings);
    expect(warnings).toContainEqual(
      expect.objectContaining({ code: 'model-extrapolated', field: 'waterBoilingTemperature' }),
    );
  });

  it('carries the hot-alkaline-liquor caution and cites Frederick 1997', () => {
    expect(kraftBlackLiquor.cautions.map((c) => c.code)).toContain('hot-alkaline-liquor-burns');
    expect(kraftBlackLiquor.sources.map((s) => s.key)).toContain('frederick-1997');
  });
});
