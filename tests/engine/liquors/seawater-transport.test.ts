/**
 * Seawater transport properties: viscosity and thermal conductivity (Sharqawy et al. 2010) and
 * surface tension (IAPWS 2014 guideline / Nayar et al. 2014), each on IAPWS pure water.
 *
 * Independent references: tests/fixtures/seawater/iapws-transport-points.json, generated offline
 * by tests/fixtures/seawater/generate_seawater_transport_fixture.py from Debian's python3-iapws:
 * the IAPWS guideline on the thermal conductivity of seawater (a different correlation from the
 * review's, so the tolerance is the review's stated ±3 %) and the IAPWS guideline on the surface
 * tension of seawater (the same equation, so 1e-9).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { expectRangeError } from '../expect-range-error.js';
import {
  jamiesonTudhopeThermalConductivity,
  seawater,
  sharqawyRelativeViscosity,
} from '../../../server/engine/liquors/seawater.js';
import {
  liquidThermalConductivity,
  liquidViscosity,
  waterSurfaceTension,
} from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';

interface Fixture {
  iapwsVersion: string;
  conductivity: { temperatureK: number; massFraction: number; conductivity: number }[];
  surfaceTension: { temperatureK: number; massFraction: number; surfaceTension: number }[];
}
const fixture = JSON.parse(
  readFileSync(new URL('../../fixtures/seawater/iapws-transport-points.json', import.meta.url), 'utf8'),
) as Fixture;

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('seawater thermal conductivity', () => {
  it('agrees with the IAPWS seawater guideline within the review’s ±3 % over 10–180 °C, 10–160 g/kg', () => {
    expect(fixture.conductivity.length).toBe(40);
    let worst = 0;
    for (const pt of fixture.conductivity) {
      const w: EngineWarning[] = [];
      const k = seawater.thermalConductivity?.(pt.massFraction, pt.temperatureK, w) as number;
      worst = Math.max(worst, rel(k, pt.conductivity));
      expect(rel(k, pt.conductivity), `${pt.temperatureK} K, ${pt.massFraction}`).toBeLessThan(0.03);
      expect(w).toEqual([]); // all points inside the review's box
    }
    // Measured: worst 2.99 % (180 °C, 160 g/kg; 0.4 % at 35 g/kg): the review's salt effect is
    // weaker than the guideline's in strong brines, at the edge of its stated accuracy.
    expect(worst).toBeGreaterThan(0.02);
  });

  it('is IAPWS R15-11 water at zero salinity', () => {
    expect(seawater.thermalConductivity?.(0, 350)).toBeCloseTo(liquidThermalConductivity(350), 12);
  });

  it('has a pure-water value of its own within 2 % of IAPWS, which the ratio form replaces', () => {
    // Measured: +1.66 % at 10 °C, −0.21 % at 100 °C, +0.42 % at 180 °C.
    for (const t of [283.15, 323.15, 373.15, 423.15, 453.15]) {
      expect(rel(jamiesonTudhopeThermalConductivity(0, t), liquidThermalConductivity(t))).toBeLessThan(0.02);
    }
  });
});

describe('seawater viscosity', () => {
  it('is IAPWS R12-08 water at zero salinity', () => {
    expect(seawater.viscosity?.(0, 330)).toBeCloseTo(liquidViscosity(330), 15);
  });

  it('gives about 1.08 mPa·s for standard seawater at 20 °C (from memory: ITTC seawater tables, 1.08 mPa·s at 35 g/kg)', () => {
    // From memory, so the tolerance is the review's stated ±1.5 %.
    expect(rel(seawater.viscosity?.(0.035, 293.15) as number, 1.08e-3)).toBeLessThan(0.015);
  });

  it('rises with salinity and falls with temperature, as the review’s A and B coefficients say', () => {
    expect(sharqawyRelativeViscosity(0.12, 350)).toBeGreaterThan(sharqawyRelativeViscosity(0.035, 350));
    expect(seawater.viscosity?.(0.07, 360) as number).toBeLessThan(seawater.viscosity?.(0.07, 320) as number);
  });
});

describe('seawater surface tension', () => {
  it('equals the IAPWS seawater guideline as python3-iapws evaluates it, to 1e-9', () => {
    for (const pt of fixture.surfaceTension) {
      const s = seawater.surfaceTension?.(pt.massFraction, pt.temperatureK) as number;
      expect(rel(s, pt.surfaceTension), `${pt.temperatureK} K, ${pt.massFraction}`).toBeLessThan(1e-9);
    }
    expect(seawater.surfaceTension?.(0, 300)).toBe(waterSurfaceTension(300));
  });
});

describe('seawater transport validity', () => {
  it('warns naming the property when the temperature leaves that property’s source range', () => {
    const w: EngineWarning[] = [];
    seawater.surfaceTension?.(0.035, 373.15, w); // measured to 92 °C only
    seawater.viscosity?.(0.035, 373.15, w); // inside the viscosity box: no warning
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({
      code: 'model-extrapolated',
      field: 'temperature',
      property: 'surface tension',
    });
    expect(w[0]?.message).toContain('surface tension data range');
    expect(w[0]?.validRange).toEqual({ min: 274.15, max: 365.15, unit: 'K' });
  });

  it('keeps one warning per property when two properties leave their boxes', () => {
    const w: EngineWarning[] = [];
    seawater.viscosity?.(0.155, 300, w); // viscosity data to 0.15 kg/kg
    seawater.surfaceTension?.(0.155, 300, w); // surface tension data to 0.131 kg/kg
    const extrapolated = w.filter((x) => x.code === 'model-extrapolated');
    expect(extrapolated.map((x) => x.property).sort()).toEqual(['surface tension', 'viscosity']);
  });

  it('refuses beyond the model’s hard limits with the valid range, and NaN', () => {
    expectRangeError(() => seawater.viscosity?.(0.2, 300), {
      field: 'massFraction',
      validRange: { min: 0, max: 0.16, unit: 'kg/kg' },
    });
    expectRangeError(() => seawater.thermalConductivity?.(0.035, 480), { field: 'temperature' });
    expectRangeError(() => seawater.surfaceTension?.(Number.NaN, 300), { field: 'massFraction' });
  });

  it('states each transport property’s source box', () => {
    expect(seawater.transportValidity?.viscosity?.massFraction).toEqual({ min: 0, max: 0.15 });
    expect(seawater.transportValidity?.surfaceTension?.temperature).toEqual({ min: 274.15, max: 365.15 });
  });
});
