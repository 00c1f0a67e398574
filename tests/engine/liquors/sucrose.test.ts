/**
 * The sucrose model (Starzak–Peacock water activity + IF97, Lyle heat capacity, Vavrinecz
 * solubility) against values from outside the project. Each check names its source; values
 * recalled rather than read are marked "from memory".
 */
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import { EngineRangeError } from '../../../server/engine/errors.js';
import {
  lyleHeatCapacity,
  starzakPeacockWaterActivity,
  sucrose,
  vavrineczSolubility,
} from '../../../server/engine/liquors/sucrose.js';
import { saturationPressure } from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';

const ATM = 101_325;

/** Mass fraction of sucrose in a solution of molality m (mol per kg water), M = 342.30 g/mol. */
function massFractionFromMolality(m: number): number {
  return (m * 0.3423) / (1 + m * 0.3423);
}

describe('sucrose boiling point from water activity', () => {
  it('tends to the ebullioscopic constant of water in dilute solution, less the vapour non-ideality', () => {
    // Source: CRC Handbook of Chemistry and Physics, "Cryoscopic and ebullioscopic constants":
    // K_b(water) = 0.513 K·kg/mol (from memory). K_b is exact thermodynamics; the method used here
    // (p = a_w·p_sat, domain.md §2) treats the vapour as ideal, which lowers the dilute-limit rise
    // by the compressibility factor of saturated steam, Z = p·v_g/(R_w·T) = 101325·1.6718/
    // (461.526·373.124) = 0.984 (v_g at 100 °C from the steam tables, common practice).
    const m = 0.03;
    const bpr = sucrose.boilingPointRise(massFractionFromMolality(m), ATM);
    // Expected 0.513·0.984 = 0.5048 (+0.3 % sucrose non-ideality at 0.03 mol/kg). Tolerance 0.5 %.
    // Measured: 0.5062 K·kg/mol, i.e. 1.3 % below K_b, as the Z factor predicts.
    expect(Math.abs(bpr / m / (0.513 * 0.984) - 1)).toBeLessThan(0.005);
  });

  it('satisfies a_w(x, T)·p_sat(T) = p at the boiling point it returns', () => {
    // Definition of the boiling point of a solution with a non-volatile solute (domain.md §2);
    // this checks the root finder, not the physics.
    for (const [x, p] of [
      [0.3, ATM],
      [0.65, 20_000],
      [0.85, 15_000],
    ] as const) {
      const t = sucrose.boilingPoint(x, p);
      expect(Math.abs((starzakPeacockWaterActivity(x, t) * saturationPressure(t)) / p - 1)).toBeLessThan(
        1e-9,
      );
    }
  });

  it('raises the boiling point more at higher concentration and less at lower pressure', () => {
    // Common practice (Dühring's rule and every sugar-house BPE chart): BPR grows with °Bx and
    // falls as the body pressure falls.
    const atm = [0.2, 0.4, 0.6, 0.8].map((x) => sucrose.boilingPointRise(x, ATM));
    for (let i = 1; i < atm.length; i++) expect(atm[i] ?? 0).toBeGreaterThan(atm[i - 1] ?? Infinity);
    expect(sucrose.boilingPointRise(0.6, 20_000)).toBeLessThan(sucrose.boilingPointRise(0.6, ATM));
  });

  it('gives no rise for pure water', () => {
    // Physical fact: no solute, no rise.
    expect(sucrose.boilingPointRise(0, ATM)).toBe(0);
  });
});

describe('Starzak–Peacock water activity', () => {
  it('gives a_w = 0.9806 for 1 mol/kg sucrose at 25 °C', () => {
    // Source: Robinson and Stokes, "Electrolyte Solutions" (2nd ed., 1959), appendix table of
    // osmotic coefficients of sucrose at 25 °C, φ(1 mol/kg) ≈ 1.088 → a_w = exp(−φ·m·M_w) = 0.9806
    // (from memory). Tolerance 0.001. Measured: 0.9802.
    expect(Math.abs(starzakPeacockWaterActivity(massFractionFromMolality(1), 298.15) - 0.9806)).toBeLessThan(
      0.001,
    );
  });

  it('gives a_w ≈ 0.85 for a saturated solution at 25 °C', () => {
    // Source: saturated sucrose solution as a humidity fixed point, about 85 % relative humidity
    // at 25 °C (common practice, from memory); saturation ≈ 0.675 kg/kg at 25 °C, between the
    // 67.09 % (20 °C) and 68.70 % (30 °C) of Mohos, "Confectionery and Chocolate Engineering"
    // (2010), table A2.3. Tolerance 0.01. Measured: 0.847.
    expect(Math.abs(starzakPeacockWaterActivity(0.675, 298.15) - 0.85)).toBeLessThan(0.01);
  });
});

describe('heat capacity and enthalpy', () => {
  it('starts Lyle’s correlation at 1 kcal/(kg·K) for water', () => {
    // Source: the correlation's constant 4.1868 kJ/(kg·K) = 1 kcal_IT/(kg·K) (definition of the
    // International Table calorie, 4.1868 J exactly).
    expect(lyleHeatCapacity(0, 330)).toBeCloseTo(4186.8, 9);
  });

  it('reduces to the heat capacity of water at 25 °C for x = 0', () => {
    // Source: IAPWS-95 / steam tables, c_p of liquid water at 25 °C = 4.1813 kJ/(kg·K) (from
    // memory). Tolerance 0.1 %.
    const cp = sucrose.heatCapacity?.(0, 298.15) ?? Number.NaN;
    expect(Math.abs(cp / 4181.3 - 1)).toBeLessThan(0.001);
  });

  it('puts the enthalpy datum at the triple point for any concentration', () => {
    // Source: steam-table convention (IAPWS-IF97: u = s = 0 for liquid at the triple point, so
    // h = 0.611 J/kg there). The solution at 0.01 °C is given the enthalpy of its components.
    for (const x of [0, 0.3, 0.7]) expect(Math.abs(sucrose.enthalpy(x, 273.16))).toBeLessThan(1);
  });

  it('has a heat capacity that is the temperature derivative of its enthalpy', () => {
    // Thermodynamic identity c_p = (∂h/∂T)_p (the enthalpy is integrated from c_p). IF97 h_f is
    // taken along saturation, which differs from (∂h/∂T)_p by v(1 − Tβ)·dp_sat/dT < 0.1 %.
    const x = 0.6;
    const t = 340;
    const dhdt = (sucrose.enthalpy(x, t + 0.01) - sucrose.enthalpy(x, t - 0.01)) / 0.02;
    const cp = sucrose.heatCapacity?.(x, t) ?? Number.NaN;
    expect(Math.abs(dhdt / cp - 1)).toBeLessThan(0.001);
  });
});

describe('sucrose solubility (Vavrinecz 1962)', () => {
  // Source: Mohos, "Confectionery and Chocolate Engineering: Principles and Applications"
  // (Wiley-Blackwell 2010), appendix 2, table A2.3 (after Sokolovsky 1958), % m/m.
  const table: [number, number][] = [
    [0, 64.18],
    [10, 65.58],
    [20, 67.09],
    [30, 68.7],
    [40, 70.42],
    [50, 72.25],
    [60, 74.18],
    [70, 76.22],
    [80, 78.36],
    [90, 80.84],
    [100, 82.97],
  ];
  it('agrees with the handbook solubility table within 0.5 percentage points from 0 to 100 °C', () => {
    for (const [t, w] of table) {
      // Tolerance 0.5 points: Vavrinecz's newer measurements and the older table differ by
      // that much (e.g. 66.7 vs 67.09 % at 20 °C). Measured: at most 0.37 points (20 °C).
      expect(Math.abs(100 * vavrineczSolubility(t + 273.15) - w)).toBeLessThan(0.5);
    }
  });

  it('warns that a product above the solubility limit is supersaturated', () => {
    const warnings: EngineWarning[] = [];
    // 0.80 kg/kg at 60 °C is above 74 % (table above): crystals may form.
    sucrose.enthalpy(0.8, 333.15, warnings);
    expect(warnings.map((w) => w.code)).toContain('above-solubility');
    const quiet: EngineWarning[] = [];
    sucrose.enthalpy(0.6, 333.15, quiet);
    expect(quiet).toEqual([]);
  });

  it('flags an extrapolated solubility above 100 °C and refuses it above 130 °C', () => {
    const warnings: EngineWarning[] = [];
    const limit = sucrose.solubilityLimit as (t: number, w?: EngineWarning[]) => number;
    expect(limit(383.15, warnings)).toBeGreaterThan(0.8);
    expect(warnings.map((w) => w.code)).toEqual(['model-extrapolated']);
    expect(() => limit(420)).toThrow(EngineRangeError);
  });
});

describe('sucrose validity rule', () => {
  it('rejects a mass fraction above 0.95 with the valid range', () => {
    expectRangeError(() => sucrose.boilingPoint(0.97, ATM), {
      field: 'massFraction',
      value: 0.97,
      validRange: { min: 0, max: 0.95, unit: 'kg/kg' },
    });
  });

  it('rejects a non-finite input instead of returning NaN', () => {
    expect(() => sucrose.boilingPoint(Number.NaN, ATM)).toThrow(EngineRangeError);
    expect(() => sucrose.enthalpy(0.5, Number.POSITIVE_INFINITY)).toThrow(EngineRangeError);
  });

  it('warns, and still answers, beyond 0.85 kg/kg', () => {
    const warnings: EngineWarning[] = [];
    const t = sucrose.boilingPoint(0.9, 15_000, warnings);
    expect(Number.isFinite(t)).toBe(true);
    expect(warnings.map((w) => w.code)).toContain('model-extrapolated');
  });

  it('refuses a pressure at which the syrup would boil above 150 °C', () => {
    expect(() => sucrose.boilingPoint(0.9, 400_000)).toThrow(/pressure/);
  });
});
