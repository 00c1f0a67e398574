/**
 * Ebullio's lean IAPWS-IF97 core: the equations the engine calls inside its solver loops, written
 * as plain arithmetic over the coefficient tables of IAPWS R7-97(2012), "Revised Release on the
 * IAPWS Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam":
 *
 * - region 1 (if97-region1.ts): h, and v, u, s, h, c_p, c_v, w at (p, T), eq. 7;
 * - region 2 (if97-region2.ts): the same from eqs. 15–17;
 * - region 4 (if97-region4.ts): p_s(T), eq. 30, and T_s(p), eq. 31;
 * - the boundaries B23 (eqs. 5, 6) and B2bc (eqs. 20, 21) (if97-boundaries.ts);
 * - the backward equations T(p, h) and T(p, s) of regions 1 and 2, their refinement on the forward
 *   equations, and h(p, s) (if97-backward.ts).
 *
 * Every function takes and returns plain numbers in SI (Pa, K, J/kg, J/(kg·K), m³/kg) and allocates
 * nothing; several properties at once go into a caller-supplied {@link LeanProperties}. Nothing
 * here checks ranges or picks regions: steam/if97.ts, the adapter, does both, and keeps the npm
 * package `@neutrium/thermo.eos.iapws97` for region 3, region 5 and transport properties.
 */
export { leanProperties, type LeanProperties } from './if97-lean-series.js';
export { region1Enthalpy, region1Properties } from './if97-region1.js';
export { region2Enthalpy, region2Properties } from './if97-region2.js';
export { saturationPressureLean, saturationTemperatureLean } from './if97-region4.js';
export { b23Pressure, b23Temperature, b2bcEnthalpy, b2bcPressure } from './if97-boundaries.js';
export {
  region1EnthalpyAtPS,
  region1TemperatureAtPH,
  region1TemperatureAtPS,
  region1TemperaturePH,
  region1TemperaturePS,
  region2EnthalpyAtPS,
  region2TemperatureAtPH,
  region2TemperatureAtPS,
  region2TemperaturePH,
  region2TemperaturePS,
  SUBREGION_2A_MAX_PRESSURE,
  SUBREGION_2BC_ENTROPY,
} from './if97-backward.js';
