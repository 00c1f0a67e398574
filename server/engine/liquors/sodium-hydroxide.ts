/**
 * Built-in liquor model "sodium-hydroxide": aqueous NaOH solutions (caustic soda), from
 *
 *   M. Olsson, Å. Jernqvist and G. Aly, "Thermophysical properties of aqueous NaOH–H2O solutions
 *   at high concentrations", International Journal of Thermophysics 18(3) (1997).
 *
 * Coefficients as printed in that paper, taken from /work/shared/domain.md (section 3). The paper
 * writes its correlations in ξ = mass fraction of WATER (ξ = 1 − x) and t in °C; the small
 * exported functions below keep the paper's variables and units (ξ, °C, kPa, kJ/kg) so that they
 * can be checked line by line against it, and the LiquorModel at the end converts to SI.
 *
 * Density and viscosity come from Laliberté's models for aqueous electrolytes (Laliberté and
 * Cooper 2004; Laliberté 2007), with NaOH's parameters as Laliberté (2009) tabulates them, each
 * with its own data box (`transportValidity`). Thermal conductivity comes from Riedel's additive
 * rule for electrolyte solutions (Riedel 1951, as Reid, Prausnitz and Poling give it) on IAPWS
 * water, with the Laliberté density for the molarity. Surface tension and a crystallisation
 * (solubility) limit are not provided: we have no published NaOH coefficients at hand for them
 * and do not invent coefficients.
 */
import { EngineRangeError } from '../errors.js';
import {
  saturatedLiquidAtTemperature,
  saturationTemperature,
  IF97,
  if97CitationFor,
  liquidThermalConductivity,
  liquidViscosity,
} from '../steam/if97.js';
import { addWarning, KELVIN_OFFSET, type Citation, type WarningSink } from '../types.js';
import { defineLiquorModel, type Interval, type LiquorModel, type ValidityBox } from './model.js';
import { polyval } from '../numeric/polynomial.js';
import { checkAgainst, checkPropertyBox } from './validity.js';

const MODEL_ID = 'sodium-hydroxide';

/** Olsson et al. (1997), vapour-pressure coefficients k_i, i = 0…8 (for a1). */
const VP_K = [
  -113.93947, 209.82305, 494.77153, 6860.833, 2676.6433, -21740.328, -34750.872, -20122.157, -4102.989,
] as const;
/** Olsson et al. (1997), vapour-pressure coefficients l_i, i = 0…10 (for a2). */
const VP_L = [
  16.240074, -11.864008, -223.47305, -1650.3997, -5997.3118, -12318.744, -15303.153, -11707.48, -5364.9554,
  -1338.5412, -137.96889,
] as const;
/** Olsson et al. (1997), vapour-pressure coefficients m_i, i = 0…10 (for a3). */
const VP_M = [
  -226.80157, 293.17155, 5081.8791, 36752.126, 131262.0, 259399.54, 301696.22, 208617.9, 81774.024, 15648.526,
  906.29769,
] as const;

/** Olsson et al. (1997), enthalpy coefficients k_0…k_7 of the rational function c1(ξ). */
const H_K = [
  1288.4485, -0.49649131, -4387.8908, -4.0915144, 4938.2298, 7.2887292, -1841.189, -3.0202651,
] as const;
/** Olsson et al. (1997), enthalpy coefficients l_i, i = 0…8 (c2). */
const H_L = [
  2.3087919, -9.0004252, 167.59914, -1051.6368, 3394.3378, -6115.0986, 6220.8249, -3348.8098, 743.87432,
] as const;
/** Olsson et al. (1997), enthalpy coefficients m_i, i = 0…7 (c3). */
const H_M = [
  0.0230286, -0.37866056, 2.4529593, -8.2693542, 15.728833, -16.944427, 9.6254192, -2.2410628,
] as const;
/** Olsson et al. (1997), enthalpy coefficients n_i, i = 0…7 (c4); printed ×10⁻⁵. */
const H_N = [-8.5131313, 136.52823, -875.68741, 2920.0398, -5488.2983, 5841.8034, -3278.7483, 754.45993].map(
  (n) => n * 1e-5,
);

function requireWaterFraction(waterMassFraction: number): void {
  if (!Number.isFinite(waterMassFraction) || waterMassFraction <= 0 || waterMassFraction > 1) {
    throw new EngineRangeError('waterMassFraction', waterMassFraction, {
      min: 0,
      max: 1,
      unit: 'kg water/kg solution',
    });
  }
}

/** The three ξ-dependent parameters of Olsson's vapour-pressure equation. */
function vaporPressureParameters(waterMassFraction: number): { a1: number; a2: number; a3: number } {
  const z = Math.log(waterMassFraction);
  return { a1: polyval(VP_K, z), a2: polyval(VP_L, z), a3: polyval(VP_M, z) };
}

/**
 * Vapour pressure of an aqueous NaOH solution (Olsson, Jernqvist and Aly 1997).
 *
 *   ln(p/kPa) = (a1 + a2·t)/(t − a3),  a1 = Σ_{i=0}^{8} k_i·(ln ξ)^i,
 *   a2 = Σ_{i=0}^{10} l_i·(ln ξ)^i,  a3 = Σ_{i=0}^{10} m_i·(ln ξ)^i
 *
 * Validity (paper): 0–20 °C ξ ≥ 0.582; 20–60 °C ξ ≥ 0.500; 60–70 °C ξ ≥ 0.353;
 * 70–150 °C ξ ≥ 0.300; 150–200 °C ξ ≥ 0.200 (see {@link olssonVaporPressureMinWaterFraction}).
 * Source: J. Olsson, A. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O
 * solutions at high concentrations", Int. J. Thermophysics 18(3) (1997); coefficients as in
 * /work/shared/domain.md.
 *
 * @param waterMassFraction ξ, kg water per kg solution (ξ = 1 − x_NaOH), 0 < ξ ≤ 1
 * @param temperatureCelsius t, °C; must lie above the equation's pole t = a3(ξ)
 * @returns p, kPa
 * @example olssonVaporPressureKPa(0.5, 146.4) // ≈ 101.4 kPa (50 % NaOH boils near 146 °C at 1 atm)
 * @example olssonVaporPressureKPa(1, 100) // ≈ 101.57 kPa (IF97 p_sat(100 °C): 101.42 kPa)
 */
export function olssonVaporPressureKPa(waterMassFraction: number, temperatureCelsius: number): number {
  requireWaterFraction(waterMassFraction);
  const { a1, a2, a3 } = vaporPressureParameters(waterMassFraction);
  if (!Number.isFinite(temperatureCelsius) || temperatureCelsius <= a3) {
    throw new EngineRangeError(
      'temperature',
      temperatureCelsius,
      { min: a3, max: Number.POSITIVE_INFINITY, unit: '°C' },
      `temperature = ${temperatureCelsius} °C is at or below the pole t = a3 = ${a3.toFixed(2)} °C of the NaOH vapour-pressure equation at water fraction ${waterMassFraction}`,
    );
  }
  return Math.exp((a1 + a2 * temperatureCelsius) / (temperatureCelsius - a3));
}

/**
 * Boiling temperature of an aqueous NaOH solution at pressure p: Olsson's vapour-pressure
 * equation solved for t. With y = ln(p/kPa) the equation y·(t − a3) = a1 + a2·t is linear in t:
 *
 *   t = (a1 + a3·y)/(y − a2)
 *
 * Along t > a3 (the physical branch) ln p rises monotonically from −∞ to a2, so there is exactly
 * one root when y < a2 and none otherwise (then an EngineRangeError is thrown).
 *
 * Validity: as {@link olssonVaporPressureKPa}.
 * Source: J. Olsson, A. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O
 * solutions at high concentrations", Int. J. Thermophysics 18(3) (1997); coefficients as in
 * /work/shared/domain.md.
 *
 * @param waterMassFraction ξ, kg water per kg solution, 0 < ξ ≤ 1
 * @param pressureKPa p, kPa (> 0)
 * @returns t, °C
 * @example olssonBoilingTemperatureCelsius(1, 101.325) // ≈ 99.93 °C (IF97 T_sat: 99.974 °C)
 * @example olssonBoilingTemperatureCelsius(0.5, 101.325) // ≈ 146.38 °C
 */
export function olssonBoilingTemperatureCelsius(waterMassFraction: number, pressureKPa: number): number {
  requireWaterFraction(waterMassFraction);
  if (!Number.isFinite(pressureKPa) || pressureKPa <= 0) {
    throw new EngineRangeError('pressure', pressureKPa, {
      min: 0,
      max: Number.POSITIVE_INFINITY,
      unit: 'kPa',
    });
  }
  const { a1, a2, a3 } = vaporPressureParameters(waterMassFraction);
  const y = Math.log(pressureKPa);
  if (y >= a2) {
    throw new EngineRangeError(
      'pressure',
      pressureKPa,
      { min: 0, max: Math.exp(a2), unit: 'kPa' },
      `pressure = ${pressureKPa} kPa: the NaOH vapour-pressure equation has no boiling temperature at water fraction ${waterMassFraction} above ${Math.exp(a2).toPrecision(5)} kPa`,
    );
  }
  return (a1 + a3 * y) / (y - a2);
}

/**
 * Specific enthalpy of an aqueous NaOH solution (Olsson, Jernqvist and Aly 1997).
 *
 *   h = c1 + c2·t + c3·t² + c4·t³   [kJ/kg]
 *   c1 = (k0 + k2ξ + k4ξ² + k6ξ³)/(1 + k1ξ + k3ξ² + k5ξ³ + k7ξ⁴)
 *   c2 = Σ_{i=0}^{8} l_i·ξ^i,  c3 = Σ_{i=0}^{7} m_i·ξ^i,  c4 = Σ_{i=0}^{7} n_i·ξ^i
 *
 * Datum as the steam tables (liquid water at the triple point).
 *
 * Validity (paper, ξ lower bound by t): 0–4 °C 0.78; 4–10 0.68; 10–15 0.58; 15–26 0.54;
 * 26–37 0.44; 37–48 0.40; 48–60 0.34; 60–71 0.30; 71–82 0.28; 82–93 0.24; 93–204 0.22
 * (see {@link olssonEnthalpyMinWaterFraction}).
 * Source: J. Olsson, A. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O
 * solutions at high concentrations", Int. J. Thermophysics 18(3) (1997); coefficients as in
 * /work/shared/domain.md.
 *
 * @param waterMassFraction ξ, kg water per kg solution, 0 < ξ ≤ 1
 * @param temperatureCelsius t, °C
 * @returns h, kJ/kg
 * @example olssonEnthalpyKJPerKg(1, 25) // ≈ 104.66 kJ/kg (IF97 h_f(25 °C): 104.84 kJ/kg)
 * @example olssonEnthalpyKJPerKg(0.5, 89.5) // ≈ 507.6 kJ/kg
 */
export function olssonEnthalpyKJPerKg(waterMassFraction: number, temperatureCelsius: number): number {
  requireWaterFraction(waterMassFraction);
  const xi = waterMassFraction;
  const [k0, k1, k2, k3, k4, k5, k6, k7] = H_K;
  const c1 =
    (k0 + k2 * xi + k4 * xi ** 2 + k6 * xi ** 3) / (1 + k1 * xi + k3 * xi ** 2 + k5 * xi ** 3 + k7 * xi ** 4);
  const t = temperatureCelsius;
  return c1 + polyval(H_L, xi) * t + polyval(H_M, xi) * t ** 2 + polyval(H_N, xi) * t ** 3;
}

/**
 * Isobaric specific heat capacity of an aqueous NaOH solution: the temperature derivative of
 * Olsson's own enthalpy fit (this is their model, not a separate correlation).
 *
 *   c_p = ∂h/∂t = c2 + 2·c3·t + 3·c4·t²   [kJ/(kg·K)]
 *
 * Being a derivative of a fit, it is less accurate than h itself; for pure water it runs about 2 %
 * high at 25 °C and 4 % at 150 °C.
 *
 * Validity: as {@link olssonEnthalpyKJPerKg}.
 * Source: J. Olsson, A. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O
 * solutions at high concentrations", Int. J. Thermophysics 18(3) (1997); coefficients as in
 * /work/shared/domain.md.
 *
 * @param waterMassFraction ξ, kg water per kg solution, 0 < ξ ≤ 1
 * @param temperatureCelsius t, °C
 * @returns c_p, kJ/(kg·K)
 * @example olssonHeatCapacityKJPerKgK(0.5, 50) // ≈ 3.22 kJ/(kg·K)
 */
export function olssonHeatCapacityKJPerKgK(waterMassFraction: number, temperatureCelsius: number): number {
  requireWaterFraction(waterMassFraction);
  const xi = waterMassFraction;
  const t = temperatureCelsius;
  return polyval(H_L, xi) + 2 * polyval(H_M, xi) * t + 3 * polyval(H_N, xi) * t ** 2;
}

/** [upper temperature bound °C, lowest water fraction ξ] steps of Olsson's data for p(ξ, t). */
const VP_STAIRCASE: readonly (readonly [number, number])[] = [
  [20, 0.582],
  [60, 0.5],
  [70, 0.353],
  [150, 0.3],
  [200, 0.2],
];
/** [upper temperature bound °C, lowest water fraction ξ] steps of Olsson's data for h(ξ, t). */
const H_STAIRCASE: readonly (readonly [number, number])[] = [
  [4, 0.78],
  [10, 0.68],
  [15, 0.58],
  [26, 0.54],
  [37, 0.44],
  [48, 0.4],
  [60, 0.34],
  [71, 0.3],
  [82, 0.28],
  [93, 0.24],
  [204, 0.22],
];

/** Lowest ξ of a staircase at t; on a step boundary the looser (lower) bound applies. */
function staircaseMinimum(steps: readonly (readonly [number, number])[], t: number): number {
  for (const [upper, xiMin] of steps) if (t < upper) return xiMin;
  const last = steps[steps.length - 1];
  // On the last boundary and above it: the last step (beyond its t the temperature check warns).
  return last ? last[1] : 0;
}

/**
 * Lowest water mass fraction ξ at which Olsson et al. (1997) had vapour-pressure data at t. Outside
 * these steps the vapour-pressure equation is extrapolated. On a step boundary the looser (lower)
 * bound applies; above 200 °C the last step (ξ ≥ 0.200) is returned, the temperature itself then
 * being outside the data.
 *
 *   ξ_min(t) = 0.582 (0–20 °C), 0.500 (20–60), 0.353 (60–70), 0.300 (70–150), 0.200 (150–200)
 *
 * Validity: any t (the staircase is the validity statement itself).
 * Source: J. Olsson, A. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O
 * solutions at high concentrations", Int. J. Thermophysics 18(3) (1997); coefficients as in
 * /work/shared/domain.md.
 *
 * @param temperatureCelsius t, °C
 * @returns ξ_min, kg water per kg solution
 * @example olssonVaporPressureMinWaterFraction(65) // → 0.353 (the paper's 60–70 °C step)
 */
export function olssonVaporPressureMinWaterFraction(temperatureCelsius: number): number {
  const t = temperatureCelsius;
  for (let i = 0; i < VP_STAIRCASE.length - 1; i++) {
    const step = VP_STAIRCASE[i];
    const next = VP_STAIRCASE[i + 1];
    if (step && next && t === step[0]) return Math.min(step[1], next[1]);
  }
  return staircaseMinimum(VP_STAIRCASE, t);
}

/**
 * Lowest water mass fraction ξ at which Olsson et al. (1997) had enthalpy data at t. On a step
 * boundary the looser (lower) bound applies; above 204 °C the last step (ξ ≥ 0.22) is returned.
 *
 *   ξ_min(t) = 0.78 (0–4 °C), 0.68 (4–10), 0.58 (10–15), 0.54 (15–26), 0.44 (26–37), 0.40 (37–48),
 *              0.34 (48–60), 0.30 (60–71), 0.28 (71–82), 0.24 (82–93), 0.22 (93–204)
 *
 * Validity: any t (the staircase is the validity statement itself).
 * Source: J. Olsson, A. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O
 * solutions at high concentrations", Int. J. Thermophysics 18(3) (1997); coefficients as in
 * /work/shared/domain.md.
 *
 * @param temperatureCelsius t, °C
 * @returns ξ_min, kg water per kg solution
 * @example olssonEnthalpyMinWaterFraction(50) // → 0.34 (the paper's 48–60 °C step)
 */
export function olssonEnthalpyMinWaterFraction(temperatureCelsius: number): number {
  const t = temperatureCelsius;
  for (let i = 0; i < H_STAIRCASE.length - 1; i++) {
    const step = H_STAIRCASE[i];
    const next = H_STAIRCASE[i + 1];
    if (step && next && t === step[0]) return Math.min(step[1], next[1]);
  }
  return staircaseMinimum(H_STAIRCASE, t);
}

/**
 * Laliberté's NaOH viscosity parameters v1…v6 (mPa·s model), as tabulated in Laliberté (2009),
 * which refits the 2007 parameters on more data; digits checked in the open-source `chemicals`
 * library's transcription of that table (Laliberte2009.tsv). Data: 12.5–70 °C, w ≤ 0.56, 180 points.
 */
const NAOH_VISCOSITY = [
  448.457566713375, 0.00871452408983102, -431.97212334697, 0.0160144202049452, 104.011738670148,
  4.64493684488816,
] as const;
/**
 * Laliberté's NaOH density parameters c0…c4 (apparent specific volume model), as tabulated in
 * Laliberté (2009); digits checked as above. Data: 4–120 °C, w ≤ 0.503, 517 points.
 */
const NAOH_DENSITY = [
  319.020509469838, 528.592358475315, -0.102197896602724, 0.000350420706415566, 765.970470238438,
] as const;

/**
 * Viscosity that NaOH contributes in Laliberté's mixing rule (the "solute viscosity" μ_i).
 *
 *   μ_i = exp[(v1·w^v2 + v3)/(v4·t + 1)] / (v5·w^v6 + 1)   [mPa·s],  w = mass fraction of NaOH
 *
 * v1…v6 = 448.4576, 0.0087145, −431.9721, 0.0160144, 104.0117, 4.644937.
 *
 * Validity: 12.5–70 °C, w ≤ 0.56 (the NaOH data behind the parameters).
 * Source: M. Laliberté, "Model for calculating the viscosity of aqueous solutions", J. Chem. Eng.
 * Data 52 (2007) 321–335 (equation); parameters from M. Laliberté, "A model for calculating the
 * heat capacity of aqueous solutions, with updated density and viscosity data", J. Chem. Eng.
 * Data 54 (2009) 1725–1760.
 *
 * @param massFraction w, kg NaOH per kg solution (0–0.56)
 * @param temperatureCelsius t, °C
 * @returns μ_i, mPa·s
 * @example laliberteNaohSoluteViscosityMPaS(0.3, 40) // ≈ 961.0 mPa·s (a fit parameter, not the solution's viscosity)
 */
export function laliberteNaohSoluteViscosityMPaS(massFraction: number, temperatureCelsius: number): number {
  const [v1, v2, v3, v4, v5, v6] = NAOH_VISCOSITY;
  const w = massFraction;
  return Math.exp((v1 * w ** v2 + v3) / (v4 * temperatureCelsius + 1)) / (v5 * w ** v6 + 1);
}

/**
 * Viscosity of aqueous NaOH by Laliberté's logarithmic mixing rule, with the water viscosity from
 * IAPWS R12-08 (as the model allows: Laliberté fitted with his own water equation, which agrees
 * with IAPWS to about 0.1 % between 0 and 100 °C, from memory).
 *
 *   ln μ_m = w_w·ln μ_w + w·ln μ_i,  w_w = 1 − w
 *
 * Validity: as {@link laliberteNaohSoluteViscosityMPaS}.
 * Source: M. Laliberté, J. Chem. Eng. Data 52 (2007) 321–335, with the 2009 parameters.
 *
 * @param massFraction w, kg NaOH per kg solution (0–0.56)
 * @param temperatureCelsius t, °C
 * @param waterViscosityMPaS μ_w at t, mPa·s
 * @returns μ_m, mPa·s
 * @example laliberteNaohViscosityMPaS(0.3, 40, 0.6527) // ≈ 5.82 mPa·s
 */
export function laliberteNaohViscosityMPaS(
  massFraction: number,
  temperatureCelsius: number,
  waterViscosityMPaS: number,
): number {
  const w = massFraction;
  if (w === 0) return waterViscosityMPaS;
  return Math.exp(
    (1 - w) * Math.log(waterViscosityMPaS) +
      w * Math.log(laliberteNaohSoluteViscosityMPaS(w, temperatureCelsius)),
  );
}

/**
 * Apparent specific volume of NaOH in water (Laliberté and Cooper's density model).
 *
 *   v_app = (w + c2 + c3·t) / [(c0·w + c1)·exp(1e−6·(t + c4)²)]   [m³/kg]
 *
 * c0…c4 = 319.0205, 528.5924, −0.1021979, 3.504207e−4, 765.9705. Negative at low w and t: NaOH
 * shrinks the water it dissolves in (a negative apparent molar volume at infinite dilution).
 *
 * Validity: 4–120 °C, w ≤ 0.503.
 * Source: M. Laliberté, W.E. Cooper, "Model for calculating the density of aqueous electrolyte
 * solutions", J. Chem. Eng. Data 49 (2004) 1141–1151 (equation); parameters from Laliberté,
 * J. Chem. Eng. Data 54 (2009) 1725–1760.
 *
 * @param massFraction w, kg NaOH per kg solution (0–0.503)
 * @param temperatureCelsius t, °C
 * @returns v_app, m³/kg
 * @example laliberteNaohApparentSpecificVolume(0.3, 20) // ≈ 1.7688e-4 m³/kg
 */
export function laliberteNaohApparentSpecificVolume(
  massFraction: number,
  temperatureCelsius: number,
): number {
  const [c0, c1, c2, c3, c4] = NAOH_DENSITY;
  const w = massFraction;
  const t = temperatureCelsius;
  return (w + c2 + c3 * t) / ((c0 * w + c1) * Math.exp(1e-6 * (t + c4) ** 2));
}

/**
 * Density of aqueous NaOH (Laliberté and Cooper): water and solute volumes added.
 *
 *   1/ρ_m = w_w/ρ_w + w·v_app,  w_w = 1 − w
 *
 * Ebullio takes ρ_w from IF97 (saturated liquid at t); Laliberté and Cooper used a 1 atm water
 * equation, which differs by less than 0.01 % below 100 °C.
 *
 * Validity: as {@link laliberteNaohApparentSpecificVolume}.
 * Source: M. Laliberté, W.E. Cooper, J. Chem. Eng. Data 49 (2004) 1141–1151.
 *
 * @param massFraction w, kg NaOH per kg solution (0–0.503)
 * @param temperatureCelsius t, °C
 * @param waterDensity ρ_w at t, kg/m³
 * @returns ρ_m, kg/m³
 * @example laliberteNaohDensity(0.5, 20, 998.16) // ≈ 1516.3 kg/m³ (handbook tables give about 1525 kg/m³, from memory)
 */
export function laliberteNaohDensity(
  massFraction: number,
  temperatureCelsius: number,
  waterDensity: number,
): number {
  const w = massFraction;
  return 1 / ((1 - w) / waterDensity + w * laliberteNaohApparentSpecificVolume(w, temperatureCelsius));
}

/** Molar mass of NaOH, kg/mol (IUPAC standard atomic weights: 22.990 + 15.999 + 1.008 g/mol). */
export const NAOH_MOLAR_MASS = 39.997e-3;

/**
 * Riedel's ionic coefficients σ_i for Na⁺ and OH⁻, W/(m·K) per mol/L of the ion, at 20 °C, as
 * Reid, Prausnitz and Poling tabulate them (from memory: 0 for Na⁺, the reference ion, and
 * +20.934 × 10⁻³ for OH⁻, one of the few ions that raise water's conductivity). Their scale was
 * checked against the recalled Cl⁻ coefficient (−5.466 × 10⁻³), which reproduces the drop of
 * seawater's conductivity below water's (tests).
 */
const RIEDEL_SIGMA = { sodium: 0, hydroxide: 20.934e-3 } as const;
/** Riedel's reference temperature, K (his data were measured near 20 °C). */
export const RIEDEL_REFERENCE_TEMPERATURE = 293.15;

/**
 * Molar concentration of NaOH at 20 °C from its mass fraction and the solution density at 20 °C.
 *
 *   c = w·ρ_20/M_NaOH/1000   [mol/L]
 *
 * Validity: as the density passed in.
 * Source: definition; M_NaOH = 39.997 g/mol (IUPAC atomic weights).
 *
 * @param massFraction w, kg NaOH per kg solution
 * @param density20 ρ of the solution at 20 °C, kg/m³
 * @returns c, mol/L
 * @example naohMolarity(0.1, 1109) // ≈ 2.773 mol/L
 */
export function naohMolarity(massFraction: number, density20: number): number {
  return (massFraction * density20) / NAOH_MOLAR_MASS / 1000;
}

/**
 * Thermal conductivity of aqueous NaOH by Riedel's additive rule for electrolyte solutions: at
 * 20 °C each ion adds σ_i times its molar concentration to water's conductivity, and at other
 * temperatures the solution's conductivity keeps its ratio to water's (the method's temperature
 * rule: the temperature dependence is water's).
 *
 *   k(293 K) = k_w(293 K) + Σ σ_i·c_i,   k(T) = k(293 K)·k_w(T)/k_w(293 K)
 *   c_Na⁺ = c_OH⁻ = c (mol/L at 20 °C);  σ_Na⁺ = 0,  σ_OH⁻ = 20.934 × 10⁻³ W·L/(m·K·mol)
 *
 * At c = 0 it is k_w(T) exactly, whatever water equation supplies k_w.
 *
 * Validity: Riedel's measurements were near 20 °C and at moderate concentrations (a few mol/L,
 * from memory); Reid, Prausnitz and Poling quote errors of a few per cent there (from memory).
 * The temperature rule and high concentrations are extrapolations.
 * Source: L. Riedel, "Die Wärmeleitfähigkeit von wäßrigen Lösungen starker Elektrolyte",
 * Chemie-Ingenieur-Technik 23 (1951) 59–64; equations and ionic coefficients as given in R.C. Reid,
 * J.M. Prausnitz, B.E. Poling, The Properties of Gases and Liquids, 4th ed., McGraw-Hill (1987),
 * section 10-13 (from memory).
 *
 * @param molarity c, mol NaOH per litre of solution at 20 °C
 * @param waterConductivity k_w(T), W/(m·K)
 * @param waterConductivity20 k_w(293.15 K), W/(m·K)
 * @returns k, W/(m·K)
 * @example riedelNaohThermalConductivity(2.773, 0.598, 0.598) // ≈ 0.6560 W/(m·K)
 */
export function riedelNaohThermalConductivity(
  molarity: number,
  waterConductivity: number,
  waterConductivity20: number,
): number {
  const k20 = waterConductivity20 + (RIEDEL_SIGMA.sodium + RIEDEL_SIGMA.hydroxide) * molarity;
  return (k20 * waterConductivity) / waterConductivity20;
}

const KPA = 1e3;
const KJ = 1e3;
const C = (celsius: number): number => celsius + KELVIN_OFFSET;

/**
 * Hard limits, and why:
 * - NaOH mass fraction 0–0.80: the richest solution in Olsson's data (ξ = 0.20); beyond it the
 *   ln ξ polynomials (10th degree) turn over within a few per cent (the boiling point stops
 *   rising with x at x ≈ 0.81), so the equations no longer behave physically.
 * - Temperature 0–250 °C: the data reach 200 °C (p) and 204 °C (h); the fit stays smooth and
 *   monotonic in t up to 250 °C, and 0 °C is the floor of IF97 liquid water used for the BPR.
 * - Pressure 611.213 Pa (lowest IF97 saturation pressure, needed for the BPR) up to the fit's
 *   pure-water vapour pressure at 250 °C.
 */
const X_VALID: Interval = { min: 0, max: 0.8 };
const X_LIMITS: Interval = { min: 0, max: 0.8 };
const T_VALID_BOILING: Interval = { min: C(0), max: C(200) };
const T_VALID_ENTHALPY: Interval = { min: C(0), max: C(204) };
const T_LIMITS: Interval = { min: C(0), max: C(250) };
const P_VALID: Interval = { min: IF97.minPressure, max: olssonVaporPressureKPa(1, 200) * KPA };
const P_LIMITS: Interval = { min: IF97.minPressure, max: olssonVaporPressureKPa(1, 250) * KPA };

const validity: ValidityBox = {
  massFraction: X_VALID,
  temperature: { min: C(0), max: C(204) },
  pressure: P_VALID,
  notes: [
    'x is the mass fraction of NaOH; Olsson et al. write their equations in the water fraction ξ = 1 − x.',
    'Boiling point (vapour pressure) data, lowest water fraction by temperature: 0–20 °C ξ ≥ 0.582; 20–60 °C ξ ≥ 0.500; 60–70 °C ξ ≥ 0.353; 70–150 °C ξ ≥ 0.300; 150–200 °C ξ ≥ 0.200. Outside these steps a "model-extrapolated" warning is returned.',
    'Enthalpy data, lowest water fraction by temperature: 0–4 °C 0.78; 4–10 °C 0.68; 10–15 °C 0.58; 15–26 °C 0.54; 26–37 °C 0.44; 37–48 °C 0.40; 48–60 °C 0.34; 60–71 °C 0.30; 71–82 °C 0.28; 82–93 °C 0.24; 93–204 °C 0.22.',
    'Boiling-point rise = the fit’s boiling point at the solution minus its own pure-water boiling point at the same pressure, added to IF97 T_sat(p); the fit’s pure-water error (0.04 K at 101.325 kPa, 0.14 K at 5 kPa) cancels, so the rise is 0 for pure water.',
    'Viscosity (Laliberté 2007, 2009 parameters): data 12.5–70 °C, x ≤ 0.56; density (Laliberté and Cooper 2004, 2009 parameters): data 4–120 °C, x ≤ 0.503. Outside these a "model-extrapolated" warning names the property; the hard limits stay those of the model.',
    'Thermal conductivity (Riedel 1951, additive ionic rule on IAPWS water): silent at 10–30 °C and x ≤ 0.10 (about 2.8 mol/L), near Riedel’s 20 °C data at moderate concentration; elsewhere a "model-extrapolated" warning names it (the temperature dependence is water’s, by the method). Refused above x = 0.50, where the molarity would leave the density data (x ≤ 0.503).',
    'Surface tension and the crystallisation (hydrate solubility) limit are not provided by this model.',
  ],
};

const limits: ValidityBox = {
  massFraction: X_LIMITS,
  temperature: T_LIMITS,
  pressure: P_LIMITS,
  notes: [
    'Beyond x = 0.80, below 0 °C, above 250 °C, or at a pressure where the boiling point would leave 0–250 °C, the model refuses with a range error.',
  ],
};

const sources: Citation[] = [
  {
    key: 'olsson-1997',
    reference:
      'M. Olsson, Å. Jernqvist, G. Aly, "Thermophysical properties of aqueous NaOH–H2O solutions at high concentrations", International Journal of Thermophysics 18(3) (1997)',
  },
  {
    key: 'laliberte-2007',
    reference:
      'M. Laliberté, "Model for calculating the viscosity of aqueous solutions", Journal of Chemical & Engineering Data 52 (2007) 321–335 (viscosity)',
  },
  {
    key: 'laliberte-cooper-2004',
    reference:
      'M. Laliberté, W. E. Cooper, "Model for calculating the density of aqueous electrolyte solutions", Journal of Chemical & Engineering Data 49 (2004) 1141–1151 (density)',
  },
  {
    key: 'laliberte-2009',
    reference:
      'M. Laliberté, "A model for calculating the heat capacity of aqueous solutions, with updated density and viscosity data", Journal of Chemical & Engineering Data 54 (2009) 1725–1760 (the NaOH density and viscosity parameters used)',
  },
  {
    key: 'riedel-1951',
    reference:
      'L. Riedel, "Die Wärmeleitfähigkeit von wäßrigen Lösungen starker Elektrolyte", Chemie-Ingenieur-Technik 23 (1951) 59–64; additive ionic rule and coefficients as given in R.C. Reid, J.M. Prausnitz, B.E. Poling, The Properties of Gases and Liquids, 4th ed., McGraw-Hill (1987), section 10-13 (thermal conductivity; coefficients from memory)',
  },
  if97CitationFor('pure-water saturation temperature for the boiling-point rise; water density'),
  {
    key: 'iapws-r12-08',
    reference:
      'IAPWS R12-08, Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water Substance (water viscosity)',
  },
  {
    key: 'iapws-r15-11',
    reference:
      'IAPWS R15-11, Release on the IAPWS Formulation 2011 for the Thermal Conductivity of Ordinary Water Substance (water conductivity)',
  },
];

function checkMassFraction(x: number, warnings: WarningSink): void {
  checkAgainst(MODEL_ID, 'massFraction', x, 'kg NaOH/kg solution', X_VALID, X_LIMITS, warnings);
}

function warnOutsideStaircase(
  x: number,
  temperatureCelsius: number,
  minWaterFraction: number,
  property: string,
  warnings: WarningSink,
): void {
  const xMax = 1 - minWaterFraction;
  if (x > xMax) {
    addWarning(warnings, {
      code: 'model-extrapolated',
      field: 'massFraction',
      message: `massFraction = ${x} kg NaOH/kg solution at ${temperatureCelsius.toFixed(1)} °C lies outside the ${MODEL_ID} model's ${property} data (up to ${xMax.toFixed(3)} at this temperature); the result is extrapolated`,
      validRange: { min: 0, max: xMax, unit: 'kg NaOH/kg solution' },
    });
  }
}

/** Pressures (Pa) between which the boiling point of x lies in the 0–250 °C hard limits. */
function pressureLimitsFor(x: number): Interval {
  const xi = 1 - x;
  const { a3 } = vaporPressureParameters(xi);
  const low = a3 < 0 ? olssonVaporPressureKPa(xi, 0) * KPA : 0;
  return {
    min: Math.max(IF97.minPressure, low),
    max: olssonVaporPressureKPa(xi, 250) * KPA,
  };
}

function boilingPoint(massFraction: number, pressure: number, warnings?: WarningSink): number {
  checkMassFraction(massFraction, warnings);
  const range = pressureLimitsFor(massFraction);
  if (!Number.isFinite(pressure) || pressure < range.min || pressure > range.max) {
    throw new EngineRangeError(
      'pressure',
      pressure,
      { min: range.min, max: range.max, unit: 'Pa' },
      `pressure = ${pressure} Pa is outside the range of the ${MODEL_ID} model at massFraction = ${massFraction} (${range.min.toPrecision(5)} to ${range.max.toPrecision(5)} Pa, boiling points 0–250 °C)`,
      undefined,
      `the ${MODEL_ID} model covers boiling points of 0 to 250 °C at this mass fraction`,
    );
  }
  checkAgainst(MODEL_ID, 'pressure', pressure, 'Pa', P_VALID, P_LIMITS, warnings);
  // The rise is taken within the one correlation (solution minus its own pure-water line at the
  // same pressure) and added to IF97's T_sat, so the fit's pure-water error (−0.04 K at
  // 101.325 kPa, −0.14 K at 5 kPa) cancels and the rise is exactly 0 at x = 0.
  const rise =
    olssonBoilingTemperatureCelsius(1 - massFraction, pressure / KPA) -
    olssonBoilingTemperatureCelsius(1, pressure / KPA);
  const temperature = saturationTemperature(pressure) + rise;
  const t = temperature - KELVIN_OFFSET;
  checkAgainst(MODEL_ID, 'temperature', temperature, 'K', T_VALID_BOILING, T_LIMITS, warnings);
  warnOutsideStaircase(massFraction, t, olssonVaporPressureMinWaterFraction(t), 'vapour-pressure', warnings);
  return temperature;
}

/** Data boxes of the Laliberté parameters for NaOH (Laliberté 2009, its NaOH rows). */
const VISCOSITY_BOX: ValidityBox = {
  massFraction: { min: 0, max: 0.56 },
  temperature: { min: C(12.5), max: C(70) },
};
const DENSITY_BOX: ValidityBox = {
  massFraction: { min: 0, max: 0.503 },
  temperature: { min: C(4), max: C(120) },
};
/**
 * Where Riedel's rule is used silently: 20 ± 10 °C (his data were near 20 °C) and x ≤ 0.10
 * (≈ 2.8 mol/L, a moderate concentration). Its hard limit in x is 0.50: the molarity needs the
 * density at 20 °C, whose data end at x = 0.503.
 */
const CONDUCTIVITY_BOX: ValidityBox = {
  massFraction: { min: 0, max: 0.1 },
  temperature: { min: C(10), max: C(30) },
};
const CONDUCTIVITY_X_LIMITS: Interval = { min: 0, max: 0.5 };

/** Hard limits of the model, a warning naming the property outside its own data box. */
function checkTransportInputs(
  box: ValidityBox,
  property: string,
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
  massFractionLimits: Interval = X_LIMITS,
): number {
  checkPropertyBox(
    MODEL_ID,
    property,
    box,
    { massFraction: massFractionLimits, temperature: T_LIMITS },
    massFraction,
    temperature,
    warnings,
    'kg NaOH/kg solution',
  );
  return temperature - KELVIN_OFFSET;
}

function checkEnthalpyInputs(massFraction: number, temperature: number, warnings: WarningSink): number {
  checkMassFraction(massFraction, warnings);
  checkAgainst(MODEL_ID, 'temperature', temperature, 'K', T_VALID_ENTHALPY, T_LIMITS, warnings);
  const t = temperature - KELVIN_OFFSET;
  warnOutsideStaircase(massFraction, t, olssonEnthalpyMinWaterFraction(t), 'enthalpy', warnings);
  return t;
}

/**
 * Aqueous sodium hydroxide, Olsson, Jernqvist and Aly (1997).
 *
 * - boilingPointRise(x, p) = t_Olsson(ξ, p) − t_Olsson(ξ = 1, p): Olsson's vapour-pressure
 *   equation solved for t (no iteration) at the solution's and at pure water's composition, so
 *   the rise comes from one correlation and the fit's pure-water error (−0.04 K at 101.325 kPa,
 *   −0.14 K at 5 kPa against IF97) cancels; the rise is 0 at x = 0 and never negative.
 * - boilingPoint(x, p) = T_sat,IF97(p) + that rise: the liquor boiling point the rest of the
 *   engine uses with IF97 vapour properties (T − T_sat is the vapour's superheat). The model's
 *   boilingPointRise is the default of {@link defineLiquorModel}, boilingPoint − T_sat, which
 *   returns the rise taken within Olsson's correlation.
 * - enthalpy, heatCapacity: Olsson's enthalpy polynomial and its t-derivative, kJ → J.
 */
export const sodiumHydroxide: LiquorModel = defineLiquorModel({
  id: MODEL_ID,
  name: 'Sodium hydroxide solution (caustic soda)',
  kind: 'built-in',
  compositionVariable: 'mass fraction of NaOH (kg NaOH per kg solution)',
  validity,
  limits,
  sources,
  cautions: [
    {
      code: 'hot-caustic-burns',
      message:
        'Hot concentrated sodium hydroxide causes severe chemical and thermal burns and permanent eye damage on contact; boiling caustic can spatter. Use full face and body protection and design for containment.',
    },
    {
      code: 'caustic-stress-corrosion-cracking',
      message:
        'Hot strong caustic causes stress-corrosion cracking of carbon steel ("caustic embrittlement"), especially in welded or stressed parts; check the materials of construction and any stress relief against the temperature and concentration.',
    },
    {
      code: 'caustic-crystallisation',
      message:
        'Strong caustic solutions crystallise (hydrates) on cooling: a 50 % solution freezes near 12 °C (common practice). This model gives no solubility limit; keep lines and tanks traced and check the product temperature.',
    },
  ],

  boilingPoint,

  enthalpy(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkEnthalpyInputs(massFraction, temperature, warnings);
    return olssonEnthalpyKJPerKg(1 - massFraction, t) * KJ;
  },

  heatCapacity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkEnthalpyInputs(massFraction, temperature, warnings);
    return olssonHeatCapacityKJPerKgK(1 - massFraction, t) * KJ;
  },

  transportValidity: {
    viscosity: VISCOSITY_BOX,
    density: DENSITY_BOX,
    thermalConductivity: CONDUCTIVITY_BOX,
  },

  /**
   * Laliberté's mixing rule on IAPWS R12-08 water (saturated liquid at T), mPa·s → Pa·s. Beyond
   * 70 °C, where evaporators run, the value is extrapolated and says so.
   */
  viscosity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkTransportInputs(VISCOSITY_BOX, 'viscosity', massFraction, temperature, warnings);
    return laliberteNaohViscosityMPaS(massFraction, t, liquidViscosity(temperature) * 1e3) * 1e-3;
  },

  /** Laliberté and Cooper's volume addition on IF97 water (saturated liquid at T), kg/m³. */
  density(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkTransportInputs(DENSITY_BOX, 'density', massFraction, temperature, warnings);
    return laliberteNaohDensity(massFraction, t, saturatedLiquidAtTemperature(temperature).density);
  },

  /**
   * Riedel's additive rule on IAPWS R15-11 water (saturated liquid at T), the molarity from
   * Laliberté and Cooper's density at 20 °C, W/(m·K). k is IAPWS water's at x = 0.
   */
  thermalConductivity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkTransportInputs(
      CONDUCTIVITY_BOX,
      'thermal conductivity',
      massFraction,
      temperature,
      warnings,
      CONDUCTIVITY_X_LIMITS,
    );
    const t20 = RIEDEL_REFERENCE_TEMPERATURE;
    const density20 = laliberteNaohDensity(
      massFraction,
      t20 - KELVIN_OFFSET,
      saturatedLiquidAtTemperature(t20).density,
    );
    return riedelNaohThermalConductivity(
      naohMolarity(massFraction, density20),
      liquidThermalConductivity(temperature),
      liquidThermalConductivity(t20),
    );
  },
});
