/**
 * Ebullio's one adapter to IAPWS-IF97 (IAPWS R7-97(2012), "Revised Release on the IAPWS
 * Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam").
 *
 * The equations themselves come from the npm package `@neutrium/thermo.eos.iapws97` 2.0.2;
 * no other engine file imports that package. This module converts its units (MPa, kJ) to SI,
 * finds the region itself (the package's own mode search only handles (p, T)), handles the
 * two-phase dome for (p, h) states, refines the package's backward T(p, h) with the forward
 * equation, and turns out-of-range input into an {@link EngineRangeError} naming the input.
 *
 * Transport properties (viscosity, thermal conductivity) are those the package computes:
 * IAPWS R12-08 (viscosity) and IAPWS R15-11 (thermal conductivity, without the critical
 * enhancement as implemented by the package). Tests check them against published values.
 */
import { createRequire } from 'node:module';
import { EngineRangeError } from '../errors.js';

const require = createRequire(import.meta.url);

/** The package's State object: MPa inputs, Pa output pressure, kJ-based energies. */
interface PackageState {
  p: number;
  t: number;
  rho: number;
  v: number;
  u: number;
  s: number;
  h: number;
  cp: number;
  cv: number;
  w: number;
  mu: number;
  k: number;
}
interface PackagePT {
  r1(pMPa: number, T: number): PackageState;
  r2(pMPa: number, T: number): PackageState;
  r3(pMPa: number, T: number, rho?: number): PackageState;
  r5(pMPa: number, T: number): PackageState;
  r4_P_Tsat(pMPa: number): number;
  r4_T_Psat(T: number): number;
  b23_T_P(T: number): number;
  b23_P_T(pMPa: number): number;
}
interface PackagePH {
  r1_PH_T(pMPa: number, h: number): number;
  r2(pMPa: number, h: number): PackageState;
}
const PT = require('@neutrium/thermo.eos.iapws97/dist/PT') as PackagePT;
const PH = require('@neutrium/thermo.eos.iapws97/dist/PH') as PackagePH;

/** IF97 constants (R7-97(2012), section 2 and 3). */
export const IF97 = {
  /** Critical temperature, K. */
  criticalTemperature: 647.096,
  /** Critical pressure, Pa. */
  criticalPressure: 22.064e6,
  /** Critical density, kg/m³. */
  criticalDensity: 322,
  /** Triple-point temperature, K. */
  tripleTemperature: 273.16,
  /** Specific gas constant used by IF97, J/(kg·K). */
  gasConstant: 461.526,
  /** Lowest temperature of the formulation, K. */
  minTemperature: 273.15,
  /** Upper temperature of regions 1–3, K. */
  maxTemperature: 1073.15,
  /** Upper temperature of region 5, K (for p ≤ 50 MPa). */
  maxTemperatureRegion5: 2273.15,
  /** Upper pressure of regions 1–3, Pa. */
  maxPressure: 100e6,
  /** Upper pressure of region 5, Pa. */
  maxPressureRegion5: 50e6,
  /** Saturation pressure at 273.15 K, Pa: the lowest pressure this adapter accepts. */
  minPressure: 611.213,
  /** Boundary temperature between regions 1 and 3, K. */
  region13Temperature: 623.15,
  /** Saturation pressure at 623.15 K, Pa (boundary of region 4 with region 3). */
  region13SaturationPressure: 16.529164253e6,
} as const;

export type Region = 1 | 2 | 3 | 4 | 5;
export type Phase = 'liquid' | 'vapor' | 'two-phase' | 'supercritical';

/** A state of water or steam, all in SI. */
export interface WaterState {
  region: Region;
  phase: Phase;
  /** Pa */
  pressure: number;
  /** K */
  temperature: number;
  /** J/kg */
  enthalpy: number;
  /** J/(kg·K) */
  entropy: number;
  /** J/kg */
  internalEnergy: number;
  /** m³/kg */
  specificVolume: number;
  /** kg/m³ */
  density: number;
  /** Isobaric heat capacity, J/(kg·K). Undefined inside the two-phase dome. */
  heatCapacity?: number;
  /** Isochoric heat capacity, J/(kg·K). Undefined inside the two-phase dome. */
  isochoricHeatCapacity?: number;
  /** m/s. Undefined inside the two-phase dome. */
  speedOfSound?: number;
  /** Dynamic viscosity, Pa·s. Undefined inside the two-phase dome. */
  viscosity?: number;
  /** W/(m·K). Undefined inside the two-phase dome. */
  thermalConductivity?: number;
  /** Vapour mass fraction, only for two-phase states (0 = saturated liquid, 1 = saturated vapour). */
  quality?: number;
}

export interface SaturationProperties {
  /** Pa */
  pressure: number;
  /** K */
  temperature: number;
  /** h_g − h_f, J/kg */
  latentHeat: number;
  liquid: WaterState;
  vapor: WaterState;
}

const MPA = 1e6;
const KJ = 1e3;

function checkFinite(field: string, value: number, unit: string, min: number, max: number): void {
  if (!Number.isFinite(value) || value < min || value > max) {
    throw new EngineRangeError(field, value, { min, max, unit });
  }
}

function toState(s: PackageState, region: Region, phase: Phase): WaterState {
  return {
    region,
    phase,
    pressure: s.p, // the package already reports Pa
    temperature: s.t,
    enthalpy: s.h * KJ,
    entropy: s.s * KJ,
    internalEnergy: s.u * KJ,
    specificVolume: s.v,
    density: 1 / s.v,
    heatCapacity: s.cp * KJ,
    isochoricHeatCapacity: s.cv * KJ,
    speedOfSound: s.w,
    viscosity: s.mu * 1e-3, // the package reports mPa·s
    thermalConductivity: s.k,
  };
}

function singlePhase(region: Region, pressure: number, temperature: number): Phase {
  if (temperature >= IF97.criticalTemperature && pressure >= IF97.criticalPressure) return 'supercritical';
  if (region === 1) return 'liquid';
  if (region === 3) {
    return 'liquid';
  }
  return 'vapor';
}

/** Saturation temperature at pressure p (IF97 eq. 31), K. Valid 611.213 Pa to 22.064 MPa. */
export function saturationTemperature(pressure: number): number {
  checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.criticalPressure);
  return PT.r4_P_Tsat(pressure / MPA);
}

/** Saturation pressure at temperature T (IF97 eq. 30), Pa. Valid 273.15 K to 647.096 K. */
export function saturationPressure(temperature: number): number {
  checkFinite('temperature', temperature, 'K', IF97.minTemperature, IF97.criticalTemperature);
  return PT.r4_T_Psat(temperature) * MPA;
}

/** Region of a (p, T) state by the IF97 boundaries (R7-97(2012) figure 1). */
export function regionAtPT(pressure: number, temperature: number): Exclude<Region, 4> {
  checkFinite('temperature', temperature, 'K', IF97.minTemperature, IF97.maxTemperatureRegion5);
  if (temperature > IF97.maxTemperature) {
    checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.maxPressureRegion5);
    return 5;
  }
  checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.maxPressure);
  const pMPa = pressure / MPA;
  if (temperature <= IF97.region13Temperature) {
    return pMPa >= PT.r4_T_Psat(temperature) ? 1 : 2;
  }
  return pMPa > PT.b23_T_P(temperature) ? 3 : 2;
}

/** Single-phase state at (p, T), Pa and K. On the saturation line region 1 (liquid) is returned. */
export function stateAtPT(pressure: number, temperature: number): WaterState {
  const region = regionAtPT(pressure, temperature);
  const pMPa = pressure / MPA;
  let s: PackageState;
  switch (region) {
    case 1:
      s = PT.r1(pMPa, temperature);
      break;
    case 2:
      s = PT.r2(pMPa, temperature);
      break;
    case 3:
      s = PT.r3(pMPa, temperature);
      break;
    case 5:
      s = PT.r5(pMPa, temperature);
      break;
  }
  return toState(s, region, singlePhase(region, pressure, temperature));
}

function saturatedStates(pressure: number, temperature: number): SaturationProperties {
  if (temperature > IF97.region13Temperature) {
    // Above 623.15 K the saturated states lie in region 3; solving them needs the
    // saturated densities, which this adapter does not yet provide.
    throw new EngineRangeError(
      'temperature',
      temperature,
      {
        min: IF97.minTemperature,
        max: IF97.region13Temperature,
        unit: 'K',
      },
      `Saturation properties are available from ${IF97.minTemperature} K to ${IF97.region13Temperature} K (${IF97.region13SaturationPressure} Pa); ${temperature} K is in region 3`,
    );
  }
  const pMPa = pressure / MPA;
  const liquid = toState(PT.r1(pMPa, temperature), 4, 'liquid');
  const vapor = toState(PT.r2(pMPa, temperature), 4, 'vapor');
  liquid.quality = 0;
  vapor.quality = 1;
  return { pressure, temperature, latentHeat: vapor.enthalpy - liquid.enthalpy, liquid, vapor };
}

/** Saturated liquid and vapour at pressure p, Pa (611.213 Pa to 16.529 MPa). */
export function saturationAtPressure(pressure: number): SaturationProperties {
  checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.region13SaturationPressure);
  return saturatedStates(pressure, PT.r4_P_Tsat(pressure / MPA));
}

/** Saturated liquid and vapour at temperature T, K (273.15 K to 623.15 K). */
export function saturationAtTemperature(temperature: number): SaturationProperties {
  checkFinite('temperature', temperature, 'K', IF97.minTemperature, IF97.region13Temperature);
  return saturatedStates(PT.r4_T_Psat(temperature) * MPA, temperature);
}

/** Enthalpy of saturated liquid at pressure p, J/kg (fast path for solvers). */
export function saturatedLiquidEnthalpy(pressure: number): number {
  checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.region13SaturationPressure);
  const pMPa = pressure / MPA;
  return PT.r1(pMPa, PT.r4_P_Tsat(pMPa)).h * KJ;
}

/** Enthalpy of saturated vapour at pressure p, J/kg (fast path for solvers). */
export function saturatedVaporEnthalpy(pressure: number): number {
  checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.region13SaturationPressure);
  const pMPa = pressure / MPA;
  return PT.r2(pMPa, PT.r4_P_Tsat(pMPa)).h * KJ;
}

/** Enthalpy at (p, T), J/kg, single phase (fast path for solvers). */
export function enthalpyAtPT(pressure: number, temperature: number): number {
  return stateAtPT(pressure, temperature).enthalpy;
}

/**
 * State at (p, h). Inside the two-phase dome the state is the lever-rule mixture of the
 * saturated states, with quality x = (h − h_f)/(h_g − h_f). Elsewhere the package's backward
 * equation gives a first T, refined by Newton steps on the forward equation so that the
 * returned state reproduces h to 1e-9 relative.
 */
export function stateAtPH(pressure: number, enthalpy: number): WaterState {
  checkFinite('pressure', pressure, 'Pa', IF97.minPressure, IF97.maxPressure);
  if (!Number.isFinite(enthalpy)) {
    throw new EngineRangeError('enthalpy', enthalpy, { min: 0, max: 4.16e6, unit: 'J/kg' });
  }
  const hMin = stateAtPT(pressure, IF97.minTemperature).enthalpy;
  const hMax = stateAtPT(pressure, IF97.maxTemperature).enthalpy;
  if (enthalpy < hMin || enthalpy > hMax) {
    throw new EngineRangeError(
      'enthalpy',
      enthalpy,
      { min: hMin, max: hMax, unit: 'J/kg' },
      `enthalpy = ${enthalpy} J/kg is outside ${hMin.toFixed(1)} to ${hMax.toFixed(1)} J/kg at ${pressure} Pa (273.15 K to 1073.15 K)`,
    );
  }
  if (pressure <= IF97.region13SaturationPressure) {
    const sat = saturationAtPressure(pressure);
    const hf = sat.liquid.enthalpy;
    const hg = sat.vapor.enthalpy;
    if (enthalpy >= hf && enthalpy <= hg) {
      const x = (enthalpy - hf) / (hg - hf);
      const v = sat.liquid.specificVolume + x * (sat.vapor.specificVolume - sat.liquid.specificVolume);
      return {
        region: 4,
        phase: 'two-phase',
        pressure,
        temperature: sat.temperature,
        enthalpy,
        entropy: sat.liquid.entropy + x * (sat.vapor.entropy - sat.liquid.entropy),
        internalEnergy:
          sat.liquid.internalEnergy + x * (sat.vapor.internalEnergy - sat.liquid.internalEnergy),
        specificVolume: v,
        density: 1 / v,
        quality: x,
      };
    }
  }
  return refineTemperature(pressure, enthalpy, initialTemperature(pressure, enthalpy));
}

function initialTemperature(pressure: number, enthalpy: number): number {
  const pMPa = pressure / MPA;
  const hkJ = enthalpy / KJ;
  try {
    const liquidSide =
      pressure > IF97.region13SaturationPressure
        ? hkJ < 2.0e3
        : enthalpy < saturationAtPressure(pressure).liquid.enthalpy;
    const t = liquidSide ? PH.r1_PH_T(pMPa, hkJ) : PH.r2(pMPa, hkJ).t;
    if (Number.isFinite(t) && t > IF97.minTemperature && t < IF97.maxTemperature) return t;
  } catch {
    // fall through to the bracketing search below
  }
  return 0.5 * (IF97.minTemperature + IF97.maxTemperature);
}

/** Newton on h(p, T) = h_target with a bisection guard over [273.15, 1073.15] K. */
function refineTemperature(pressure: number, enthalpy: number, t0: number): WaterState {
  let lo = IF97.minTemperature;
  let hi = IF97.maxTemperature;
  let t = t0;
  for (let i = 0; i < 60; i++) {
    const s = stateAtPT(pressure, t);
    const f = s.enthalpy - enthalpy;
    if (Math.abs(f) <= 1e-9 * Math.max(1, Math.abs(enthalpy))) return s;
    if (f > 0) hi = t;
    else lo = t;
    const cp = s.heatCapacity ?? 0;
    let next = cp > 0 ? t - f / cp : NaN;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    t = next;
  }
  return stateAtPT(pressure, t);
}
