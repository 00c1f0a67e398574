/**
 * Sucrose solution viscosity (Genotelle 1978), density (Laliberté's model with his 2009 sucrose
 * parameters) and thermal conductivity (Choi and Okos 1986).
 *
 * Reference values: the sugar industry's tables of pure sucrose solutions at 20 °C (viscosity
 * after Bingham and Jackson / NBS Circular 440; density as the ICUMSA tables), recalled "from
 * memory": we cannot read the tables here, so each tolerance is stated and generous.
 */
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import { genotelleViscosity, sucrose } from '../../../server/engine/liquors/sucrose.js';
import { liquidThermalConductivity, liquidViscosity } from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('sucrose viscosity (Genotelle 1978)', () => {
  it('matches the sugar tables at 20 °C within 5 % (from memory: 6.2, 15.4, 58.5, 481 mPa·s at 40–70 %)', () => {
    const table: [number, number][] = [
      [0.4, 6.2e-3],
      [0.5, 15.4e-3],
      [0.6, 58.5e-3],
      [0.7, 481e-3],
    ];
    for (const [x, mu] of table) {
      expect(rel(sucrose.viscosity?.(x, 293.15) as number, mu), `x = ${x}`).toBeLessThan(0.05);
    }
    // Measured: +2.5 % at 40 %, +2.9 % at 50 %, +2.1 % at 60 %, +0.9 % at 70 %.
  });

  it('differs from IAPWS water by a few per cent at x = 0 (its own pure-water fit)', () => {
    // Measured: −3.5 % at 20 °C, +3.7 % at 80 °C.
    for (const t of [293.15, 323.15, 353.15]) {
      expect(rel(genotelleViscosity(0, t), liquidViscosity(t))).toBeLessThan(0.04);
    }
  });

  it('warns above 80 °C that the viscosity is extrapolated, naming it', () => {
    const w: EngineWarning[] = [];
    sucrose.viscosity?.(0.65, 373.15, w);
    const extrapolated = w.filter((x) => x.code === 'model-extrapolated');
    expect(extrapolated).toHaveLength(1);
    expect(extrapolated[0]).toMatchObject({ field: 'temperature', property: 'viscosity' });
    expect(extrapolated[0]?.validRange).toEqual({ min: 273.15, max: 353.15, unit: 'K' });
  });

  it('warns when the syrup is supersaturated, as the other sucrose properties do', () => {
    const w: EngineWarning[] = [];
    sucrose.viscosity?.(0.8, 313.15, w);
    expect(w.map((x) => x.code)).toContain('above-solubility');
  });
});

describe('sucrose density (Laliberté)', () => {
  it('matches the ICUMSA density table at 20 °C within 0.2 % (from memory: 1081.0, 1176.5, 1229.6, 1286.5 kg/m³)', () => {
    const table: [number, number][] = [
      [0.2, 1081.0],
      [0.4, 1176.5],
      [0.5, 1229.6],
      [0.6, 1286.5],
    ];
    for (const [x, rho] of table) {
      expect(rel(sucrose.density?.(x, 293.15) as number, rho), `x = ${x}`).toBeLessThan(0.002);
    }
  });

  it('warns above 50.7 % and outside 15–55 °C that the density is extrapolated', () => {
    const w: EngineWarning[] = [];
    sucrose.density?.(0.65, 343.15, w);
    expect(w.map((x) => `${x.property}:${x.field}`).sort()).toEqual([
      'density:massFraction',
      'density:temperature',
    ]);
  });
});

describe('sucrose thermal conductivity (Choi and Okos)', () => {
  it('is within 1 % of IAPWS water at x = 0 (Choi and Okos’ own water fit)', () => {
    for (const t of [293.15, 323.15, 353.15, 373.15]) {
      expect(rel(sucrose.thermalConductivity?.(0, t) as number, liquidThermalConductivity(t))).toBeLessThan(
        0.011,
      );
    }
  });

  it('falls as sucrose replaces water and rises with temperature', () => {
    const k = (x: number, t: number) => sucrose.thermalConductivity?.(x, t) as number;
    expect(k(0.6, 330)).toBeLessThan(k(0.3, 330));
    expect(k(0.6, 360)).toBeGreaterThan(k(0.6, 300));
  });

  it('refuses beyond the model’s limits with the valid range', () => {
    expectRangeError(() => sucrose.thermalConductivity?.(0.97, 330), {
      field: 'massFraction',
      validRange: { min: 0, max: 0.95, unit: 'kg/kg' },
    });
    expectRangeError(() => sucrose.viscosity?.(0.5, 430), { field: 'temperature' });
  });
});
