/**
 * Ebullio's one adapter to IAPWS-IF97: IAPWS R7-97(2012), "Revised Release on the IAPWS
 * Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam" (IAPWS,
 * Lucerne, 2007, revised 2012; cited in results as {@link IF97_CITATION}); W. Wagner et al., "The IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam", J. Eng. Gas Turbines Power 122 (2000) 150–182.
 *
 * Two implementations sit behind this one adapter, and it picks the path:
 * - Ebullio's lean core (steam/if97-lean.ts and the files it lists) for regions 1, 2 and 4, the
 *   B23 boundary and the backward equations T(p, h) and T(p, s) of regions 1 and 2: plain
 *   arithmetic over the release's coefficient tables, no allocation per call, so that solver loops
 *   do not wait on steam properties;
 * - the npm package `@neutrium/thermo.eos.iapws97` 2.0.2 (exact version pinned in package.json)
 *   for region 3, region 5 and the transport properties; no other engine file imports it. The
 *   tests also keep it as the oracle of the lean core where both evaluate the same equation.
 * This module converts the package's units (MPa, kJ) to SI, finds the region itself (the
 * package's own mode search only handles (p, T)), iterates the region-3 density on the forward
 * equation, solves the region-3 saturated densities, handles the two-phase dome for (p, h) and
 * (p, s) states, refines the backward temperatures with the forward equation, and turns
 * out-of-range input into an {@link EngineRangeError} naming the input.
 *
 * The package carries three coefficients that differ from the release in a digit (Table 34's n₉,
 * Table 20's n₃₂, Table 25's n₁₂; see steam/if97-region4.ts and steam/if97-backward.ts); the lean
 * core uses the release's values, so saturation pressures and temperatures here follow the release
 * (and python3-iapws) rather than the package, by up to ≈ 1e-8 relative near the critical point.
 *
 * Validity (R7-97(2012) section 4): 273.15 K ≤ T ≤ 1073.15 K at 0 < p ≤ 100 MPa (regions 1–4) and
 * 1073.15 K < T ≤ 2273.15 K at 0 < p ≤ 50 MPa (region 5). Saturation: 273.15 K to 647.096 K,
 * 611.213 Pa to 22.064 MPa.
 *
 * Transport properties are the package's implementations of IAPWS R12-08 ("Release on the IAPWS
 * Formulation 2008 for the Viscosity of Ordinary Water Substance") with the critical enhancement
 * μ2 = 1, and IAPWS R15-11 ("Release on the IAPWS Formulation 2011 for the Thermal Conductivity of
 * Ordinary Water Substance") WITHOUT the critical enhancement λ2 (the package leaves it out), so
 * thermal conductivity near the critical point (roughly 600–750 K at 15–40 MPa) is too low. Both
 * releases are valid to 1173.15 K; above that the state carries no transport properties.
 *
 * How the package is loaded (measured, see tests/bench/steam.ts): each package state also
 * evaluates viscosity, conductivity, surface tension, dielectric constant and ionisation constant
 * (≈ 3.5 µs of ≈ 9 µs for a region-1 state) and then copies its fields into a `State` object that
 * silently drops every falsy value (0 and NaN both become null). This adapter therefore loads a
 * private copy of the package's modules in which those auxiliary functions are stubs and `State`
 * passes the raw result through; viscosity and conductivity are evaluated (with the package's
 * own functions) only when a caller asks for a full state. The package's shared instance, which
 * nothing else in the engine uses, is left untouched.
 */
import { createRequire } from 'node:module';
import { EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type { Citation } from '../types.js';
import * as lean from './if97-lean.js';
import type { LeanProperties } from './if97-lean.js';

// Module-local aliases of the lean core: hot paths then call constants of this module rather than
// imported bindings (which some loaders compile to property getters).
const {
  b23Pressure,
  region1Enthalpy,
  region1EnthalpyAtPS,
  region1Properties,
  region1TemperaturePH,
  region2Enthalpy,
  region2EnthalpyAtPS,
  region2Properties,
  region2TemperaturePH,
  saturationPressureLean,
  saturationTemperatureLean,
} = lean;

const require = createRequire(import.meta.url);

/** The raw result object of the package's forward equations: MPa in, Pa out, kJ-based energies. */
interface RawState {
  p: number;
  t: number;
  v: number;
  u: number;
  s: number;
  h: number;
  cp: number;
  cv: number;
  w: number;
}
interface PackagePT {
  r1(pMPa: number, T: number): RawState;
  r2(pMPa: number, T: number): RawState;
  r3(pMPa: number, T: number, rho?: number): RawState;
  r5(pMPa: number, T: number): RawState;
  r4_P_Tsat(pMPa: number): number;
  r4_T_Psat(T: number): number;
  b23_T_P(T: number): number;
  b23_P_T(pMPa: number): number;
}
interface PackageBase {
  viscosity(T: number, rho: number): number;
  thermal_conductivity(T: number, rho: number): number;
  surface_tension(T: number): number;
  dielectric_constant(T: number, rho: number): number;
  ionization_constant(T: number, rho: number): number;
}
interface PackageThermo {
  State: unknown;
}

interface PrivatePackage {
  PT: PackagePT;
  /** R12-08 viscosity, μPa·s, of (T in K, ρ in kg/m³): the package's function. */
  viscosity: (T: number, rho: number) => number;
  /** R15-11 thermal conductivity without λ2, mW/(m·K), of (T in K, ρ in kg/m³). */
  thermalConductivity: (T: number, rho: number) => number;
}

/**
 * Loads a private copy of the package (see the module comment): the require cache entries of
 * the three modules involved are set aside, the modules are loaded afresh, patched, and the
 * original cache entries are put back, so any other `require` of the package still gets the
 * ordinary, unpatched instance.
 */
function loadPrivatePackage(): PrivatePackage {
  const ptPath = require.resolve('@neutrium/thermo.eos.iapws97/dist/PT');
  const basePath = require.resolve('@neutrium/thermo.eos.iapws97/dist/base');
  const thermoPath = createRequire(ptPath).resolve('@neutrium/thermo');
  const paths = [ptPath, basePath, thermoPath];
  const saved = paths.map((p) => require.cache[p]);
  for (const p of paths) delete require.cache[p];
  try {
    const PT = require(ptPath) as PackagePT;
    const base = require(basePath) as PackageBase;
    const thermo = require(thermoPath) as PackageThermo;
    const viscosity = base.viscosity;
    const thermalConductivity = base.thermal_conductivity;
    const none = (): number => 0;
    base.viscosity = none;
    base.thermal_conductivity = none;
    base.surface_tension = none;
    base.dielectric_constant = none;
    base.ionization_constant = none;
    // `new State(r)` with a constructor that returns an object yields that object unchanged.
    thermo.State = function RawResult(r: RawState): RawState {
      return r;
    };
    return { PT, viscosity, thermalConductivity };
  } finally {
    paths.forEach((p, i) => {
      const entry = saved[i];
      if (entry) require.cache[p] = entry;
      else delete require.cache[p];
    });
  }
}

const { PT, viscosity: packageViscosity, thermalConductivity: packageConductivity } = loadPrivatePackage();

/** p_s(647.095 K) by eq. 30, Pa: the highest pressure with saturated states (≈ 22.0637 MPa). */
const MAX_SATURATION_STATE_PRESSURE = saturationPressureLean(647.095);

/** Title of the IAPWS release this module implements. */
const IF97_RELEASE =
  'IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam';

/**
 * The citation of IAPWS-IF97, defined once: every result that uses water or steam properties
 * (evaporators, liquor models, the steam routes) cites it through this constant or
 * {@link if97CitationFor}.
 */
export const IF97_CITATION: Citation = {
  key: 'iapws-if97',
  reference: `${IF97_RELEASE}, International Association for the Properties of Water and Steam (2012)`,
};

/**
 * {@link IF97_CITATION} with what a liquor model takes from it, e.g.
 * `if97CitationFor('pure-water parts')` (same key, so results list IF97 once).
 */
export function if97CitationFor(use: string): Citation {
  return { key: IF97_CITATION.key, reference: `${IF97_RELEASE} (${use})` };
}

/** IF97 constants (R7-97(2012), sections 2–4 and 6). */
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
  /** Saturation pressure at 273.15 K, Pa: the lowest pressure of the saturation line (eq. 31). */
  minPressure: 611.213,
  /** Boundary temperature between regions 1 and 3, K. */
  region13Temperature: 623.15,
  /** Saturation pressure at 623.15 K, Pa (boundary of region 4 with region 3). */
  region13SaturationPressure: 16.529164253e6,
  /**
   * Highest temperature at which this adapter solves the saturated states, K. Between it and Tc
   * (the last mK) IF97 eq. 28 no longer meets eq. 30's p_s on both branches (the two equations
   * are not exactly consistent at the critical point), so no saturated densities exist there.
   */
  maxSaturationStateTemperature: 647.095,
  /** Upper temperature of the transport-property releases R12-08 and R15-11, K. */
  maxTransportTemperature: 1173.15,
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
  /**
   * Dynamic viscosity, Pa·s (IAPWS R12-08, μ2 = 1). Undefined inside the two-phase dome, above
   * 1173.15 K, and when the caller asked for a state without transport properties.
   */
  viscosity?: number;
  /**
   * W/(m·K) (IAPWS R15-11 without the critical enhancement). Undefined inside the dome, above
   * 1173.15 K, and when the caller asked for a state without transport properties.
   */
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

/** Saturated enthalpies only (the lean path for solvers). */
export interface SaturationEnthalpies {
  /** Pa */
  pressure: number;
  /** K */
  temperature: number;
  /** h_f, J/kg */
  liquid: number;
  /** h_g, J/kg */
  vapor: number;
}

export interface StateOptions {
  /** Evaluate viscosity and thermal conductivity (default true; ≈ 2 µs more per state). */
  transport?: boolean;
}

const MPA = 1e6;
const KJ = 1e3;

function checkRange(field: string, value: number, unit: string, min: number, max: number): void {
  if (!Number.isFinite(value) || value < min || value > max) {
    throw new EngineRangeError(field, value, { min, max, unit });
  }
}

/** Pressure of a single-phase state: 0 < p ≤ max (IF97 regions 2 and 5 reach down to p → 0). */
function checkPressure(pressure: number, max: number): void {
  if (!Number.isFinite(pressure) || pressure <= 0 || pressure > max) {
    throw new EngineRangeError(
      'pressure',
      pressure,
      { min: 0, max, unit: 'Pa' },
      `pressure = ${pressure} Pa is outside the valid range 0 (excluded) to ${max} Pa`,
    );
  }
}

/** Forward properties of one state in SI, from the lean core or converted from the package. */
interface Props extends LeanProperties {
  /** Pa */
  p: number;
  /** K */
  t: number;
}

/** Full forward properties of region 1 or 2 at (p, T) from the lean core. */
function leanProps(region: 1 | 2, pressure: number, temperature: number): Props {
  const out: Props = {
    p: pressure,
    t: temperature,
    v: NaN,
    u: NaN,
    s: NaN,
    h: NaN,
    cp: NaN,
    cv: NaN,
    w: NaN,
  };
  if (region === 1) region1Properties(pressure, temperature, out);
  else region2Properties(pressure, temperature, out);
  return out;
}

/** A package result (Pa, kJ-based energies) in SI. */
function fromPackage(raw: RawState): Props {
  return {
    p: raw.p, // the package already reports Pa
    t: raw.t,
    v: raw.v,
    u: raw.u * KJ,
    s: raw.s * KJ,
    h: raw.h * KJ,
    cp: raw.cp * KJ,
    cv: raw.cv * KJ,
    w: raw.w,
  };
}

function finiteOrUndefined(value: number, scale: number): number | undefined {
  const v = value * scale;
  return Number.isFinite(v) ? v : undefined;
}

/**
 * Builds the state from SI properties. The thermodynamic core (p, v, u, s, h) must be finite or
 * the state is refused; cp, cv and w become undefined if the equations produced a non-number.
 */
function toState(raw: Props, region: Region, phase: Phase, transport: boolean): WaterState {
  const core = [raw.p, raw.t, raw.v, raw.u, raw.s, raw.h];
  if (!core.every((x) => typeof x === 'number' && Number.isFinite(x)) || !(raw.v > 0)) {
    throw new EngineNoSolutionError(`IF97 region ${region} gave no finite state at T = ${raw.t} K`, {
      reason: 'non-finite-state',
    });
  }
  const state: WaterState = {
    region,
    phase,
    pressure: raw.p,
    temperature: raw.t,
    enthalpy: raw.h,
    entropy: raw.s,
    internalEnergy: raw.u,
    specificVolume: raw.v,
    density: 1 / raw.v,
  };
  const cp = finiteOrUndefined(raw.cp, 1);
  const cv = finiteOrUndefined(raw.cv, 1);
  const w = finiteOrUndefined(raw.w, 1);
  if (cp !== undefined) state.heatCapacity = cp;
  if (cv !== undefined) state.isochoricHeatCapacity = cv;
  if (w !== undefined) state.speedOfSound = w;
  if (transport && raw.t <= IF97.maxTransportTemperature) {
    const mu = finiteOrUndefined(packageViscosity(raw.t, state.density), 1e-6); // μPa·s → Pa·s
    const k = finiteOrUndefined(packageConductivity(raw.t, state.density), 1e-3); // mW/(m·K) → W/(m·K)
    if (mu !== undefined) state.viscosity = mu;
    if (k !== undefined) state.thermalConductivity = k;
  }
  return state;
}

/** Phase label: region 3 is liquid-like above ρc = 322 kg/m³, vapour-like below. */
function singlePhase(region: Region, pressure: number, temperature: number, density: number): Phase {
  if (temperature >= IF97.criticalTemperature && pressure >= IF97.criticalPressure) return 'supercritical';
  if (region === 1) return 'liquid';
  if (region === 3) return density > IF97.criticalDensity ? 'liquid' : 'vapor';
  return 'vapor';
}

/**
 * Saturation temperature T_s(p): IF97 eq. 31, the backward form of the saturation-pressure
 * equation (R7-97(2012) section 8.2).
 *
 * Validity: 611.213 Pa to 22.064 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}), lean core (steam/if97-region4.ts).
 *
 * @param pressure p, Pa
 * @returns T_s, K
 * @example saturationTemperature(1e5) // → 372.755919 K (R7-97(2012) Table 36)
 */
export function saturationTemperature(pressure: number): number {
  checkRange('pressure', pressure, 'Pa', IF97.minPressure, IF97.criticalPressure);
  return saturationTemperatureLean(pressure);
}

/**
 * Saturation pressure p_s(T): IF97 eq. 30 (R7-97(2012) section 8.1).
 *
 * Validity: 273.15 K to 647.096 K.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}), lean core (steam/if97-region4.ts).
 *
 * @param temperature T, K
 * @returns p_s, Pa
 * @example saturationPressure(500) // → 2638897.76 Pa (R7-97(2012) Table 35: 2.63889776 MPa)
 */
export function saturationPressure(temperature: number): number {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.criticalTemperature);
  return saturationPressureLean(temperature);
}

/**
 * Region of a single-phase (p, T) state by the IF97 boundaries: 1 (liquid), 2 (vapour), 3 (near
 * critical) or 5 (high temperature); the B23 boundary (eq. 5) separates regions 2 and 3.
 *
 * Validity: 273.15–1073.15 K at 0 < p ≤ 100 MPa, 1073.15–2273.15 K at 0 < p ≤ 50 MPa.
 * Source: IAPWS R7-97(2012) figure 1 and eq. 5 ({@link IF97_CITATION}).
 *
 * @param pressure p, Pa
 * @param temperature T, K
 * @returns the region number
 * @example regionAtPT(3e6, 300) // → 1 (R7-97(2012) Table 5 point)
 * @example regionAtPT(3500, 700) // → 2 (R7-97(2012) Table 15 point)
 */
export function regionAtPT(pressure: number, temperature: number): Exclude<Region, 4> {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.maxTemperatureRegion5);
  if (temperature > IF97.maxTemperature) {
    checkPressure(pressure, IF97.maxPressureRegion5);
    return 5;
  }
  checkPressure(pressure, IF97.maxPressure);
  if (temperature <= IF97.region13Temperature) {
    return pressure >= saturationPressureLean(temperature) ? 1 : 2;
  }
  return pressure > b23Pressure(temperature) ? 3 : 2;
}

/**
 * Region 3 density at (p, T): the package's backward v(p, T) (IAPWS SR5-05(2016), "Revised
 * Supplementary Release on Backward Equations for Specific Volume as a Function of Pressure and
 * Temperature v(p,T) for Region 3") as the start, then Newton on the forward equation
 * p(ρ, T) = p with (∂p/∂ρ)_T = w²·c_v/c_p, so that the state is consistent with IF97 eq. 28
 * rather than carrying the backward equation's error. `side` picks the subregion of the start:
 * -1 liquid side, +1 vapour side, 0 as the package's selection by T vs T_s(p).
 */
function region3Density(pressure: number, temperature: number, side: -1 | 0 | 1): number {
  const pMPa = pressure / MPA;
  const tStart = side === 0 ? temperature : temperature * (1 + side * 1e-9);
  let rho = 1 / PT.r3(pMPa, tStart).v;
  // Very near the critical point the backward equations may start on the other branch.
  if (side !== 0 && (rho - IF97.criticalDensity) * side >= 0) rho = IF97.criticalDensity * (1 - 0.05 * side);
  if (!(rho > 0) || !Number.isFinite(rho)) {
    throw new EngineNoSolutionError(`No region-3 starting density at ${pressure} Pa, ${temperature} K`, {
      reason: 'region-3-start',
    });
  }
  for (let i = 0; i < 60; i++) {
    const s = PT.r3(pMPa, temperature, rho);
    const f = s.p - pressure;
    if (Math.abs(f) <= 1e-11 * pressure) return rho;
    const dpdrho = (s.w * s.w * s.cv) / s.cp;
    let step: number;
    if (Number.isFinite(dpdrho) && dpdrho > 0) step = -f / dpdrho;
    // Inside the spinodal loop: move away from the critical density, towards the stable branch.
    else step = (rho >= IF97.criticalDensity ? 1 : -1) * 0.01 * rho;
    const limit = 0.05 * rho;
    if (step > limit) step = limit;
    if (step < -limit) step = -limit;
    // A saturated branch never crosses the critical density: stop half-way to it instead.
    if (side !== 0 && (rho + step - IF97.criticalDensity) * side > 0) {
      step = 0.5 * (IF97.criticalDensity - rho);
    }
    rho += step;
    if (Math.abs(step) <= 1e-13 * rho) return rho;
  }
  throw new EngineNoSolutionError(`Region-3 density did not converge at ${pressure} Pa, ${temperature} K`, {
    iterations: 60,
    reason: 'region-3-density',
  });
}

/**
 * SI properties of a single-phase (p, T) point, region chosen by the IF97 boundaries: the lean core
 * in regions 1 and 2, the package in regions 3 and 5.
 */
function rawAtPT(pressure: number, temperature: number): { raw: Props; region: Exclude<Region, 4> } {
  const region = regionAtPT(pressure, temperature);
  switch (region) {
    case 1:
    case 2:
      return { raw: leanProps(region, pressure, temperature), region };
    case 3:
    case 5:
      return { raw: packageAtPT(region, pressure, temperature), region };
  }
}

/** Region 3 (density iterated) or region 5 properties from the package, SI. */
function packageAtPT(region: 3 | 5, pressure: number, temperature: number): Props {
  const pMPa = pressure / MPA;
  if (region === 5) return fromPackage(PT.r5(pMPa, temperature));
  const raw = fromPackage(PT.r3(pMPa, temperature, region3Density(pressure, temperature, 0)));
  raw.p = pressure; // the forward pressure agrees to 1e-11 relative; report the input itself
  return raw;
}

/**
 * Single-phase state at (p, T): IF97 basic equations of regions 1, 2, 3 (density iterated, see
 * {@link region3Density}) and 5. On the saturation line region 1 (liquid) is returned. The
 * returned pressure is the input pressure (in region 3, p(ρ, T) matches it to 1e-11).
 *
 * Validity: 273.15–1073.15 K at 0 < p ≤ 100 MPa, 1073.15–2273.15 K at 0 < p ≤ 50 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): the lean core in regions 1 and 2,
 * `@neutrium/thermo.eos.iapws97` in regions 3 and 5 and for the transport properties.
 *
 * @param pressure p, Pa
 * @param temperature T, K
 * @param options transport properties on or off (default on)
 * @returns the state, SI
 * @example stateAtPT(3e6, 300).enthalpy // → 115331.273 J/kg (R7-97(2012) Table 5: 0.115331273e3 kJ/kg)
 */
export function stateAtPT(pressure: number, temperature: number, options: StateOptions = {}): WaterState {
  const { raw, region } = rawAtPT(pressure, temperature);
  const state = toState(raw, region, 'liquid', options.transport ?? true);
  state.phase = singlePhase(region, pressure, temperature, state.density);
  return state;
}

/**
 * Region 3 state at (ρ, T): IF97 eq. 28 (the Helmholtz free energy of region 3), the form in which
 * R7-97(2012) Table 33 is printed.
 *
 * Validity: where the state lies in region 3: 623.15 K ≤ T ≤ 863.15 K and p(ρ, T) at or above the
 * B23 boundary pressure, p ≤ 100 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}), through `@neutrium/thermo.eos.iapws97`.
 *
 * @param density ρ, kg/m³
 * @param temperature T, K
 * @returns the state, SI
 * @example region3StateAtDensity(500, 650).pressure // → 25583701.8 Pa (R7-97(2012) Table 33: 0.255837018e2 MPa)
 */
export function region3StateAtDensity(
  density: number,
  temperature: number,
  options: StateOptions = {},
): WaterState {
  checkRange('temperature', temperature, 'K', IF97.region13Temperature, 863.15);
  checkRange('density', density, 'kg/m³', 1, 1000);
  const raw = fromPackage(PT.r3(1, temperature, density)); // the pressure argument is unused when ρ is given
  const state = toState(raw, 3, 'liquid', options.transport ?? true);
  const pB23 = b23Pressure(temperature);
  if (state.pressure < pB23 || state.pressure > IF97.maxPressure) {
    throw new EngineRangeError(
      'density',
      density,
      { min: 1, max: 1000, unit: 'kg/m³' },
      `density = ${density} kg/m³ at ${temperature} K gives p = ${state.pressure} Pa, outside region 3 (${pB23.toFixed(0)} to ${IF97.maxPressure} Pa)`,
    );
  }
  state.phase = singlePhase(3, state.pressure, temperature, state.density);
  return state;
}

/**
 * Saturated liquid and vapour properties at (p_s, T_s), SI. Up to 623.15 K: regions 1 and 2 at
 * (p_s, T_s), as R7-97(2012) section 8 prescribes (lean core). Above, both lie in region 3: the
 * densities ρ' > ρc > ρ'' solve p(ρ, T_s) = p_s from eq. 28 on each branch (the method R7-97(2012)
 * section 8 names for region 3), up to 647.095 K (see IF97.maxSaturationStateTemperature).
 */
function rawSaturated(pressure: number, temperature: number): { liquid: Props; vapor: Props } {
  const pMPa = pressure / MPA;
  if (temperature <= IF97.region13Temperature) {
    return { liquid: leanProps(1, pressure, temperature), vapor: leanProps(2, pressure, temperature) };
  }
  const rhoL = region3Density(pressure, temperature, -1);
  const rhoV = region3Density(pressure, temperature, 1);
  if (!(rhoL > rhoV)) {
    throw new EngineNoSolutionError(`Region-3 saturated densities did not separate at ${temperature} K`, {
      reason: 'region-3-saturation',
    });
  }
  return {
    liquid: fromPackage(PT.r3(pMPa, temperature, rhoL)),
    vapor: fromPackage(PT.r3(pMPa, temperature, rhoV)),
  };
}

function saturatedStates(pressure: number, temperature: number, transport: boolean): SaturationProperties {
  const { liquid: rl, vapor: rv } = rawSaturated(pressure, temperature);
  const liquid = toState(rl, 4, 'liquid', transport);
  const vapor = toState(rv, 4, 'vapor', transport);
  // Report the saturation pressure itself (the region-3 forward pressure agrees to 1e-11).
  liquid.pressure = pressure;
  vapor.pressure = pressure;
  liquid.quality = 0;
  vapor.quality = 1;
  return { pressure, temperature, latentHeat: vapor.enthalpy - liquid.enthalpy, liquid, vapor };
}

/**
 * Saturated liquid and vapour at pressure p (regions 1 and 2 up to 623.15 K, region 3 above).
 *
 * Validity: 611.213 Pa to p_s(647.095 K) ≈ 22.0637 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core up to 623.15 K, `@neutrium/thermo.eos.iapws97`
 * for region 3 and the transport properties.
 *
 * @param pressure p, Pa
 * @param options transport properties on or off (default on)
 * @returns T_s, the latent heat h_g − h_f and both saturated states, SI
 * @example saturationAtPressure(1e6).temperature // → 453.035632 K (R7-97(2012) Table 36)
 * @example saturationAtPressure(2e7).latentHeat // ≈ 584286.6 J/kg (python3-iapws, tests/fixtures/steam/if97-points.json: 584286.59 J/kg)
 */
export function saturationAtPressure(pressure: number, options: StateOptions = {}): SaturationProperties {
  checkRange('pressure', pressure, 'Pa', IF97.minPressure, MAX_SATURATION_STATE_PRESSURE);
  return saturatedStates(pressure, saturationTemperatureLean(pressure), options.transport ?? true);
}

/**
 * Saturated liquid and vapour at temperature T.
 *
 * Validity: 273.15 K to 647.095 K.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core up to 623.15 K, `@neutrium/thermo.eos.iapws97`
 * for region 3 and the transport properties.
 *
 * @param temperature T, K
 * @param options transport properties on or off (default on)
 * @returns p_s, the latent heat h_g − h_f and both saturated states, SI
 * @example saturationAtTemperature(300).pressure // → 3536.58941 Pa (R7-97(2012) Table 35: 0.353658941e-2 MPa)
 */
export function saturationAtTemperature(
  temperature: number,
  options: StateOptions = {},
): SaturationProperties {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.maxSaturationStateTemperature);
  return saturatedStates(saturationPressureLean(temperature), temperature, options.transport ?? true);
}

/**
 * Saturated liquid at temperature T, without transport properties and without the vapour state:
 * the lean path for liquor models that take their water part from saturated liquid at the solution
 * temperature (h, c_p, ρ), called inside solver iterations.
 *
 * Validity: 273.15 K to 647.095 K.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core up to 623.15 K, `@neutrium/thermo.eos.iapws97`
 * for region 3.
 *
 * @param temperature T, K
 * @returns the saturated-liquid state, SI
 * @example saturatedLiquidAtTemperature(373.15).enthalpy // ≈ 419099.15 J/kg (python3-iapws, tests/fixtures/steam/if97-points.json: 419099.15 J/kg)
 */
export function saturatedLiquidAtTemperature(temperature: number): WaterState {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.maxSaturationStateTemperature);
  const pressure = saturationPressureLean(temperature);
  const raw =
    temperature <= IF97.region13Temperature
      ? leanProps(1, pressure, temperature)
      : rawSaturated(pressure, temperature).liquid;
  const liquid = toState(raw, 4, 'liquid', false);
  liquid.pressure = pressure;
  liquid.quality = 0;
  return liquid;
}

/**
 * Saturated enthalpies h_f and h_g at pressure p, with T_s: the lean path for solvers (no transport
 * properties, no state objects).
 *
 * Validity: 611.213 Pa to 22.0637 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core up to 623.15 K, `@neutrium/thermo.eos.iapws97`
 * for region 3.
 *
 * @param pressure p, Pa
 * @returns p, T_s, h_f and h_g, SI
 * @example saturationEnthalpies(1e7).temperature // → 584.149488 K (R7-97(2012) Table 36)
 */
export function saturationEnthalpies(pressure: number): SaturationEnthalpies {
  checkRange('pressure', pressure, 'Pa', IF97.minPressure, MAX_SATURATION_STATE_PRESSURE);
  const temperature = saturationTemperatureLean(pressure);
  if (temperature <= IF97.region13Temperature) {
    return {
      pressure,
      temperature,
      liquid: region1Enthalpy(pressure, temperature),
      vapor: region2Enthalpy(pressure, temperature),
    };
  }
  const { liquid, vapor } = rawSaturated(pressure, temperature);
  return { pressure, temperature, liquid: liquid.h, vapor: vapor.h };
}

/**
 * Enthalpy h_f of saturated liquid at pressure p (lean path).
 *
 * Validity: 611.213 Pa to 22.0637 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core up to 623.15 K, `@neutrium/thermo.eos.iapws97`
 * for region 3.
 *
 * @param pressure p, Pa
 * @returns h_f, J/kg
 * @example saturatedLiquidEnthalpy(1000) // ≈ 29298.25 J/kg (python3-iapws, tests/fixtures/steam/if97-points.json: 29298.25 J/kg)
 */
export function saturatedLiquidEnthalpy(pressure: number): number {
  checkRange('pressure', pressure, 'Pa', IF97.minPressure, MAX_SATURATION_STATE_PRESSURE);
  const t = saturationTemperatureLean(pressure);
  if (t <= IF97.region13Temperature) return region1Enthalpy(pressure, t);
  return rawSaturated(pressure, t).liquid.h;
}

/**
 * Enthalpy h_g of saturated vapour at pressure p (lean path).
 *
 * Validity: 611.213 Pa to 22.0637 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core up to 623.15 K, `@neutrium/thermo.eos.iapws97`
 * for region 3.
 *
 * @param pressure p, Pa
 * @returns h_g, J/kg
 * @example saturatedVaporEnthalpy(1000) // ≈ 2513682.04 J/kg (python3-iapws, tests/fixtures/steam/if97-points.json: 2513682.04 J/kg)
 */
export function saturatedVaporEnthalpy(pressure: number): number {
  checkRange('pressure', pressure, 'Pa', IF97.minPressure, MAX_SATURATION_STATE_PRESSURE);
  const t = saturationTemperatureLean(pressure);
  if (t <= IF97.region13Temperature) return region2Enthalpy(pressure, t);
  return rawSaturated(pressure, t).vapor.h;
}

/**
 * Enthalpy at (p, T), single phase (lean path for solvers).
 *
 * Validity: as {@link stateAtPT}.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core in regions 1 and 2,
 * `@neutrium/thermo.eos.iapws97` in regions 3 and 5.
 *
 * @param pressure p, Pa
 * @param temperature T, K
 * @returns h, J/kg
 * @example enthalpyAtPT(3500, 300) // → 2549911.45 J/kg (R7-97(2012) Table 15: 0.254991145e4 kJ/kg)
 */
export function enthalpyAtPT(pressure: number, temperature: number): number {
  const region = regionAtPT(pressure, temperature);
  const h =
    region === 1
      ? region1Enthalpy(pressure, temperature)
      : region === 2
        ? region2Enthalpy(pressure, temperature)
        : packageAtPT(region, pressure, temperature).h;
  if (!Number.isFinite(h)) {
    throw new EngineNoSolutionError(`IF97 gave no finite enthalpy at ${pressure} Pa, ${temperature} K`, {
      reason: 'non-finite-state',
    });
  }
  return h;
}

/**
 * Raw backward temperature of region 1, T(p, h), IF97 eq. 11 (R7-97(2012) section 5.2.1), without
 * refinement. Exposed to verify the backward equation against R7-97(2012) Table 7; solvers use
 * {@link stateAtPH}.
 *
 * Validity: region 1 (liquid, 273.15–623.15 K, p ≤ 100 MPa).
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}), lean core (steam/if97-backward.ts).
 *
 * @param pressure p, Pa
 * @param enthalpy h, J/kg
 * @returns T, K
 * @example backwardTemperatureRegion1(3e6, 500e3) // → 391.798509 K (R7-97(2012) Table 7)
 */
export function backwardTemperatureRegion1(pressure: number, enthalpy: number): number {
  checkPressure(pressure, IF97.maxPressure);
  checkRange('enthalpy', enthalpy, 'J/kg', -1e3, 1.7e6);
  return region1TemperaturePH(pressure, enthalpy);
}

/**
 * Raw backward temperature of region 2, T(p, h), IF97 eqs. 22–24 with the 2b/2c boundary eq. 20
 * (R7-97(2012) section 6.3.1), without refinement. Exposed to verify the backward equations against
 * R7-97(2012) Table 24.
 *
 * Validity: region 2 (vapour, up to 1073.15 K, p ≤ 100 MPa).
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}), lean core (steam/if97-backward.ts).
 *
 * @param pressure p, Pa
 * @param enthalpy h, J/kg
 * @returns T, K
 * @example backwardTemperatureRegion2(1e3, 3000e3) // → 534.433241 K (R7-97(2012) Table 24)
 */
export function backwardTemperatureRegion2(pressure: number, enthalpy: number): number {
  checkPressure(pressure, IF97.maxPressure);
  checkRange('enthalpy', enthalpy, 'J/kg', 2.0e6, 4.5e6);
  return region2TemperaturePH(pressure, enthalpy);
}

/** Highest temperature of the formulation at pressure p, K. */
function maxTemperatureAt(pressure: number): number {
  return pressure <= IF97.maxPressureRegion5 ? IF97.maxTemperatureRegion5 : IF97.maxTemperature;
}

/**
 * State at (p, h). Inside the two-phase dome (p ≤ 22.064 MPa, h_f ≤ h ≤ h_g) the state is the
 * lever-rule mixture of the saturated states, with quality x = (h − h_f)/(h_g − h_f) (R7-97(2012)
 * section 8; region 3 saturated states included). Elsewhere the backward equation of region 1 or
 * 2 (lean core) gives a first T, refined by Newton steps on the forward equation so that the
 * returned state reproduces h to 1e-9 relative.
 *
 * Validity: T from 273.15 K to 1073.15 K (to 2273.15 K at p ≤ 50 MPa), 0 < p ≤ 100 MPa.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}): lean core in regions 1, 2 and 4 (up to
 * 623.15 K), `@neutrium/thermo.eos.iapws97` in regions 3 and 5 and for the transport properties.
 *
 * @param pressure p, Pa
 * @param enthalpy h, J/kg
 * @param options transport properties on or off (default on)
 * @returns the state, SI
 * @example stateAtPH(3e6, 500e3).temperature // ≈ 391.792 K (R7-97(2012) Table 7's backward value 391.798509 K lies within its permitted 25 mK)
 */
export function stateAtPH(pressure: number, enthalpy: number, options: StateOptions = {}): WaterState {
  checkPressure(pressure, IF97.maxPressure);
  const tMax = maxTemperatureAt(pressure);
  const hMin = enthalpyAtPT(pressure, IF97.minTemperature);
  const hMax = enthalpyAtPT(pressure, tMax);
  if (!Number.isFinite(enthalpy) || enthalpy < hMin || enthalpy > hMax) {
    throw new EngineRangeError(
      'enthalpy',
      enthalpy,
      { min: hMin, max: hMax, unit: 'J/kg' },
      `enthalpy = ${enthalpy} J/kg is outside ${hMin.toFixed(1)} to ${hMax.toFixed(1)} J/kg at ${pressure} Pa (273.15 K to ${tMax} K)`,
    );
  }
  const transport = options.transport ?? true;
  let lo: number = IF97.minTemperature;
  let hi: number = tMax;
  let liquidSide = pressure > IF97.criticalPressure ? enthalpy < 2.0e6 : false;
  if (pressure > MAX_SATURATION_STATE_PRESSURE && pressure < IF97.criticalPressure) {
    throw new EngineRangeError(
      'pressure',
      pressure,
      { min: MAX_SATURATION_STATE_PRESSURE, max: IF97.criticalPressure, unit: 'Pa' },
      `pressure = ${pressure} Pa lies within the last 0.4 kPa below the critical pressure, where IF97 gives no saturated states to place (p, h) against; use p ≤ ${MAX_SATURATION_STATE_PRESSURE.toFixed(0)} Pa or p ≥ ${IF97.criticalPressure} Pa`,
    );
  }
  if (pressure >= IF97.minPressure && pressure < IF97.criticalPressure) {
    const tSat = saturationTemperatureLean(pressure);
    const { liquid: rl, vapor: rv } = rawSaturated(pressure, tSat);
    const hf = rl.h;
    const hg = rv.h;
    if (enthalpy >= hf && enthalpy <= hg) {
      return twoPhase(pressure, tSat, rl, rv, (enthalpy - hf) / (hg - hf), enthalpy);
    }
    liquidSide = enthalpy < hf;
    if (liquidSide) hi = tSat;
    else lo = tSat;
  }
  return refineTemperature(
    pressure,
    enthalpy,
    initialTemperature(pressure, enthalpy, liquidSide, lo, hi),
    lo,
    hi,
    transport,
  );
}

function twoPhase(
  pressure: number,
  temperature: number,
  rl: Props,
  rv: Props,
  x: number,
  h: number,
): WaterState {
  const v = rl.v + x * (rv.v - rl.v);
  return {
    region: 4,
    phase: 'two-phase',
    pressure,
    temperature,
    enthalpy: h,
    entropy: rl.s + x * (rv.s - rl.s),
    internalEnergy: rl.u + x * (rv.u - rl.u),
    specificVolume: v,
    density: 1 / v,
    quality: x,
  };
}

function initialTemperature(
  pressure: number,
  enthalpy: number,
  liquidSide: boolean,
  lo: number,
  hi: number,
): number {
  const t = liquidSide ? region1TemperaturePH(pressure, enthalpy) : region2TemperaturePH(pressure, enthalpy);
  if (Number.isFinite(t) && t > lo && t < hi) return t;
  return 0.5 * (lo + hi);
}

/** Newton on h(p, T) = h_target with a bisection guard over [lo, hi] K. */
function refineTemperature(
  pressure: number,
  enthalpy: number,
  t0: number,
  lo0: number,
  hi0: number,
  transport: boolean,
): WaterState {
  let lo = lo0;
  let hi = hi0;
  let t = t0;
  const tol = 1e-9 * Math.max(1e3, Math.abs(enthalpy));
  let previous = Infinity;
  for (let i = 0; i < 100; i++) {
    const { raw, region } = rawAtPT(pressure, t);
    const f = raw.h - enthalpy;
    // Converged, or the bracket has shrunk to round-off (h is then as close as doubles allow).
    if (Math.abs(f) <= tol || hi - lo <= 1e-12 * t) {
      const state = toState(raw, region, 'liquid', transport);
      state.phase = singlePhase(region, pressure, t, state.density);
      return state;
    }
    if (f > 0) hi = t;
    else lo = t;
    const cp = raw.cp;
    // Newton while it at least halves the residual; otherwise bisect (near the critical point
    // h(T) is S-shaped and plain Newton can cycle inside the bracket).
    let next = cp > 0 && Number.isFinite(cp) && Math.abs(f) < 0.5 * previous ? t - f / cp : NaN;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    previous = Math.abs(f);
    t = next;
  }
  throw new EngineNoSolutionError(`T(p, h) did not converge at ${pressure} Pa, ${enthalpy} J/kg`, {
    iterations: 100,
    reason: 'ph-refinement',
  });
}

/**
 * Specific enthalpy at (p, s): the end state of an isentropic compression or expansion (vapour
 * recompression, for instance). IAPWS R7-97(2012) has no h(p, s) equation for regions 1 and 2, so
 * T comes from its backward equation T(p, s) (eq. 13 in region 1, eqs. 25–27 in region 2), refined
 * by Newton steps on the forward equation until s(p, T) reproduces s, and h is the forward
 * equation's at that T. Inside the dome (s_f ≤ s ≤ s_g at T_s(p)) h is the lever-rule mixture,
 * x = (s − s_f)/(s_g − s_f) (R7-97(2012) section 8).
 *
 * Validity: 611.213 Pa ≤ p ≤ 16.529 MPa (where the saturated states lie in regions 1 and 2),
 * s from s(p, 273.15 K) to s(p, 1073.15 K).
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}), lean core (steam/if97-backward.ts).
 *
 * @param pressure p, Pa
 * @param entropy s, J/(kg·K)
 * @returns h, J/kg
 * @example enthalpyAtPS(1e5, 7500) // ≈ 2729438.06 J/kg (python3-iapws IAPWS97(P=0.1, s=7.5): 2729.43806 kJ/kg)
 */
export function enthalpyAtPS(pressure: number, entropy: number): number {
  checkRange('pressure', pressure, 'Pa', IF97.minPressure, IF97.region13SaturationPressure);
  const sMin = leanProps(1, pressure, IF97.minTemperature).s;
  const sMax = leanProps(2, pressure, IF97.maxTemperature).s;
  if (!Number.isFinite(entropy) || entropy < sMin || entropy > sMax) {
    throw new EngineRangeError(
      'entropy',
      entropy,
      { min: sMin, max: sMax, unit: 'J/(kg·K)' },
      `entropy = ${entropy} J/(kg·K) is outside ${sMin.toFixed(3)} to ${sMax.toFixed(3)} J/(kg·K) at ${pressure} Pa (273.15 K to ${IF97.maxTemperature} K)`,
    );
  }
  const tSat = saturationTemperatureLean(pressure);
  const liquid = leanProps(1, pressure, tSat);
  const vapor = leanProps(2, pressure, tSat);
  let h: number;
  if (entropy < liquid.s) h = region1EnthalpyAtPS(pressure, entropy);
  else if (entropy > vapor.s) h = region2EnthalpyAtPS(pressure, entropy);
  else h = liquid.h + ((entropy - liquid.s) / (vapor.s - liquid.s)) * (vapor.h - liquid.h);
  if (!Number.isFinite(h)) {
    throw new EngineNoSolutionError(`h(p, s) did not converge at ${pressure} Pa, ${entropy} J/(kg·K)`, {
      reason: 'ps-refinement',
    });
  }
  return h;
}

/**
 * Dynamic viscosity μ(T, ρ): IAPWS R12-08 eq. 10 with μ2 = 1 (the form R12-08 section 3.2
 * recommends for industrial use), as the package evaluates it.
 *
 *   μ = μ0(T̄)·μ1(T̄, ρ̄)·1 µPa·s,  T̄ = T/647.096 K,  ρ̄ = ρ/322 kg/m³
 *
 * Validity: T 273.15–1173.15 K, ρ 0–1250 kg/m³.
 * Source: IAPWS R12-08, "Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water
 * Substance" (Berlin, 2008); M. L. Huber et al., J. Phys. Chem. Ref. Data 38 (2009) 101–125.
 *
 * @param temperature T, K
 * @param density ρ, kg/m³
 * @returns μ, Pa·s
 * @example viscosityAtDensity(298.15, 998) // → 8.897351e-4 Pa·s (R12-08 Table 4: 889.735100 µPa·s)
 */
export function viscosityAtDensity(temperature: number, density: number): number {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.maxTransportTemperature);
  checkRange('density', density, 'kg/m³', 0, 1250);
  return packageViscosity(temperature, density) * 1e-6;
}

/**
 * Thermal conductivity λ(T, ρ): IAPWS R15-11 eq. 10 WITHOUT the critical enhancement, as the package
 * evaluates it. Near the critical point λ2 is not negligible, so values there are low.
 *
 *   λ = λ0(T̄)·λ1(T̄, ρ̄)·1 mW/(m·K),  λ2 = 0
 *
 * Validity: T 273.15–1173.15 K, ρ 0–1250 kg/m³ (low near the critical point, see above).
 * Source: IAPWS R15-11, "Release on the IAPWS Formulation 2011 for the Thermal Conductivity of
 * Ordinary Water Substance" (Plzeň, 2011); M. L. Huber et al., J. Phys. Chem. Ref. Data 41 (2012)
 * 033102.
 *
 * @param temperature T, K
 * @param density ρ, kg/m³
 * @returns λ, W/(m·K)
 * @example thermalConductivityAtDensity(298.15, 998) // → 0.607712868 W/(m·K) (R15-11 Table 4: 607.712868 mW/(m·K))
 */
export function thermalConductivityAtDensity(temperature: number, density: number): number {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.maxTransportTemperature);
  checkRange('density', density, 'kg/m³', 0, 1250);
  return packageConductivity(temperature, density) * 1e-3;
}

/** Density of liquid water at T: saturated liquid, or compressed liquid at p ≥ p_sat(T). */
function liquidDensity(temperature: number, pressure?: number): number {
  if (pressure === undefined) return saturatedLiquidAtTemperature(temperature).density;
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.maxSaturationStateTemperature);
  const pSat = saturationPressureLean(temperature);
  checkRange('pressure', pressure, 'Pa', pSat, IF97.maxPressure);
  return stateAtPT(pressure, temperature, { transport: false }).density;
}

/**
 * Dynamic viscosity of liquid water at T (and p), the pure-water part of the liquor models'
 * viscosities: IAPWS R12-08 ({@link viscosityAtDensity}) at the IF97 density of saturated liquid at
 * T, or of compressed liquid at p when p is given (p ≥ p_sat(T)). The pressure effect is small in
 * evaporators (about 0.01 % per bar near 100 °C), so liquor models call it without p.
 *
 *   μ = μ_R12-08(T, ρ_IF97(T[, p]))
 *
 * Validity: liquid, 273.15–647.095 K; p_sat(T) ≤ p ≤ 100 MPa.
 * Source: IAPWS R12-08 (viscosity) with IAPWS R7-97(2012) ({@link IF97_CITATION}) densities.
 *
 * @param temperature T, K
 * @param pressure p, Pa (optional; saturated liquid when left out)
 * @returns μ, Pa·s
 * @example liquidViscosity(373.15) // ≈ 2.81585e-4 Pa·s (python3-iapws _Viscosity at IF97 ρ_f, tests/fixtures/steam/water-transport.json)
 */
export function liquidViscosity(temperature: number, pressure?: number): number {
  return viscosityAtDensity(temperature, liquidDensity(temperature, pressure));
}

/**
 * Thermal conductivity of liquid water at T (and p), the pure-water part of the liquor models'
 * conductivities: IAPWS R15-11 without the critical enhancement ({@link thermalConductivityAtDensity})
 * at the IF97 density of saturated liquid at T, or of compressed liquid at p (p ≥ p_sat(T)). The
 * missing enhancement matters only near the critical point, far above evaporator temperatures.
 *
 *   λ = λ_R15-11(T, ρ_IF97(T[, p])),  λ2 = 0
 *
 * Validity: liquid, 273.15–647.095 K (low near the critical point); p_sat(T) ≤ p ≤ 100 MPa.
 * Source: IAPWS R15-11 (thermal conductivity) with IAPWS R7-97(2012) ({@link IF97_CITATION}) densities.
 *
 * @param temperature T, K
 * @param pressure p, Pa (optional; saturated liquid when left out)
 * @returns λ, W/(m·K)
 * @example liquidThermalConductivity(373.15) // ≈ 0.677217 W/(m·K) (python3-iapws _ThCond at IF97 ρ_f, tests/fixtures/steam/water-transport.json)
 */
export function liquidThermalConductivity(temperature: number, pressure?: number): number {
  return thermalConductivityAtDensity(temperature, liquidDensity(temperature, pressure));
}

/** Lowest temperature of the IAPWS surface-tension release (supercooled liquid), K. */
const SURFACE_TENSION_MIN_TEMPERATURE = 248.15;

/**
 * Surface tension of water against its vapour (IAPWS 1994 release, reaffirmed 2014).
 *
 *   σ = B·τ^μ·(1 + b·τ),  τ = 1 − T/Tc,  B = 235.8e−3 N/m, b = −0.625, μ = 1.256, Tc = 647.096 K
 *
 * Validity: 248.15 K (supercooled) to Tc = 647.096 K; ±0.5 % near 0–100 °C (release's uncertainty,
 * from memory).
 * Source: IAPWS R1-76(2014), "Revised Release on Surface Tension of Ordinary Water Substance"
 * (first issued 1976, revised 1994 and 2014).
 *
 * @param temperature T, K
 * @returns σ, N/m
 * @example waterSurfaceTension(300) // ≈ 0.0716859625 N/m (IAPWS R1-76 table and python3-iapws _Tension(300): 0.0716859625)
 * @example waterSurfaceTension(373.15) // ≈ 0.05891 N/m
 */
export function waterSurfaceTension(temperature: number): number {
  checkRange('temperature', temperature, 'K', SURFACE_TENSION_MIN_TEMPERATURE, IF97.criticalTemperature);
  const tau = 1 - temperature / IF97.criticalTemperature;
  return 235.8e-3 * tau ** 1.256 * (1 - 0.625 * tau);
}

// ---------------------------------------------------------------------------------------------
// Transport: saturated-liquid properties for film coefficients (heat-transfer estimate)
// ---------------------------------------------------------------------------------------------

/** Saturated liquid water at T with what a film coefficient needs, SI. */
export interface SaturatedLiquidTransport {
  /** K */
  temperature: number;
  /** Saturation pressure, Pa. */
  pressure: number;
  /** kg/m³ */
  density: number;
  /** Isobaric heat capacity, J/(kg·K). */
  heatCapacity: number;
  /** Dynamic viscosity, Pa·s (IAPWS R12-08, μ2 = 1). */
  viscosity: number;
  /** W/(m·K) (IAPWS R15-11 without the critical enhancement). */
  thermalConductivity: number;
}

/**
 * Saturated liquid water at temperature T with its density, heat capacity, viscosity and thermal
 * conductivity: the properties of a condensate film or a water film, evaluated in one call on the
 * lean path (IF97 region 1 up to 623.15 K, no state object) and the package's transport functions.
 *
 * Validity: 273.15 K to 623.15 K (region 1 of IF97; heat-transfer films of evaporators lie far
 * below), transport releases to 1173.15 K.
 * Source: IAPWS R7-97(2012) ({@link IF97_CITATION}) for ρ and c_p; IAPWS R12-08 (viscosity, μ2 = 1)
 * and IAPWS R15-11 (thermal conductivity, without λ2) as in {@link viscosityAtDensity} and
 * {@link thermalConductivityAtDensity}.
 *
 * @param temperature T, K
 * @returns p_s, ρ, c_p, μ and λ of the saturated liquid, SI
 * @example saturatedLiquidTransport(373.15).viscosity // ≈ 2.81585e-4 Pa·s (python3-iapws IAPWS97(T=373.15, x=0).mu: 2.81585e-4 Pa·s)
 */
export function saturatedLiquidTransport(temperature: number): SaturatedLiquidTransport {
  checkRange('temperature', temperature, 'K', IF97.minTemperature, IF97.region13Temperature);
  const pressure = saturationPressureLean(temperature);
  const raw = leanProps(1, pressure, temperature);
  const density = 1 / raw.v;
  return {
    temperature,
    pressure,
    density,
    heatCapacity: raw.cp,
    viscosity: viscosityAtDensity(temperature, density),
    thermalConductivity: thermalConductivityAtDensity(temperature, density),
  };
}
