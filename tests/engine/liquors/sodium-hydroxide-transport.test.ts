/**
 * NaOH solution density (Laliberté and Cooper 2004) and viscosity (Laliberté 2007), with the NaOH
 * parameters of Laliberté (2009), on IF97 / IAPWS water; thermal conductivity by Riedel's additive
 * ionic rule (1951, as Reid, Prausnitz and Poling give it) on IAPWS R15-11 water.
 *
 * Reference values: handbook tables of aqueous NaOH at 20 °C (the CRC Handbook's "concentrative
 * properties of aqueous solutions" table and caustic-soda producers' data sheets), recalled
 * "from memory": we cannot read the tables here, so the tolerances are wide and each is stated.
 */
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import { describeLiquor } from '../../../server/engine/liquors/model.js';
import { seawater } from '../../../server/engine/liquors/seawater.js';
import {
  laliberteNaohApparentSpecificVolume,
  naohMolarity,
  sodiumHydroxide,
} from '../../../server/engine/liquors/sodium-hydroxide.js';
import {
  liquidThermalConductivity,
  liquidViscosity,
  saturatedLiquidAtTemperature,
} from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('sodium hydroxide density (Laliberté and Cooper)', () => {
  it('matches handbook densities at 20 °C within 1 % (from memory: 1109, 1219, 1328, 1430, 1525 kg/m³ at 10–50 %)', () => {
    const table: [number, number][] = [
      [0.1, 1109],
      [0.2, 1219],
      [0.3, 1328],
      [0.4, 1430],
      [0.5, 1525],
    ];
    for (const [x, rho] of table) {
      const w: EngineWarning[] = [];
      expect(rel(sodiumHydroxide.density?.(x, 293.15, w) as number, rho), `x = ${x}`).toBeLessThan(0.01);
      expect(w).toEqual([]);
    }
    // Measured: −0.04 % at 10 %, −0.6 % at 50 % (the edge of the NaOH data, w ≤ 0.503).
  });

  it('is IF97 water at x = 0', () => {
    expect(sodiumHydroxide.density?.(0, 330)).toBeCloseTo(saturatedLiquidAtTemperature(330).density, 9);
  });

  it('has a negative apparent specific volume in dilute cold solution (NaOH contracts the water)', () => {
    expect(laliberteNaohApparentSpecificVolume(0.02, 10)).toBeLessThan(0);
    expect(laliberteNaohApparentSpecificVolume(0.4, 80)).toBeGreaterThan(0);
  });
});

describe('sodium hydroxide viscosity (Laliberté 2007)', () => {
  it('is IAPWS water at x = 0', () => {
    expect(sodiumHydroxide.viscosity?.(0, 320)).toBe(liquidViscosity(320));
  });

  it('gives about 80 mPa·s for 50 % caustic at 20 °C (from memory: data sheets give 70–80 mPa·s), within 15 %', () => {
    expect(rel(sodiumHydroxide.viscosity?.(0.5, 293.15) as number, 0.078)).toBeLessThan(0.15);
  });

  it('rises steeply with concentration and falls with temperature', () => {
    const mu = (x: number, t: number) => sodiumHydroxide.viscosity?.(x, t) as number;
    expect(mu(0.3, 313.15) / mu(0.1, 313.15)).toBeGreaterThan(4);
    expect(mu(0.5, 333.15)).toBeLessThan(mu(0.5, 313.15));
  });

  it('warns that the viscosity is extrapolated above 70 °C, naming the property and the data range', () => {
    const w: EngineWarning[] = [];
    const mu = sodiumHydroxide.viscosity?.(0.5, 373.15, w) as number;
    expect(mu).toBeGreaterThan(0);
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({ code: 'model-extrapolated', field: 'temperature', property: 'viscosity' });
    expect(w[0]?.validRange).toEqual({ min: 285.65, max: 343.15, unit: 'K' });
    expect(w[0]?.message).toContain('the viscosity is extrapolated');
  });

  it('warns separately for density and viscosity beyond 50 % NaOH', () => {
    const w: EngineWarning[] = [];
    sodiumHydroxide.density?.(0.55, 320, w); // density data to 0.503
    sodiumHydroxide.viscosity?.(0.55, 320, w); // viscosity data to 0.56: silent
    sodiumHydroxide.viscosity?.(0.6, 320, w);
    expect(w.map((x) => x.property)).toEqual(['density', 'viscosity']);
  });

  it('refuses beyond the model’s hard limits with the valid range', () => {
    expectRangeError(() => sodiumHydroxide.viscosity?.(0.85, 320), {
      field: 'massFraction',
      validRange: { min: 0, max: 0.8, unit: 'kg NaOH/kg solution' },
    });
    expectRangeError(() => sodiumHydroxide.density?.(0.3, 530), { field: 'temperature' });
    expectRangeError(() => sodiumHydroxide.viscosity?.(0.3, Number.NaN), { field: 'temperature' });
  });

  it('gives no surface tension (no published NaOH coefficients at hand)', () => {
    expect(sodiumHydroxide.surfaceTension).toBeUndefined();
  });
});

describe('sodium hydroxide thermal conductivity (Riedel’s additive ionic rule)', () => {
  const k = (x: number, T: number, w?: EngineWarning[]) =>
    sodiumHydroxide.thermalConductivity?.(x, T, w) as number;
  /** Riedel's OH⁻ coefficient as recalled (Reid, Prausnitz and Poling's table, from memory); Na⁺ is 0. */
  const SIGMA_OH = 20.934e-3;

  it('is IAPWS R15-11 water exactly at x = 0, at every temperature', () => {
    for (const T of [283.15, 293.15, 333.15, 373.15, 423.15]) {
      expect(k(0, T)).toBe(liquidThermalConductivity(T));
    }
  });

  it('adds σ_Na⁺·c + σ_OH⁻·c to water at 20 °C, c in mol/L from the model’s density', () => {
    const T = 293.15;
    for (const x of [0.02, 0.05, 0.1, 0.3]) {
      const c = naohMolarity(x, sodiumHydroxide.density?.(x, T) as number);
      expect((k(x, T) - liquidThermalConductivity(T)) / c, `x = ${x}`).toBeCloseTo(SIGMA_OH, 12);
    }
    // 10 % NaOH: ρ ≈ 1109 kg/m³ (handbook, from memory), c ≈ 2.77 mol/L, k about 10 % above water.
    expect(naohMolarity(0.1, sodiumHydroxide.density?.(0.1, T) as number)).toBeCloseTo(2.77, 2);
    expect(k(0.1, T) / liquidThermalConductivity(T)).toBeCloseTo(1.097, 3);
  });

  it('keeps its ratio to water at other temperatures (the method’s temperature rule)', () => {
    const ratio = (T: number) => k(0.1, T) / liquidThermalConductivity(T);
    for (const T of [283.15, 333.15, 373.15, 413.15]) expect(ratio(T)).toBeCloseTo(ratio(293.15), 12);
  });

  it('has the scale of the recalled table: its Cl⁻ coefficient gives seawater’s small drop below water', () => {
    // Riedel's Cl⁻ (from memory −5.466e-3 W·L/(m·K·mol), Na⁺ 0) on the Cl⁻ of standard seawater at
    // S = 35 g/kg (0.5458 mol/kg, Millero et al. 2008, from memory), against the seawater model
    // (Jamieson and Tudhope's correlation on IAPWS water) at 20 °C: the same sign, within a factor
    // of 2, where a slip of a power of ten in the recalled scale would be 10 times off.
    const T = 293.15;
    const rho = seawater.density?.(0.035, T) as number;
    const riedelDrop = -5.466e-3 * 0.5458 * (rho / 1000);
    const jamiesonDrop = (seawater.thermalConductivity?.(0.035, T) as number) - liquidThermalConductivity(T);
    expect(jamiesonDrop).toBeLessThan(0);
    expect(riedelDrop / jamiesonDrop).toBeGreaterThan(0.5);
    expect(riedelDrop / jamiesonDrop).toBeLessThan(2);
    // Measured: Riedel −0.0031, Jamieson–Tudhope −0.0019 W/(m·K).
  });

  it('is silent near 20 °C at moderate concentration and names the property when extrapolated', () => {
    const quiet: EngineWarning[] = [];
    k(0.08, 298.15, quiet);
    expect(quiet).toEqual([]);
    const w: EngineWarning[] = [];
    k(0.3, 373.15, w);
    expect(w.map((x) => [x.code, x.field, x.property])).toEqual([
      ['model-extrapolated', 'massFraction', 'thermal conductivity'],
      ['model-extrapolated', 'temperature', 'thermal conductivity'],
    ]);
    expect(w[1]?.validRange).toEqual({ min: 283.15, max: 303.15, unit: 'K' });
    expect(w[1]?.message).toContain('the thermal conductivity is extrapolated');
  });

  it('refuses beyond x = 0.50, where the molarity would leave the density data, with the range', () => {
    expectRangeError(() => k(0.55, 320), {
      field: 'massFraction',
      validRange: { min: 0, max: 0.5, unit: 'kg NaOH/kg solution' },
    });
    expectRangeError(() => k(0.2, Number.NaN), { field: 'temperature' });
    expectRangeError(() => k(0.2, 530), { field: 'temperature' });
  });

  it('is listed as provided, with its own data box', () => {
    const d = describeLiquor(sodiumHydroxide);
    expect(d.properties.thermalConductivity).toBe(true);
    expect(d.transportValidity.thermalConductivity).toEqual({
      massFraction: { min: 0, max: 0.1 },
      temperature: { min: 283.15, max: 303.15 },
    });
    expect(d.sources.map((c) => c.key)).toEqual(expect.arrayContaining(['riedel-1951', 'iapws-r15-11']));
  });
});
