/**
 * NaOH solution density (Laliberté and Cooper 2004) and viscosity (Laliberté 2007), with the NaOH
 * parameters of Laliberté (2009), on IF97 / IAPWS water.
 *
 * Reference values: handbook tables of aqueous NaOH at 20 °C (the CRC Handbook's "concentrative
 * properties of aqueous solutions" table and caustic-soda producers' data sheets), recalled
 * "from memory": we cannot read the tables here, so the tolerances are wide and each is stated.
 */
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import {
  laliberteNaohApparentSpecificVolume,
  sodiumHydroxide,
} from '../../../server/engine/liquors/sodium-hydroxide.js';
import { liquidViscosity, saturatedLiquidAtTemperature } from '../../../server/engine/steam/if97.js';
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

  it('gives no thermal conductivity or surface tension (no published NaOH coefficients at hand)', () => {
    expect(sodiumHydroxide.thermalConductivity).toBeUndefined();
    expect(sodiumHydroxide.surfaceTension).toBeUndefined();
  });
});
