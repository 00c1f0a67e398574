/**
 * Kraft black-liquor density, viscosity and thermal conductivity: generic correlations recalled
 * from Frederick (1997) ("from memory"), so the only outside check is their water end against
 * IF97 / IAPWS; the rest tests the warnings that say how far to trust them.
 */
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import {
  blackLiquorDensity,
  blackLiquorKinematicViscosity,
  blackLiquorThermalConductivity,
  kraftBlackLiquor,
} from '../../../server/engine/liquors/kraft-black-liquor.js';
import {
  liquidThermalConductivity,
  liquidViscosity,
  saturatedLiquidAtTemperature,
} from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('kraft black liquor density and viscosity', () => {
  it('reduce to water within 1 % (density) and 2.5 % (viscosity) against IF97 and IAPWS 2008, 20–150 °C', () => {
    // Measured: density +0.02 to +0.98 %, viscosity −2.25 to +0.59 %.
    for (const t of [20, 40, 60, 80, 100, 120, 150]) {
      const T = t + 273.15;
      expect(
        rel(blackLiquorDensity(0, t), saturatedLiquidAtTemperature(T).density),
        `ρ at ${t} °C`,
      ).toBeLessThan(0.01);
      const mu = blackLiquorKinematicViscosity(0, T) * blackLiquorDensity(0, t);
      expect(rel(mu, liquidViscosity(T)), `μ at ${t} °C`).toBeLessThan(0.025);
    }
  });

  it('rises steeply with solids and falls with temperature', () => {
    const mu = (s: number, T: number) => kraftBlackLiquor.viscosity?.(s, T) as number;
    expect(mu(0.7, 373.15) / mu(0.5, 373.15)).toBeGreaterThan(10);
    expect(mu(0.7, 403.15)).toBeLessThan(mu(0.7, 373.15));
  });

  it('always warns that black-liquor viscosity is liquor-specific, and carries the caution', () => {
    const w: EngineWarning[] = [];
    kraftBlackLiquor.viscosity?.(0.5, 363.15, w);
    expect(w.map((x) => x.code)).toEqual(['liquor-specific-property']);
    expect(w[0]?.property).toBe('viscosity');
    expect(kraftBlackLiquor.cautions.map((c) => c.code)).toContain('black-liquor-viscosity-varies');
  });

  it('warns beyond 80 % solids that the density is extrapolated, and refuses beyond 85 %', () => {
    const w: EngineWarning[] = [];
    kraftBlackLiquor.density?.(0.82, 393.15, w);
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({ code: 'model-extrapolated', field: 'massFraction', property: 'density' });
    expectRangeError(() => kraftBlackLiquor.density?.(0.9, 393.15), {
      field: 'massFraction',
      validRange: { min: 0, max: 0.85, unit: 'kg dry solids/kg liquor' },
    });
    expectRangeError(() => kraftBlackLiquor.viscosity?.(0.5, 500), { field: 'temperature' });
  });
});

describe('kraft black liquor thermal conductivity', () => {
  it('reduces to water within 7 % of IAPWS R15-11 at 20–100 °C (its box), and drifts above beyond', () => {
    // Measured: +1.8 % at 20 °C, +4.2 % at 80 °C, +6.9 % at 100 °C, +17 % at 150 °C.
    for (const t of [20, 40, 60, 80, 100]) {
      const r = blackLiquorThermalConductivity(0, t) / liquidThermalConductivity(t + 273.15) - 1;
      expect(r, `${t} °C`).toBeGreaterThan(0);
      expect(r, `${t} °C`).toBeLessThan(0.07);
    }
    expect(blackLiquorThermalConductivity(0, 150) / liquidThermalConductivity(423.15) - 1).toBeGreaterThan(
      0.15,
    );
  });

  it('falls linearly with solids (−0.335 W/(m·K) per unit S) and rises with temperature', () => {
    expect(blackLiquorThermalConductivity(0.2, 80) - blackLiquorThermalConductivity(0.7, 80)).toBeCloseTo(
      0.1675,
      12,
    );
    expect(blackLiquorThermalConductivity(0.65, 100)).toBeCloseTo(0.50625, 12);
    expect(blackLiquorThermalConductivity(0.65, 120)).toBeGreaterThan(
      blackLiquorThermalConductivity(0.65, 100),
    );
  });

  it('always warns that it is liquor-specific, and that it is extrapolated above 100 °C', () => {
    const inside: EngineWarning[] = [];
    kraftBlackLiquor.thermalConductivity?.(0.5, 363.15, inside);
    expect(inside.map((x) => [x.code, x.property])).toEqual([
      ['liquor-specific-property', 'thermal conductivity'],
    ]);
    const hot: EngineWarning[] = [];
    kraftBlackLiquor.thermalConductivity?.(0.5, 393.15, hot);
    expect(hot.map((x) => [x.code, x.field])).toEqual([
      ['model-extrapolated', 'temperature'],
      ['liquor-specific-property', 'massFraction'],
    ]);
    expect(hot[0]?.validRange).toEqual({ min: 293.15, max: 373.15, unit: 'K' });
  });

  it('keeps the model’s hard limits', () => {
    expectRangeError(() => kraftBlackLiquor.thermalConductivity?.(0.9, 363.15), {
      field: 'massFraction',
      validRange: { min: 0, max: 0.85, unit: 'kg dry solids/kg liquor' },
    });
    expectRangeError(() => kraftBlackLiquor.thermalConductivity?.(0.5, 500), { field: 'temperature' });
  });
});
