/**
 * The lean IF97 core against the wrapped npm package `@neutrium/thermo.eos.iapws97` 2.0.2 (the
 * oracle: an independent implementation of the same IAPWS R7-97(2012) equations), on 10 000
 * seeded random states over the evaporator range (1 kPa–10 MPa, 273.16–800 K, regions 1 and 2)
 * and 2 000 saturation temperatures (273.16–640 K); and the backward equations against the
 * consistency the release permits.
 *
 * Forward equations, same coefficients on both sides: |Δ| ≤ 1e-12 relative, or ≤ 1e-9 kJ/kg
 * (kJ/(kg·K)) absolute where the value passes through zero (IF97 puts u = s = 0 at the triple
 * point, so cold-liquid h, u, s are small differences of large terms).
 *
 * Region 4: the package's eq. 30/31 carry n₉ = −0.238558557567849 where R7-97(2012) Table 34 prints
 * −0.23855557567849, so p_s is compared with python3-iapws instead
 * (tests/engine/steam/if97-lean-fixture.test.ts); here only the size of that difference is bounded.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import {
  b2bcPressure,
  leanProperties,
  region1Enthalpy,
  region1Properties,
  region1TemperatureAtPH,
  region1TemperatureAtPS,
  region1TemperaturePH,
  region1TemperaturePS,
  region2Enthalpy,
  region2Properties,
  region2TemperatureAtPH,
  region2TemperatureAtPS,
  region2TemperaturePH,
  region2TemperaturePS,
  saturationPressureLean,
  saturationTemperatureLean,
} from '../../../server/engine/steam/if97-lean.js';
import { enthalpyAtPS, regionAtPT, saturationEnthalpies } from '../../../server/engine/steam/if97.js';

interface PackageState {
  v: number;
  u: number;
  s: number;
  h: number;
  cp: number;
  cv: number;
  w: number;
}
const PT = createRequire(import.meta.url)('@neutrium/thermo.eos.iapws97/dist/PT') as {
  r1(pMPa: number, T: number): PackageState;
  r2(pMPa: number, T: number): PackageState;
  r4_T_Psat(T: number): number;
};

/** Seeded generator (mulberry32), so every run checks the same points. */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const MPA = 1e6;
const KJ = 1e3;

/** 1e-12 relative, or 1e-9 kJ/kg (1e-6 J/kg) absolute near zero. */
function agrees(actual: number, expected: number, absolute = 1e-6): boolean {
  const d = Math.abs(actual - expected);
  return d <= 1e-12 * Math.abs(expected) || d <= absolute;
}

interface Point {
  p: number;
  T: number;
  region: 1 | 2;
}

/** 10 000 points, p log-uniform over 1 kPa–10 MPa, T uniform over 273.16–800 K. */
const points: Point[] = (() => {
  const next = random(97);
  const out: Point[] = [];
  while (out.length < 10_000) {
    const p = 1e3 * Math.pow(1e4, next());
    const T = 273.16 + next() * (800 - 273.16);
    const region = regionAtPT(p, T);
    if (region === 1 || region === 2) out.push({ p, T, region });
  }
  return out;
})();

describe('lean forward equations agree with the wrapped package on 10 000 random states', () => {
  it('covers both regions with thousands of points each', () => {
    expect(points.filter((q) => q.region === 1).length).toBeGreaterThan(2000);
    expect(points.filter((q) => q.region === 2).length).toBeGreaterThan(2000);
  });

  it('gives h, s, u, v, cp, cv, w to 1e-12 (or 1e-9 kJ/kg near zero) in regions 1 and 2', () => {
    const out = leanProperties();
    const failures: string[] = [];
    for (const { p, T, region } of points) {
      const ref = region === 1 ? PT.r1(p / MPA, T) : PT.r2(p / MPA, T);
      const lean = region === 1 ? region1Properties(p, T, out) : region2Properties(p, T, out);
      const h = region === 1 ? region1Enthalpy(p, T) : region2Enthalpy(p, T);
      const checks: [string, number, number][] = [
        ['h', lean.h, ref.h * KJ],
        ['h (enthalpy-only path)', h, ref.h * KJ],
        ['s', lean.s, ref.s * KJ],
        ['u', lean.u, ref.u * KJ],
        ['v', lean.v, ref.v],
        ['cp', lean.cp, ref.cp * KJ],
        ['cv', lean.cv, ref.cv * KJ],
        ['w', lean.w, ref.w],
      ];
      for (const [name, a, b] of checks) {
        if (!agrees(a, b)) failures.push(`${name} at ${p} Pa, ${T} K (region ${region}): ${a} vs ${b}`);
      }
    }
    expect(failures.slice(0, 5)).toEqual([]);
  });
});

describe('lean saturated states agree with the wrapped package on 2 000 saturation temperatures', () => {
  const next = random(2024);
  const temperatures = Array.from({ length: 2000 }, () => 273.16 + next() * (640 - 273.16));

  it('h_f and h_g at (p_s, T) equal the package regions 1 and 2 at the same state to 1e-12', () => {
    const failures: string[] = [];
    for (const T of temperatures.filter((t) => t <= 623.15)) {
      const ps = saturationPressureLean(T);
      const hf = region1Enthalpy(ps, T);
      const hg = region2Enthalpy(ps, T);
      if (!agrees(hf, PT.r1(ps / MPA, T).h * KJ)) failures.push(`h_f at ${T} K`);
      if (!agrees(hg, PT.r2(ps / MPA, T).h * KJ)) failures.push(`h_g at ${T} K`);
      // The adapter's lean path at p_s gives the same numbers (its T_s round-trips to 1e-11 K).
      const sat = saturationEnthalpies(ps);
      if (!agrees(sat.liquid, hf, 1e-3) || !agrees(sat.vapor, hg, 1e-3)) failures.push(`adapter at ${T} K`);
    }
    expect(failures.slice(0, 5)).toEqual([]);
  });

  it('T_s(p_s(T)) returns T to round-off (1e-10 K), and p_s differs from the package only by its n₉ digit', () => {
    let worstRoundTrip = 0;
    let worstPackage = 0;
    for (const T of temperatures) {
      const ps = saturationPressureLean(T);
      worstRoundTrip = Math.max(worstRoundTrip, Math.abs(saturationTemperatureLean(ps) - T));
      worstPackage = Math.max(worstPackage, Math.abs(ps / (PT.r4_T_Psat(T) * MPA) - 1));
    }
    expect(worstRoundTrip).toBeLessThan(1e-10); // measured 1.1e-11 K: eqs. 30 and 31 are exact inverses
    // The package's Δn₉ = −3.0e-6 shifts ϑ by Δn₉/(T − n₁₀), i.e. p_s by (d ln p_s/dT)·Δn₉/(T − n₁₀):
    // ≈ 5e-10 at 300 K growing to ≈ 4e-9 at 640 K. Not round-off, and not more than that.
    expect(worstPackage).toBeGreaterThan(1e-10);
    expect(worstPackage).toBeLessThan(1e-8);
  });
});

/** The release's permitted inconsistency of a backward equation with the forward one, K. */
function region2Tolerance(p: number, h: number): number {
  // R7-97(2012) Table 23 (from memory): 10 mK in subregions 2a and 2b, 25 mK in 2c.
  return p <= 4e6 || p <= b2bcPressure(h) ? 0.01 : 0.025;
}

describe('lean backward equations stay within the release consistency, and refine to 1e-9 K', () => {
  const out = leanProperties();

  it('region 1 T(p, h) and T(p, s) within 25 mK (R7-97(2012) eqs. 12 and 14) before refinement', () => {
    let worstPH = 0;
    let worstPS = 0;
    let worstRefined = 0;
    for (const { p, T } of points.filter((q) => q.region === 1)) {
      const { h, s } = region1Properties(p, T, out);
      worstPH = Math.max(worstPH, Math.abs(region1TemperaturePH(p, h) - T));
      worstPS = Math.max(worstPS, Math.abs(region1TemperaturePS(p, s) - T));
      worstRefined = Math.max(
        worstRefined,
        Math.abs(region1TemperatureAtPH(p, h) - T),
        Math.abs(region1TemperatureAtPS(p, s) - T),
      );
    }
    expect(worstPH).toBeLessThanOrEqual(0.025);
    expect(worstPS).toBeLessThanOrEqual(0.025);
    expect(worstRefined).toBeLessThan(1e-9);
  });

  it('region 2 T(p, h) and T(p, s) within 10 mK (2a, 2b) or 25 mK (2c) before refinement', () => {
    let worstExcess = -Infinity;
    let worstRefined = 0;
    for (const { p, T } of points.filter((q) => q.region === 2)) {
      const { h, s } = region2Properties(p, T, out);
      const tol = region2Tolerance(p, h);
      // T(p, s) switches from 2b to 2c at s = 5.85 kJ/(kg K) (Table 28, from memory: same tolerances).
      const tolS = p <= 4e6 || s >= 5.85e3 ? 0.01 : 0.025;
      worstExcess = Math.max(
        worstExcess,
        Math.abs(region2TemperaturePH(p, h) - T) - tol,
        Math.abs(region2TemperaturePS(p, s) - T) - tolS,
      );
      worstRefined = Math.max(
        worstRefined,
        Math.abs(region2TemperatureAtPH(p, h) - T),
        Math.abs(region2TemperatureAtPS(p, s) - T),
      );
    }
    expect(worstExcess).toBeLessThanOrEqual(0);
    expect(worstRefined).toBeLessThan(1e-9);
  });

  it('h(p, s) returns the forward h of the state whose entropy it is given, to 1e-9 relative', () => {
    let worst = 0;
    for (const { p, T, region } of points.filter((q) => q.p <= 16.529e6)) {
      const { h, s } = region === 1 ? region1Properties(p, T, out) : region2Properties(p, T, out);
      worst = Math.max(worst, Math.abs(enthalpyAtPS(p, s) - h) / Math.max(Math.abs(h), 1e3));
    }
    expect(worst).toBeLessThan(1e-9);
  });
});
