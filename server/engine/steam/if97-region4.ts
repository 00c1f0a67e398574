/**
 * IAPWS-IF97 region 4 (the saturation line), lean: the saturation-pressure equation and its
 * backward form, plain arithmetic, no allocation.
 *
 * Source: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam", section 8: eq. 29 (the implicit quadratic), eq. 30
 * (p_s(T)), eq. 31 (T_s(p)), Table 34 (coefficients).
 *
 * Table 34's n₉ is −0.23855557567849 as the release prints it. The wrapped npm package
 * `@neutrium/thermo.eos.iapws97` 2.0.2 carries −0.238558557567849 instead (a stray digit), which
 * moves its p_s by up to ≈ 1e-8 relative near the critical point (python3-iapws uses the release's
 * value; tests/engine/steam/if97-lean-saturation.test.ts shows the difference).
 *
 * Validity (R7-97(2012) section 8): 273.15 K ≤ T ≤ 647.096 K, 611.213 Pa ≤ p ≤ 22.064 MPa. No range
 * checks here: the adapter (steam/if97.ts) checks every input.
 */

/**
 * IAPWS R7-97(2012) Table 34: n₁ … n₁₀ of eqs. 29–31 (p* = 1 MPa, T* = 1 K).
 */
// prettier-ignore
const N1 = 0.11670521452767e4, N2 = -0.72421316703206e6, N3 = -0.17073846940092e2,
  N4 = 0.12020824702470e5, N5 = -0.32325550322333e7, N6 = 0.14915108613530e2,
  N7 = -0.48232657361591e4, N8 = 0.40511340542057e6, N9 = -0.23855557567849e0,
  N10 = 0.65017534844798e3;

/**
 * Saturation pressure, R7-97(2012) eq. 30:
 *   p_s/p* = [2C/(−B + (B² − 4AC)^0.5)]⁴,  ϑ = T_s/T* + n₉/(T_s/T* − n₁₀),
 *   A = ϑ² + n₁ϑ + n₂,  B = n₃ϑ² + n₄ϑ + n₅,  C = n₆ϑ² + n₇ϑ + n₈.
 *
 * @param T temperature, K
 * @returns p_s, Pa
 */
export function saturationPressureLean(T: number): number {
  const th = T + N9 / (T - N10);
  const th2 = th * th;
  const A = th2 + N1 * th + N2;
  const B = N3 * th2 + N4 * th + N5;
  const C = N6 * th2 + N7 * th + N8;
  const r = (2 * C) / (-B + Math.sqrt(B * B - 4 * A * C));
  const r2 = r * r;
  return r2 * r2 * 1e6;
}

/**
 * Saturation temperature, R7-97(2012) eq. 31:
 *   T_s/T* = [n₁₀ + D − ((n₁₀ + D)² − 4(n₉ + n₁₀D))^0.5]/2,  D = 2G/(−F − (F² − 4EG)^0.5),
 *   E = β² + n₃β + n₆,  F = n₁β² + n₄β + n₇,  G = n₂β² + n₅β + n₈,  β = (p_s/p*)^(1/4).
 *
 * @param p pressure, Pa
 * @returns T_s, K
 */
export function saturationTemperatureLean(p: number): number {
  const beta = Math.sqrt(Math.sqrt(p / 1e6));
  const b2 = beta * beta;
  const E = b2 + N3 * beta + N6;
  const F = N1 * b2 + N4 * beta + N7;
  const G = N2 * b2 + N5 * beta + N8;
  const D = (2 * G) / (-F - Math.sqrt(F * F - 4 * E * G));
  const s = N10 + D;
  return (s - Math.sqrt(s * s - 4 * (N9 + N10 * D))) / 2;
}
