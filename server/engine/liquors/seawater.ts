/**
 * Built-in liquor "seawater": natural seawater and the brines concentrated from it in thermal
 * desalination. Composition variable x = mass fraction of dissolved salt, i.e. absolute salinity
 * S_A in kg/kg (S in g/kg = 1000·x), as in IAPWS-08.
 *
 * Correlations: Sharqawy, Lienhard and Zubair, "Thermophysical properties of seawater: a review of
 * existing correlations and data", Desalination and Water Treatment 16 (2010) 354–380
 * (doi:10.5004/dwt.2010.1079). Their equations are written here as small pure functions (SI in,
 * SI out, no range checks) and wrapped into the {@link LiquorModel} `seawater`, which applies the
 * validity rule. Coefficients are those of the paper; the density and enthalpy coefficients are
 * carried at the precision of the authors' own implementation (MIT seawater property library,
 * web.mit.edu/seawater), which the paper prints rounded to four digits.
 *
 * Pure-water parts come from IAPWS-IF97 (saturated liquid at T, through ../steam/if97.js) so that
 * x = 0 reproduces the steam tables exactly; the review supplies only the salt increments.
 * Checked against IAPWS-08 (python3-iapws) in tests/engine/liquors/seawater.test.ts.
 */
import { EngineNoSolutionError, EngineRangeError } from '../errors.js';
import {
  if97CitationFor,
  liquidThermalConductivity,
  liquidViscosity,
  saturatedLiquidAtTemperature,
  saturationPressure,
  saturationTemperature,
  waterSurfaceTension,
} from '../steam/if97.js';
import {
  addWarning,
  KELVIN_OFFSET,
  templated,
  type Citation,
  type EngineCaution,
  type WarningSink,
} from '../types.js';
import { defineLiquorModel, type Interval, type LiquorModel, type ValidityBox } from './model.js';
import { checkAgainst, checkPropertyBox } from './validity.js';

const MODEL_ID = 'seawater';

/**
 * Boiling-point rise of seawater (Sharqawy et al. 2010, their BPR correlation, fitted to the
 * boiling-point data of Bromley et al., J. Chem. Eng. Data 1974; that data source from memory).
 *
 *   BPR = A·S² + B·S   [K],  S in g/kg, t in °C
 *   A = (−4.584e−4·t² + 2.823e−1·t + 17.95)·1e−6
 *   B = ( 1.536e−4·t² + 5.267e−2·t + 6.56 )·1e−3
 *
 * t is the temperature of the boiling seawater itself (the paper's convention), not the
 * saturation temperature of pure water; {@link seawaterBoilingTemperature} solves that fixed point.
 *
 * Validity: 0–200 °C and 0–120 g/kg; stated accuracy ±0.018 K.
 * Source: M.H. Sharqawy, J.H. Lienhard V, S.M. Zubair, "Thermophysical properties of seawater: a
 * review of existing correlations and data", Desalination and Water Treatment 16 (2010) 354–380.
 *
 * @param massFraction absolute salinity, kg/kg (0–0.12)
 * @param temperature seawater temperature, K (273.15–473.15)
 * @returns boiling-point rise, K
 * @example sharqawyBoilingPointRise(0.035, 373.15) // ≈ 0.52 K
 * @example sharqawyBoilingPointRise(0.035, 333.6168) // ≈ 0.402 K (IAPWS-08 through python3-iapws, tests/fixtures/seawater/iapws08-points.json: 0.408 K at 20 kPa, where it boils at 333.6168 K)
 */
export function sharqawyBoilingPointRise(massFraction: number, temperature: number): number {
  const s = 1000 * massFraction;
  const t = temperature - KELVIN_OFFSET;
  const a = (-4.584e-4 * t * t + 2.823e-1 * t + 17.95) * 1e-6;
  const b = (1.536e-4 * t * t + 5.267e-2 * t + 6.56) * 1e-3;
  return a * s * s + b * s;
}

/** Sharqawy et al. 2010 eq. 43 coefficients a1…a10 (J/kg; S in kg/kg, t in °C). */
const ENTHALPY_A = [
  -2.34825e4, 3.15183e5, 2.80269e6, -1.44606e7, 7.82607e3, -4.41733e1, 2.1394e-1, -1.99108e4, 2.77846e4,
  9.72801e1,
] as const;

/**
 * Specific enthalpy of seawater minus that of pure water at the same temperature
 * (Sharqawy et al. 2010, eq. 43, a fit to values computed from IAPWS-08 at 0.1 MPa).
 *
 *   h_sw − h_w = −S·(a1 + a2·S + a3·S² + a4·S³ + a5·t + a6·t² + a7·t³ + a8·S·t + a9·S²·t + a10·S·t²)
 *
 * S in kg/kg, t in °C, result in J/kg, with a1…a10 = −2.34825e4, 3.15183e5, 2.80269e6, −1.44606e7,
 * 7.82607e3, −4.41733e1, 2.13940e−1, −1.99108e4, 2.77846e4, 9.72801e1. The paper pairs it with its
 * own pure-water fit h_w(t); Ebullio uses IF97 for h_w instead (see the `seawater` model).
 *
 * Validity: 10–120 °C, 0–0.12 kg/kg; stated accuracy ±1.5 % of h_sw. Beyond 120 °C the cubic no
 * longer agrees with the heat-capacity correlation (its slope at 150–180 °C is about three times the
 * salt's c_p increment), so the model refuses it there.
 * Source: Sharqawy, Lienhard and Zubair (2010), eq. 43 (see {@link sharqawyBoilingPointRise}).
 *
 * @param massFraction absolute salinity, kg/kg (0–0.12)
 * @param temperature K (283.15–393.15)
 * @returns h_sw − h_w, J/kg (negative: dissolved salt lowers the enthalpy)
 * @example sharqawyEnthalpyDifference(0.035, 333.15) // ≈ -11186 J/kg (IAPWS-08 through python3-iapws, tests/fixtures/seawater/iapws08-points.json: −11151 J/kg)
 */
export function sharqawyEnthalpyDifference(massFraction: number, temperature: number): number {
  const s = massFraction;
  const t = temperature - KELVIN_OFFSET;
  const [a1, a2, a3, a4, a5, a6, a7, a8, a9, a10] = ENTHALPY_A;
  return (
    -s *
    (a1 +
      a2 * s +
      a3 * s * s +
      a4 * s * s * s +
      a5 * t +
      a6 * t * t +
      a7 * t * t * t +
      a8 * s * t +
      a9 * s * s * t +
      a10 * s * t * t)
  );
}

/**
 * Isobaric specific heat capacity of seawater at 0.1 MPa (Sharqawy et al. 2010, their
 * recommended c_p correlation, due to Jamieson, Tudhope, Morris and Cartwright, Desalination 7
 * (1969) 23–30; journal details from memory).
 *
 *   c_p = 1000·(A + B·T68 + C·T68² + D·T68³)   [J/(kg·K)],  T68 in K (IPTS-68), S in g/kg
 *   A = 5.328 − 9.76e−2·S + 4.04e−4·S²
 *   B = −6.913e−3 + 7.351e−4·S − 3.15e−6·S²
 *   C = 9.6e−6 − 1.927e−6·S + 8.23e−9·S²
 *   D = 2.5e−9 + 1.666e−9·S − 7.125e−12·S²
 *
 * with T68 = 1.00024·T90 (the review's conversion).
 *
 * Validity: 0–180 °C, 0–180 g/kg; stated accuracy ±0.28 %.
 * Source: Sharqawy, Lienhard and Zubair (2010) (see {@link sharqawyBoilingPointRise}).
 *
 * @param massFraction absolute salinity, kg/kg (0–0.18)
 * @param temperature K, ITS-90 (273.15–453.15)
 * @returns c_p, J/(kg·K)
 * @example jamiesonHeatCapacity(0.035, 298.15) // ≈ 4000.8 J/(kg·K) (IAPWS-08 through python3-iapws, tests/fixtures/seawater/iapws08-points.json: 3999.8 J/(kg·K))
 */
export function jamiesonHeatCapacity(massFraction: number, temperature: number): number {
  const s = 1000 * massFraction;
  const t68 = 1.00024 * temperature;
  const a = 5.328 - 9.76e-2 * s + 4.04e-4 * s * s;
  const b = -6.913e-3 + 7.351e-4 * s - 3.15e-6 * s * s;
  const c = 9.6e-6 - 1.927e-6 * s + 8.23e-9 * s * s;
  const d = 2.5e-9 + 1.666e-9 * s - 7.125e-12 * s * s;
  return 1000 * (a + t68 * (b + t68 * (c + t68 * d)));
}

/**
 * Density of seawater minus that of pure water at the same temperature (Sharqawy et al. 2010,
 * their density correlation, fitted to the data of Isdale and Morris, Desalination 10 (1972) 329,
 * and of Millero and Poisson, Deep-Sea Research 28A (1981) 625).
 *
 *   ρ_sw − ρ_w = b1·S + b2·S·t + b3·S·t² + b4·S·t³ + b5·S²·t²   [kg/m³],  S in kg/kg, t in °C
 *   b1…b5 = 8.0200240891e2, −2.0005183488, 1.6771024982e−2, −3.0600536746e−5, −1.6132224742e−5
 *
 * Validity: 0–180 °C, 0–0.16 kg/kg at 0.1 MPa; stated accuracy ±0.1 % (for the full ρ_sw with the
 * paper's own ρ_w fit; Ebullio adds this increment to IF97's ρ_w).
 * Source: Sharqawy, Lienhard and Zubair (2010) (see {@link sharqawyBoilingPointRise}).
 *
 * @param massFraction absolute salinity, kg/kg (0–0.16)
 * @param temperature K (273.15–453.15)
 * @returns ρ_sw − ρ_w, kg/m³
 * @example sharqawyDensityDifference(0.035, 298.15) // ≈ 26.67 kg/m³ (IAPWS-08 through python3-iapws, tests/fixtures/seawater/iapws08-points.json: 26.17 kg/m³, i.e. 0.05 % of ρ_sw)
 */
export function sharqawyDensityDifference(massFraction: number, temperature: number): number {
  const s = massFraction;
  const t = temperature - KELVIN_OFFSET;
  return (
    s * (8.0200240891e2 + t * (-2.0005183488 + t * (1.6771024982e-2 + t * -3.0600536746e-5))) -
    1.6132224742e-5 * s * s * t * t
  );
}

/**
 * Boiling temperature of seawater at pressure p: the root of
 *
 *   T = T_sat,IF97(p) + BPR_Sharqawy(S, T),
 *
 * i.e. the rise evaluated at the seawater's own temperature, as the correlation was fitted.
 * dBPR/dT is below 0.025 (0–200 °C, S ≤ 160 g/kg), so plain fixed-point iteration contracts by
 * that factor per step; it converges to 1e−9 K in a few steps. No range checks here.
 *
 * Validity: as {@link sharqawyBoilingPointRise}, at pressures whose water boiling point is 0–200 °C.
 * Source: Sharqawy, Lienhard and Zubair (2010), with T_sat from IAPWS-IF97 (../steam/if97.ts).
 *
 * @param massFraction absolute salinity, kg/kg (0–0.12)
 * @param pressure Pa (IF97 saturation range)
 * @returns boiling temperature, K
 * @example seawaterBoilingTemperature(0.035, 20000) // ≈ 333.610 K (IAPWS-08 through python3-iapws, tests/fixtures/seawater/iapws08-points.json: 333.617 K)
 */
export function seawaterBoilingTemperature(massFraction: number, pressure: number): number {
  const tWater = saturationTemperature(pressure);
  let t = tWater + sharqawyBoilingPointRise(massFraction, tWater);
  for (let i = 0; i < 50; i++) {
    const next = tWater + sharqawyBoilingPointRise(massFraction, t);
    if (Math.abs(next - t) < 1e-9) return next;
    t = next;
  }
  throw new EngineNoSolutionError('seawater boiling point: the fixed-point iteration did not converge', {
    iterations: 50,
    reason: 'no-convergence',
  });
}

/** Sharqawy et al. 2010 eq. 22 coefficients, at the precision of the authors' own library. */
const VISCOSITY_A = [1.540913604, 1.9981117208e-2, -9.5203865864e-5] as const;
const VISCOSITY_B = [7.9739318223, -7.5614568881e-2, 4.7237011074e-4] as const;

/**
 * Relative viscosity of seawater, μ_sw/μ_w (Sharqawy et al. 2010, eq. 22, fitted to the data of
 * Fabuss, Korosi and Othmer 1969, Isdale, Spence and Tudhope 1972, and Millero 1974).
 *
 *   μ_sw/μ_w = 1 + A·S + B·S²,  S in kg/kg, t in °C
 *   A = 1.541 + 1.998e−2·t − 9.52e−5·t²
 *   B = 7.974 − 7.561e−2·t + 4.724e−4·t²
 *
 * Coefficients at the precision of the authors' own implementation (MIT seawater property
 * library, SW_Viscosity: 1.5409136040, 1.9981117208e−2, …), which the paper prints rounded; the
 * digits were checked there. The paper pairs it with its own fit of the IAPWS 2008 pure-water
 * viscosity; Ebullio multiplies it by IAPWS R12-08 itself ({@link liquidViscosity}).
 *
 * Validity: 0–180 °C, 0–0.15 kg/kg at 0.1 MPa (saturation pressure above 100 °C); stated accuracy
 * ±1.5 %.
 * Source: M.H. Sharqawy, J.H. Lienhard V, S.M. Zubair, "Thermophysical properties of seawater: a
 * review of existing correlations and data", Desalination and Water Treatment 16 (2010) 354–380.
 *
 * @param massFraction absolute salinity, kg/kg (0–0.15)
 * @param temperature K (273.15–453.15)
 * @returns μ_sw/μ_w (dimensionless)
 * @example sharqawyRelativeViscosity(0.035, 293.15) // ≈ 1.0747 (at 20 °C, 35 g/kg)
 */
export function sharqawyRelativeViscosity(massFraction: number, temperature: number): number {
  const s = massFraction;
  const t = temperature - KELVIN_OFFSET;
  const a = VISCOSITY_A[0] + t * (VISCOSITY_A[1] + t * VISCOSITY_A[2]);
  const b = VISCOSITY_B[0] + t * (VISCOSITY_B[1] + t * VISCOSITY_B[2]);
  return 1 + a * s + b * s * s;
}

/**
 * Thermal conductivity of seawater (Sharqawy et al. 2010, eq. 13, their recommended correlation,
 * due to Jamieson and Tudhope, Desalination 8 (1970) 393–401).
 *
 *   log10(k/(mW/(m·K))) = log10(240 + 0.0002·S) + 0.434·(2.3 − (343.5 + 0.037·S)/T)
 *                         ·(1 − T/(647.3 + 0.03·S))^(1/3)
 *
 * with T in K on IPTS-68 (T68 = 1.00024·T90, as the review converts) and S the practical
 * salinity in g/kg (S_P = S_A/1.00472). Digits checked in the authors' own implementation (MIT
 * seawater property library, SW_Conductivity).
 *
 * Validity: 0–180 °C, 0–160 g/kg; stated accuracy ±3 %.
 * Source: Sharqawy, Lienhard and Zubair (2010) (see {@link sharqawyRelativeViscosity}).
 *
 * @param massFraction absolute salinity, kg/kg (0–0.16)
 * @param temperature K, ITS-90 (273.15–453.15)
 * @returns k, W/(m·K)
 * @example jamiesonTudhopeThermalConductivity(0.035, 298.15) // ≈ 0.6087 W/(m·K) (the IAPWS seawater guideline through python3-iapws, tests/fixtures/seawater/iapws-transport-points.json: 0.6023 at 25 °C, 35 g/kg, 0.1 MPa)
 */
export function jamiesonTudhopeThermalConductivity(massFraction: number, temperature: number): number {
  const s = (1000 * massFraction) / 1.00472;
  const t68 = 1.00024 * (temperature - KELVIN_OFFSET) + KELVIN_OFFSET;
  const log10k =
    Math.log10(240 + 0.0002 * s) +
    0.434 * (2.3 - (343.5 + 0.037 * s) / t68) * Math.cbrt(1 - t68 / (647.3 + 0.03 * s));
  return 10 ** log10k * 1e-3;
}

/**
 * Relative surface tension of seawater against air, σ_sw/σ_w (IAPWS guideline on the surface
 * tension of seawater, 2014, which adopts the measurements and fit of Nayar et al. 2014).
 *
 *   σ_sw/σ_w = 1 + 3.766e−4·S + 2.347e−6·S·t,  S in g/kg, t in °C
 *
 * σ_w is the IAPWS surface tension of pure water ({@link waterSurfaceTension}). Sharqawy et al.
 * (2010) give an older fit over 0–40 °C and 0–40 g/kg only; this one, from the same laboratory,
 * covers desalination brines.
 *
 * Validity: 1–92 °C, 0–131 g/kg (measured); stated accuracy ±0.6 %.
 * Source: IAPWS G14, "Guideline on the Surface Tension of Seawater" (2014); K.G. Nayar,
 * D. Panchanathan, G.H. McKinley, J.H. Lienhard V, "Surface tension of seawater", Journal of
 * Physical and Chemical Reference Data 43 (2014) 043103 (guideline number and article number
 * from memory).
 *
 * @param massFraction absolute salinity, kg/kg (0–0.131)
 * @param temperature K (274.15–365.15)
 * @returns σ_sw/σ_w (dimensionless)
 * @example nayarRelativeSurfaceTension(0.035, 293.15) // ≈ 1.014824 (20 °C, 35 g/kg)
 */
export function nayarRelativeSurfaceTension(massFraction: number, temperature: number): number {
  const s = 1000 * massFraction;
  const t = temperature - KELVIN_OFFSET;
  return 1 + 3.766e-4 * s + 2.347e-6 * s * t;
}

const MASS_FRACTION_LIMITS: Interval = { min: 0, max: 0.16 };
const TEMPERATURE_LIMITS: Interval = { min: 273.15, max: 473.15 };
/** Validity of each correlation as Sharqawy et al. 2010 state it with each equation. */
const RANGES = {
  boilingPointRise: { massFraction: { min: 0, max: 0.12 }, temperature: { min: 273.15, max: 473.15 } },
  enthalpy: { massFraction: { min: 0, max: 0.12 }, temperature: { min: 283.15, max: 393.15 } },
  heatCapacity: { massFraction: { min: 0, max: 0.16 }, temperature: { min: 273.15, max: 453.15 } },
  density: { massFraction: { min: 0, max: 0.16 }, temperature: { min: 273.15, max: 453.15 } },
  viscosity: { massFraction: { min: 0, max: 0.15 }, temperature: { min: 273.15, max: 453.15 } },
  thermalConductivity: { massFraction: { min: 0, max: 0.16 }, temperature: { min: 273.15, max: 453.15 } },
  surfaceTension: { massFraction: { min: 0, max: 0.131 }, temperature: { min: 274.15, max: 365.15 } },
} as const;
/** The enthalpy cubic is refused above 120 °C (see {@link sharqawyEnthalpyDifference}). */
const ENTHALPY_TEMPERATURE_LIMITS: Interval = { min: 273.15, max: 393.15 };
/** Pressures whose water saturation temperature lies in 0–200 °C. */
const PRESSURE_RANGE: Interval = {
  min: saturationPressure(TEMPERATURE_LIMITS.min),
  max: saturationPressure(TEMPERATURE_LIMITS.max),
};

/**
 * Above about 70 g/kg (twice natural seawater) calcium sulphate scaling limits thermal
 * desalination plants (common practice: the usual design ceiling on brine concentration).
 */
export const SEAWATER_SCALING_MASS_FRACTION = 0.07;

const validity: ValidityBox = {
  massFraction: { min: 0, max: 0.12 },
  temperature: { min: 283.15, max: 393.15 },
  pressure: { ...PRESSURE_RANGE },
  notes: [
    'Boiling-point rise: 0-200 °C, 0-0.12 kg/kg (Sharqawy et al. 2010, ±0.018 K).',
    'Enthalpy: 10-120 °C, 0-0.12 kg/kg (±1.5 %); refused above 120 °C.',
    'Heat capacity and density: 0-180 °C, 0-0.16 kg/kg (±0.28 %, ±0.1 %).',
    'Viscosity: 0-180 °C, 0-0.15 kg/kg (±1.5 %); thermal conductivity: 0-180 °C, 0-0.16 kg/kg (±3 %); surface tension: 1-92 °C, 0-0.131 kg/kg (±0.6 %). Outside these a "model-extrapolated" warning names the property.',
    'Pure-water parts from IAPWS-IF97 saturated liquid at T.',
  ],
};
const limits: ValidityBox = {
  massFraction: { ...MASS_FRACTION_LIMITS },
  temperature: { ...TEMPERATURE_LIMITS },
  pressure: { ...PRESSURE_RANGE },
  notes: ['Enthalpy is refused above 393.15 K (120 °C).'],
};

const sources: Citation[] = [
  {
    key: 'sharqawy-2010',
    reference:
      'M. H. Sharqawy, J. H. Lienhard V, S. M. Zubair, "Thermophysical properties of seawater: a review of existing correlations and data", Desalination and Water Treatment 16 (2010) 354-380',
  },
  {
    key: 'nayar-2014',
    reference:
      'K. G. Nayar, D. Panchanathan, G. H. McKinley, J. H. Lienhard V, "Surface tension of seawater", Journal of Physical and Chemical Reference Data 43 (2014); adopted by the IAPWS Guideline on the Surface Tension of Seawater (2014)',
  },
  if97CitationFor('pure-water parts'),
  {
    key: 'iapws-transport',
    reference:
      'IAPWS R12-08 (viscosity, 2008), R15-11 (thermal conductivity, 2011) and R1-76(2014) (surface tension) of ordinary water substance (pure-water parts of the transport properties)',
  },
];

const cautions: EngineCaution[] = [
  {
    code: 'scaling',
    message:
      'Concentrating seawater deposits scale long before sodium chloride saturates (about 0.26 kg/kg): calcium carbonate and magnesium hydroxide from about 70 °C, calcium sulphate above roughly 0.07 kg/kg or 110-120 °C. Check scaling limits and antiscalant dosing with the water chemistry of the site.',
  },
];

function checkMassFraction(value: number, range: Interval, warnings: WarningSink): void {
  checkAgainst(MODEL_ID, 'massFraction', value, 'kg/kg', range, MASS_FRACTION_LIMITS, warnings);
  if (value > SEAWATER_SCALING_MASS_FRACTION) {
    addWarning(warnings, {
      code: 'scaling-risk',
      field: 'massFraction',
      message: `massFraction = ${value} kg/kg exceeds ${SEAWATER_SCALING_MASS_FRACTION} kg/kg, where calcium sulphate scaling usually limits seawater evaporators`,
      ...templated(
        '{field} = {x} exceeds {limit}, where calcium sulphate scaling usually limits seawater evaporators',
        'massFraction',
        { x: value, limit: SEAWATER_SCALING_MASS_FRACTION },
      ),
      validRange: { min: 0, max: SEAWATER_SCALING_MASS_FRACTION, unit: 'kg/kg' },
    });
  }
}

function checkTemperature(value: number, range: Interval, hard: Interval, warnings: WarningSink): void {
  checkAgainst(MODEL_ID, 'temperature', value, 'K', range, hard, warnings);
}

/**
 * The one rule for a transport property: hard limits of the model, warnings outside the box of
 * the property's own source, the property named in the warning's field (e.g. "viscosity.temperature").
 */
function checkProperty(
  property: 'viscosity' | 'thermalConductivity' | 'surfaceTension',
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
): void {
  checkPropertyBox(
    MODEL_ID,
    PROPERTY_WORDS[property],
    RANGES[property],
    { massFraction: MASS_FRACTION_LIMITS, temperature: TEMPERATURE_LIMITS },
    massFraction,
    temperature,
    warnings,
  );
}

const PROPERTY_WORDS = {
  viscosity: 'viscosity',
  thermalConductivity: 'thermal conductivity',
  surfaceTension: 'surface tension',
} as const;

function checkPressure(value: number): void {
  if (!Number.isFinite(value) || value < PRESSURE_RANGE.min || value > PRESSURE_RANGE.max) {
    throw new EngineRangeError(
      'pressure',
      value,
      { min: PRESSURE_RANGE.min, max: PRESSURE_RANGE.max, unit: 'Pa' },
      `pressure = ${value} Pa is outside the range of the ${MODEL_ID} model (${PRESSURE_RANGE.min.toFixed(1)} to ${PRESSURE_RANGE.max.toFixed(0)} Pa, water boiling at 0-200 °C)`,
    );
  }
}

function boilingPoint(massFraction: number, pressure: number, warnings?: WarningSink): number {
  checkMassFraction(massFraction, RANGES.boilingPointRise.massFraction, warnings);
  checkPressure(pressure);
  return seawaterBoilingTemperature(massFraction, pressure);
}

export const seawater: LiquorModel = defineLiquorModel({
  id: MODEL_ID,
  name: 'Seawater and desalination brine',
  kind: 'built-in',
  compositionVariable: 'mass fraction of dissolved salt (absolute salinity, kg/kg; g/kg = 1000·x)',
  validity,
  limits,
  sources,
  cautions,

  boilingPoint,

  /** h = h_f,IF97(T) + (h_sw − h_w)_Sharqawy(S, T); IF97 saturated liquid at T, J/kg. */
  enthalpy(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkMassFraction(massFraction, RANGES.enthalpy.massFraction, warnings);
    checkTemperature(temperature, RANGES.enthalpy.temperature, ENTHALPY_TEMPERATURE_LIMITS, warnings);
    const water = saturatedLiquidAtTemperature(temperature).enthalpy;
    return water + sharqawyEnthalpyDifference(massFraction, temperature);
  },

  /** c_p = c_p,IF97(T) + [c_p,Jamieson(S, T) − c_p,Jamieson(0, T)], J/(kg·K). */
  heatCapacity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkMassFraction(massFraction, RANGES.heatCapacity.massFraction, warnings);
    checkTemperature(temperature, RANGES.heatCapacity.temperature, TEMPERATURE_LIMITS, warnings);
    const water = saturatedLiquidAtTemperature(temperature).heatCapacity;
    if (water === undefined) {
      throw new EngineNoSolutionError('IF97 gave no heat capacity for saturated liquid', {
        reason: 'missing-property',
      });
    }
    return water + jamiesonHeatCapacity(massFraction, temperature) - jamiesonHeatCapacity(0, temperature);
  },

  transportValidity: {
    density: { ...RANGES.density },
    viscosity: { ...RANGES.viscosity },
    thermalConductivity: { ...RANGES.thermalConductivity },
    surfaceTension: { ...RANGES.surfaceTension },
  },

  /** μ = μ_IAPWS(T, saturated liquid)·(μ_sw/μ_w)_Sharqawy(S, T), Pa·s. */
  viscosity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkProperty('viscosity', massFraction, temperature, warnings);
    return liquidViscosity(temperature) * sharqawyRelativeViscosity(massFraction, temperature);
  },

  /**
   * k = k_IAPWS(T)·k_JT(S, T)/k_JT(0, T), W/(m·K): the review's correlation as a ratio to its own
   * pure-water value, on IAPWS R15-11 water, so that S = 0 gives IAPWS exactly (the correlation's
   * own pure-water value is −0.2 to +1.7 % off IAPWS between 10 and 180 °C).
   */
  thermalConductivity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkProperty('thermalConductivity', massFraction, temperature, warnings);
    return (
      (liquidThermalConductivity(temperature) *
        jamiesonTudhopeThermalConductivity(massFraction, temperature)) /
      jamiesonTudhopeThermalConductivity(0, temperature)
    );
  },

  /** σ = σ_IAPWS(T)·(σ_sw/σ_w)_Nayar(S, T), N/m. */
  surfaceTension(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkProperty('surfaceTension', massFraction, temperature, warnings);
    return waterSurfaceTension(temperature) * nayarRelativeSurfaceTension(massFraction, temperature);
  },

  /** ρ = ρ_f,IF97(T) + (ρ_sw − ρ_w)_Sharqawy(S, T), kg/m³. */
  density(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkMassFraction(massFraction, RANGES.density.massFraction, warnings);
    checkTemperature(temperature, RANGES.density.temperature, TEMPERATURE_LIMITS, warnings);
    const water = saturatedLiquidAtTemperature(temperature).density;
    return water + sharqawyDensityDifference(massFraction, temperature);
  },
});
