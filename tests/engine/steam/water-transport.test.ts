/**
 * Liquid-water transport properties of the IF97 adapter (the pure-water part of every liquor's
 * viscosity, conductivity and surface tension) against Debian's python3-iapws: points in
 * tests/fixtures/steam/water-transport.json, generated offline by
 * tests/fixtures/steam/generate_water_transport_fixture.py.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  liquidThermalConductivity,
  liquidViscosity,
  waterSurfaceTension,
} from '../../../server/engine/steam/if97.js';
import { expectRangeError } from '../expect-range-error.js';

interface Point {
  T: number;
  p?: number;
  rho: number;
  mu: number;
  k: number;
  sigma?: number;
}
const fixture = JSON.parse(
  readFileSync(new URL('../../fixtures/steam/water-transport.json', import.meta.url), 'utf8'),
) as { saturatedLiquid: Point[]; compressedLiquid: Point[] };

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('liquid water transport properties (IAPWS 2008 / 2011 / 1994 via the IF97 adapter)', () => {
  it('gives the viscosity and conductivity of saturated liquid as python3-iapws does, to 1e-6', () => {
    for (const pt of fixture.saturatedLiquid) {
      expect(rel(liquidViscosity(pt.T), pt.mu), `mu at ${pt.T} K`).toBeLessThan(1e-6);
      expect(rel(liquidThermalConductivity(pt.T), pt.k), `k at ${pt.T} K`).toBeLessThan(1e-6);
    }
  });

  it('gives compressed-liquid values at a stated pressure, to 1e-6', () => {
    for (const pt of fixture.compressedLiquid) {
      const p = pt.p as number;
      expect(rel(liquidViscosity(pt.T, p), pt.mu), `mu at ${pt.T} K, ${p} Pa`).toBeLessThan(1e-6);
      expect(rel(liquidThermalConductivity(pt.T, p), pt.k), `k at ${pt.T} K, ${p} Pa`).toBeLessThan(1e-6);
    }
  });

  it('gives the IAPWS surface tension as python3-iapws does, to 1e-9', () => {
    for (const pt of fixture.saturatedLiquid) {
      expect(rel(waterSurfaceTension(pt.T), pt.sigma as number), `sigma at ${pt.T} K`).toBeLessThan(1e-9);
    }
  });

  it('refuses a pressure below saturation (the water would be vapour) with the valid range', () => {
    const e = expectRangeError(() => liquidViscosity(373.15, 5e4), { field: 'pressure', value: 5e4 });
    expect(e.validRange?.min).toBeCloseTo(101418, -1); // p_sat(100 °C), IF97: 101.418 kPa
  });

  it('refuses temperatures outside the releases, and NaN', () => {
    expectRangeError(() => liquidViscosity(250), { field: 'temperature' });
    expectRangeError(() => liquidThermalConductivity(Number.NaN), { field: 'temperature' });
    expectRangeError(() => waterSurfaceTension(650), { field: 'temperature' });
    expectRangeError(() => waterSurfaceTension(200), { field: 'temperature' });
  });
});
