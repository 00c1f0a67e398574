/**
 * IAPWS-IF97 region boundaries used by the lean core: B23 (regions 2 and 3) and B2bc (subregions
 * 2b and 2c of the backward equations), plain arithmetic.
 *
 * Source: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam": section 4, eqs. 5 and 6, Table 1 (B23); section
 * 6.3.1, eqs. 20 and 21, Table 19 (B2bc).
 */

/** IAPWS R7-97(2012) Table 1: n₁ … n₅ of the B23 equations (p* = 1 MPa, T* = 1 K). */
// prettier-ignore
const B1 = 0.34805185628969e3, B2 = -0.11671859879975e1, B3 = 0.10192970039326e-2,
  B4 = 0.57254459862746e3, B5 = 0.13918839778870e2;

/**
 * Pressure on the boundary between regions 2 and 3, R7-97(2012) eq. 5: π = n₁ + n₂θ + n₃θ².
 * Validity: 623.15 K ≤ T ≤ 863.15 K.
 *
 * @param T temperature, K
 * @returns p_B23, Pa
 */
export function b23Pressure(T: number): number {
  return (B1 + (B2 + B3 * T) * T) * 1e6;
}

/**
 * Temperature on the boundary between regions 2 and 3, R7-97(2012) eq. 6:
 * θ = n₄ + ((π − n₅)/n₃)^0.5. Validity: 16.5292 MPa ≤ p ≤ 100 MPa.
 *
 * @param p pressure, Pa
 * @returns T_B23, K
 */
export function b23Temperature(p: number): number {
  return B4 + Math.sqrt((p / 1e6 - B5) / B3);
}

/** IAPWS R7-97(2012) Table 19: n₁ … n₅ of the B2bc equations (p* = 1 MPa, h* = 1 kJ/kg). */
// prettier-ignore
const C1 = 0.90584278514723e3, C2 = -0.67955786399241e0, C3 = 0.12809002730136e-3,
  C4 = 0.26526571908428e4, C5 = 0.45257578905948e1;

/**
 * Pressure on the boundary between subregions 2b and 2c, R7-97(2012) eq. 20: π = n₁ + n₂η + n₃η².
 *
 * @param h specific enthalpy, J/kg
 * @returns p_B2bc, Pa
 */
export function b2bcPressure(h: number): number {
  const eta = h / 1e3;
  return (C1 + (C2 + C3 * eta) * eta) * 1e6;
}

/**
 * Enthalpy on the boundary between subregions 2b and 2c, R7-97(2012) eq. 21:
 * η = n₄ + ((π − n₅)/n₃)^0.5.
 *
 * @param p pressure, Pa
 * @returns h_B2bc, J/kg
 */
export function b2bcEnthalpy(p: number): number {
  return (C4 + Math.sqrt((p / 1e6 - C5) / C3)) * 1e3;
}
