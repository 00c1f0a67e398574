/**
 * Built-in liquor "sucrose": aqueous solutions of pure sucrose (sugar juices and syrups treated
 * as pure). Composition variable x = mass fraction of sucrose (≈ °Bx / 100).
 *
 * Boiling point from water activity (Starzak and Peacock 1997) and IAPWS-IF97 p_sat; heat capacity
 * from the sugar-industry correlation of Lyle; solubility of pure sucrose from Vavrinecz (1962).
 * Each correlation is a small pure function (SI in, SI out, no range checks), wrapped into the
 * {@link LiquorModel} `sucrose`, which applies the validity rule.
 */
import { EngineNoSolutionError, EngineRangeError } from '../errors.js';
import {
  if97CitationFor,
  saturatedLiquidAtTemperature,
  saturationPressure,
  saturationTemperature,
} from '../steam/if97.js';
import { addWarning, KELVIN_OFFSET, type Citation, type EngineCaution, type WarningSink } from '../types.js';
import { defineLiquorModel, type Interval, type LiquorModel, type ValidityBox } from './model.js';
import { checkAgainst, checkPropertyBox } from './validity.js';
import { brent } from '../numeric/roots.js';

const MODEL_ID = 'sucrose';

/** Molar mass of sucrose C12H22O11, kg/mol (Starzak and Peacock use 342.30 g/mol). */
export const SUCROSE_MOLAR_MASS = 0.3423;
/** Molar mass of water, kg/mol (18.015 g/mol, as used with the Starzak–Peacock equation). */
export const WATER_MOLAR_MASS = 0.018015;
/** Molar gas constant, J/(mol·K) (CODATA 2018, exact). */
const GAS_CONSTANT = 8.314462618;

/**
 * Mole fraction of sucrose in a solution of mass fraction x.
 *
 *   x_s = (x/M_s)/(x/M_s + (1 − x)/M_w),  M_s = 342.30 g/mol, M_w = 18.015 g/mol
 *
 * Validity: 0 ≤ x < 1.
 * Source: definition; molar masses as Starzak and Peacock (1997) use them.
 *
 * @param massFraction x, kg sucrose per kg solution
 * @returns x_s, mol sucrose per mol solution
 * @example sucroseMoleFraction(0.2550) // ≈ 0.017695 (about 1 mol/kg, for which x_s = 1/(1 + 1000/18.015) = 0.017696)
 */
export function sucroseMoleFraction(massFraction: number): number {
  const ns = massFraction / SUCROSE_MOLAR_MASS;
  const nw = (1 - massFraction) / WATER_MOLAR_MASS;
  return ns / (ns + nw);
}

/**
 * Activity coefficient of water in aqueous sucrose (Starzak and Peacock 1997).
 *
 *   ln γ_w = (Q/(R·T))·(1 + a·x_s + b·x_s²)·x_s²
 *
 * x_s = mole fraction of sucrose ({@link sucroseMoleFraction}), Q = −17638 J/mol, a = −1.0038,
 * b = −0.24653. Fitted to a century of vapour-pressure, boiling-point, osmotic and freezing-point
 * data.
 *
 * Validity: about 0–90 % sucrose by mass, 0–120 °C (from memory).
 * Source: Z. Starzak, S.D. Peacock, "Water activity coefficient in aqueous solutions of sucrose —
 * a comprehensive data analysis", Zuckerindustrie 122 (1997) 380–387 (page numbers from memory).
 *
 * @param massFraction x, kg sucrose per kg solution
 * @param temperature T, K
 * @returns γ_w (dimensionless, < 1)
 * @example starzakPeacockWaterActivityCoefficient(0.2550, 298.15) // ≈ 0.99781
 */
export function starzakPeacockWaterActivityCoefficient(massFraction: number, temperature: number): number {
  const xs = sucroseMoleFraction(massFraction);
  const q = -17638;
  const a = -1.0038;
  const b = -0.24653;
  return Math.exp((q / (GAS_CONSTANT * temperature)) * (1 + a * xs + b * xs * xs) * xs * xs);
}

/**
 * Water activity of aqueous sucrose (Starzak and Peacock 1997).
 *
 *   a_w = γ_w·(1 − x_s)   (γ_w from {@link starzakPeacockWaterActivityCoefficient})
 *
 * Validity: as {@link starzakPeacockWaterActivityCoefficient}.
 * Source: Z. Starzak, S.D. Peacock, "Water activity coefficient in aqueous solutions of sucrose —
 * a comprehensive data analysis", Zuckerindustrie 122 (1997) 380–387 (page numbers from memory).
 *
 * @param massFraction x, kg sucrose per kg solution
 * @param temperature T, K
 * @returns a_w (dimensionless, 0–1)
 * @example starzakPeacockWaterActivity(0.2550, 298.15) // 1 mol/kg: ≈ 0.980 (Robinson and Stokes, Electrolyte Solutions, 2nd ed. 1959, appendix table: 0.9806)
 */
export function starzakPeacockWaterActivity(massFraction: number, temperature: number): number {
  return (
    starzakPeacockWaterActivityCoefficient(massFraction, temperature) *
    (1 - sucroseMoleFraction(massFraction))
  );
}

/**
 * Boiling temperature of aqueous sucrose at pressure p: the root T of
 *
 *   a_w(x, T)·p_sat,IF97(T) = p
 *
 * with a_w from Starzak and Peacock (1997). The root is bracketed upward from T_sat(p) (where the
 * residual is negative for x > 0, since a_w < 1) by doubling steps, then found by Brent's method
 * to 1e−9 K. No range checks here.
 *
 * The relation p_w = a_w·p_sat treats the vapour as an ideal gas. Exact thermodynamics (equal
 * chemical potentials, i.e. fugacities) gives a rise larger by about 1/Z of saturated steam:
 * +1.6 % of the BPR at 101 kPa, +0.5 % at 20 kPa (Z from IF97 v_g). Whether Starzak and Peacock
 * reduced their boiling-point data the same way is not known here; the method is kept as the
 * domain note prescribes it.
 *
 * Validity: as {@link starzakPeacockWaterActivityCoefficient}, at pressures in the IF97 saturation
 * range.
 * Source: Z. Starzak, S.D. Peacock, "Water activity coefficient in aqueous solutions of sucrose —
 * a comprehensive data analysis", Zuckerindustrie 122 (1997) 380–387 (page numbers from memory). IF97 p_sat from ../steam/if97.ts.
 *
 * @param massFraction x, kg sucrose per kg solution
 * @param pressure p, Pa
 * @param maxTemperature upper end of the search, K (default 600 K)
 * @returns boiling temperature, K
 * @example sucroseBoilingTemperature(0.6, 101325) // ≈ 376.062 K (a rise of 2.94 K over IF97's 373.124 K)
 */
export function sucroseBoilingTemperature(
  massFraction: number,
  pressure: number,
  maxTemperature = 600,
): number {
  const tWater = saturationTemperature(pressure);
  if (massFraction === 0) return tWater;
  const residual = (t: number): number =>
    starzakPeacockWaterActivity(massFraction, t) * saturationPressure(t) - pressure;
  let lo = tWater;
  let step = 1;
  let hi = Math.min(tWater + step, maxTemperature);
  while (residual(hi) < 0) {
    if (hi >= maxTemperature) {
      throw new EngineNoSolutionError(
        `sucrose at mass fraction ${massFraction} does not boil below ${maxTemperature} K at ${pressure} Pa`,
        { reason: 'no-bracket' },
      );
    }
    lo = hi;
    step *= 2;
    hi = Math.min(tWater + step, maxTemperature);
  }
  return brent(residual, lo, hi, { tol: 1e-9 });
}

/** Purity used with Lyle's correlation: pure sucrose, 100 % sucrose on dry substance. */
const PURITY = 100;

/**
 * Specific heat capacity of sugar solutions (Lyle 1957).
 *
 *   c_p = 4.1868 − 0.0297·B + 4.6e−5·P·B + 7.5e−5·B·t   [kJ/(kg·K)]
 *
 * B = dry substance, °Bx (100·x); P = purity, % (100 for pure sucrose); t in °C. Linear in t, so
 * enthalpy integrates analytically.
 *
 * Validity: about 0–80 °Bx, 0–100 °C, accuracy of the order of 1–2 % (from memory).
 * Source: O. Lyle, Technology for Sugar Refinery Workers, 3rd ed., Chapman & Hall (1957), as quoted
 * in sugar-technology handbooks (equation from memory).
 *
 * @param massFraction x, kg sucrose per kg solution
 * @param temperature T, K
 * @returns c_p, J/(kg·K)
 * @example lyleHeatCapacity(0, 330) // → 4186.8 J/(kg·K) (pure water: 1 cal_IT/(g·K))
 * @example lyleHeatCapacity(0.6, 353.15) // ≈ 3040.8 J/(kg·K)
 */
export function lyleHeatCapacity(massFraction: number, temperature: number): number {
  const bx = 100 * massFraction;
  const t = temperature - KELVIN_OFFSET;
  return 1000 * (4.1868 - 0.0297 * bx + 4.6e-5 * PURITY * bx + 7.5e-5 * bx * t);
}

/** Steam-table datum: liquid water at the triple point, 273.16 K. */
const DATUM_TEMPERATURE = 273.16;

/**
 * Enthalpy of aqueous sucrose minus that of pure water at the same temperature, from Lyle's c_p
 * ({@link lyleHeatCapacity}) integrated from the steam-table datum (liquid at 273.16 K, where both
 * are taken as zero).
 *
 *   Δh = ∫ [c_p(x, t) − c_p(0, t)] dt  from 0.01 °C to t
 *      = 1000·B·[(−0.0297 + 4.6e−5·P)·(t − 0.01) + 7.5e−5·(t² − 0.01²)/2]   [J/kg]
 *
 * The heat of dilution (mixing) is neglected: the solution at 0.01 °C is given the enthalpy of its
 * components there. The Starzak–Peacock activity model, read as a temperature-independent excess
 * Gibbs energy, implies an excess enthalpy of a few kJ/kg at 60–70 °Bx (our estimate), about 1 %
 * of the sensible enthalpy at evaporator temperatures.
 *
 * Validity: as {@link lyleHeatCapacity}.
 * Source: Lyle (1957) (see {@link lyleHeatCapacity}), integrated here.
 *
 * @param massFraction x, kg sucrose per kg solution
 * @param temperature T, K
 * @returns h − h_w, J/kg
 * @example lyleEnthalpyDifference(0.6, 353.15) // ≈ -106065 J/kg
 */
export function lyleEnthalpyDifference(massFraction: number, temperature: number): number {
  const bx = 100 * massFraction;
  const t = temperature - KELVIN_OFFSET;
  const t0 = DATUM_TEMPERATURE - KELVIN_OFFSET;
  return 1000 * bx * ((-0.0297 + 4.6e-5 * PURITY) * (t - t0) + (7.5e-5 * (t * t - t0 * t0)) / 2);
}

/**
 * Solubility of pure sucrose in water (Vavrinecz 1962, the solubility equation in general use in
 * sugar technology).
 *
 *   w = 64.447 + 0.08222·t + 1.6169e−3·t² − 1.558e−6·t³ − 4.63e−8·t⁴   [g sucrose/100 g solution]
 *
 * Validity: 0–100 °C (t in °C). Above about 130 °C the quartic turns over, so the model refuses it
 * there.
 * Source: G. Vavrinecz, "Neue Tabelle über die Löslichkeit reiner Saccharose in Wasser",
 * Zeitschrift für die Zuckerindustrie 12 (1962) 481–487 (coefficients from memory).
 *
 * @param temperature T, K
 * @returns mass fraction of sucrose in the saturated solution, kg/kg
 * @example vavrineczSolubility(293.15) // ≈ 0.667 (Mohos, Confectionery and Chocolate Engineering, 2010, Table A2.3: 67.09 % at 20 °C)
 */
export function vavrineczSolubility(temperature: number): number {
  const t = temperature - KELVIN_OFFSET;
  return (64.447 + t * (0.08222 + t * (1.6169e-3 + t * (-1.558e-6 + t * -4.63e-8)))) / 100;
}

/**
 * Viscosity of pure sucrose solutions (Genotelle 1978, the sugar industry's usual correlation).
 *
 *   log10(μ/(mPa·s)) = 22.46·N − 0.114 + φ·(1.1 + 43.1·N^1.25)
 *   N = w/(1900 − 18·w)  (w = dry substance, % by mass),  φ = (30 − t)/(91 + t)  (t in °C)
 *
 * Its pure-water limit is not IAPWS water: −3.5 % at 20 °C, +3.7 % at 80 °C (measured against
 * R12-08), negligible beside the solutions' own viscosity once w passes about 20 %.
 *
 * Validity: 0–86 % dry substance, 0–80 °C (range from memory).
 * Source: J. Genotelle, "Expression de la viscosité des solutions sucrées", Industries Alimentaires
 * et Agricoles 95 (1978) 747–755, as given in M. Mathlouthi, P. Reiser (eds.), Sucrose: Properties
 * and Applications, Blackie, Glasgow (1995), eq. 6.29 (page and equation number from the
 * open-source code that cites it; coefficients checked there).
 *
 * @param massFraction x, kg sucrose per kg solution (0–0.86)
 * @param temperature T, K
 * @returns μ, Pa·s
 * @example genotelleViscosity(0.6, 293.15) // ≈ 0.05974 Pa·s (sugar tables give about 0.0585 Pa·s for 60 % at 20 °C, from memory)
 */
export function genotelleViscosity(massFraction: number, temperature: number): number {
  const w = 100 * massFraction;
  const n = w / (1900 - 18 * w);
  const t = temperature - KELVIN_OFFSET;
  const phi = (30 - t) / (91 + t);
  return 10 ** (22.46 * n - 0.114 + phi * (1.1 + 43.1 * n ** 1.25)) * 1e-3;
}

/** Laliberté (2009) parameters c0…c4 of sucrose in his density model (15–55 °C, w ≤ 0.507). */
const SUCROSE_DENSITY = [
  532.919899042424, 13692.5881480438, 12.6127261369233, 0.0266415899284128, 649.049186827162,
] as const;

/**
 * Density of sucrose solutions: Laliberté and Cooper's apparent-specific-volume model with the
 * sucrose parameters that Laliberté (2009) fitted (the digits checked in the open-source
 * `chemicals` library's transcription of that table, Laliberte2009.tsv), on IF97 water.
 *
 *   1/ρ = (1 − w)/ρ_w + w·v_app,  v_app = (w + c2 + c3·t)/[(c0·w + c1)·exp(1e−6·(t + c4)²)]
 *
 * c0…c4 = 532.9199, 13692.588, 12.612726, 0.02664159, 649.0492; t in °C, ρ_w in kg/m³.
 *
 * Validity: 15–55 °C, w ≤ 0.507 (the sucrose data behind the parameters); above 50 % it is
 * extrapolated (0.15 % below the sugar tables at 70 %, 20 °C; from memory).
 * Source: M. Laliberté, W.E. Cooper, J. Chem. Eng. Data 49 (2004) 1141–1151 (model); M. Laliberté,
 * J. Chem. Eng. Data 54 (2009) 1725–1760 (parameters).
 *
 * @param massFraction w, kg sucrose per kg solution
 * @param temperature T, K (IF97 saturated liquid gives ρ_w)
 * @returns ρ, kg/m³
 * @example laliberteSucroseDensity(0.5, 293.15) // ≈ 1229.5 kg/m³ (sugar tables: 1229.6 kg/m³ at 50 %, 20 °C, from memory)
 */
export function laliberteSucroseDensity(massFraction: number, temperature: number): number {
  const [c0, c1, c2, c3, c4] = SUCROSE_DENSITY;
  const w = massFraction;
  const t = temperature - KELVIN_OFFSET;
  const apparentVolume = (w + c2 + c3 * t) / ((c0 * w + c1) * Math.exp(1e-6 * (t + c4) ** 2));
  return 1 / ((1 - w) / saturatedLiquidAtTemperature(temperature).density + w * apparentVolume);
}

/**
 * Thermal conductivity of a sucrose solution by Choi and Okos' rule for foods: the components'
 * conductivities weighted by their volume fractions, with sucrose as their "carbohydrate".
 *
 *   k = Σ k_i·φ_i,  φ_i = (w_i/ρ_i)/Σ(w_j/ρ_j)   [W/(m·K)],  t in °C
 *   k_water = 0.57109 + 1.7625e−3·t − 6.7036e−6·t²,  ρ_water = 997.18 + 3.1439e−3·t − 3.7574e−3·t²
 *   k_carb  = 0.20141 + 1.3874e−3·t − 4.3312e−6·t²,  ρ_carb  = 1599.1 − 0.31046·t
 *
 * Component conductivities and the water density checked in an open-source implementation of
 * the paper (a MATLAB food-process library); the carbohydrate density from memory. Its water
 * conductivity is 1 % above IAPWS at 20 °C, 0.3 % at 50–100 °C.
 *
 * Validity: −40 to 150 °C (the component fits, from memory); a predictive rule, not a fit to
 * sucrose data.
 * Source: Y. Choi, M.R. Okos, "Effects of temperature and composition on the thermal properties
 * of foods", in M. Le Maguer, P. Jelen (eds.), Food Engineering and Process Applications, vol. 1,
 * Elsevier Applied Science, London (1986) 93–101 (editors and pages from memory).
 *
 * @param massFraction x, kg sucrose per kg solution
 * @param temperature T, K
 * @returns k, W/(m·K)
 * @example choiOkosSucroseThermalConductivity(0.6, 293.15) // ≈ 0.4216 W/(m·K)
 */
export function choiOkosSucroseThermalConductivity(massFraction: number, temperature: number): number {
  const t = temperature - KELVIN_OFFSET;
  const kWater = 0.57109 + 1.7625e-3 * t - 6.7036e-6 * t * t;
  const kCarb = 0.20141 + 1.3874e-3 * t - 4.3312e-6 * t * t;
  const rhoWater = 997.18 + 3.1439e-3 * t - 3.7574e-3 * t * t;
  const rhoCarb = 1599.1 - 0.31046 * t;
  const vWater = (1 - massFraction) / rhoWater;
  const vCarb = massFraction / rhoCarb;
  return (kWater * vWater + kCarb * vCarb) / (vWater + vCarb);
}

const MASS_FRACTION_VALIDITY: Interval = { min: 0, max: 0.85 };
const MASS_FRACTION_LIMITS: Interval = { min: 0, max: 0.95 };
const TEMPERATURE_VALIDITY: Interval = { min: 273.15, max: 393.15 };
const TEMPERATURE_LIMITS: Interval = { min: 273.15, max: 423.15 };
const HEAT_CAPACITY_MASS_FRACTION: Interval = { min: 0, max: 0.8 };
const HEAT_CAPACITY_TEMPERATURE: Interval = { min: 273.15, max: 373.15 };
const SOLUBILITY_VALIDITY: Interval = { min: 273.15, max: 373.15 };
const SOLUBILITY_LIMITS: Interval = { min: 273.15, max: 403.15 };
/** The box of each transport property's source (see the correlations above). */
const TRANSPORT_BOXES = {
  viscosity: { massFraction: { min: 0, max: 0.86 }, temperature: { min: 273.15, max: 353.15 } },
  density: { massFraction: { min: 0, max: 0.507 }, temperature: { min: 288.15, max: 328.15 } },
  thermalConductivity: { massFraction: { ...MASS_FRACTION_LIMITS }, temperature: { ...TEMPERATURE_LIMITS } },
} as const;
const PROPERTY_WORDS = {
  viscosity: 'viscosity',
  density: 'density',
  thermalConductivity: 'thermal conductivity',
};

function checkTransport(
  property: keyof typeof TRANSPORT_BOXES,
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
): void {
  checkPropertyBox(
    MODEL_ID,
    PROPERTY_WORDS[property],
    TRANSPORT_BOXES[property],
    { massFraction: MASS_FRACTION_LIMITS, temperature: TEMPERATURE_LIMITS },
    massFraction,
    temperature,
    warnings,
  );
}
/** Pressures at which pure water boils inside the temperature box. */
const PRESSURE_VALIDITY: Interval = {
  min: saturationPressure(TEMPERATURE_VALIDITY.min),
  max: saturationPressure(TEMPERATURE_VALIDITY.max),
};
const PRESSURE_LIMITS: Interval = {
  min: saturationPressure(TEMPERATURE_LIMITS.min),
  max: saturationPressure(TEMPERATURE_LIMITS.max),
};

const validity: ValidityBox = {
  massFraction: { ...MASS_FRACTION_VALIDITY },
  temperature: { ...TEMPERATURE_VALIDITY },
  pressure: { ...PRESSURE_VALIDITY },
  notes: [
    'Water activity (Starzak and Peacock 1997): about 0-0.85 kg/kg and 0-120 °C (data range from memory).',
    'Heat capacity and enthalpy (Lyle): 0-0.80 kg/kg, 0-100 °C (from memory); heat of dilution neglected.',
    'Solubility (Vavrinecz 1962): 0-100 °C; extrapolated to 130 °C.',
    'Viscosity (Genotelle 1978): 0-0.86 kg/kg, 0-80 °C; density (Laliberté 2009 parameters): 0-0.507 kg/kg, 15-55 °C; thermal conductivity (Choi and Okos 1986, a predictive rule for foods): -40 to 150 °C. Outside these a "model-extrapolated" warning names the property.',
    'Pure sucrose: impurities (non-sugars) raise the boiling point further and change the solubility and the viscosity.',
  ],
};
const limits: ValidityBox = {
  massFraction: { ...MASS_FRACTION_LIMITS },
  temperature: { ...TEMPERATURE_LIMITS },
  pressure: { ...PRESSURE_LIMITS },
};

const sources: Citation[] = [
  {
    key: 'starzak-peacock-1997',
    reference:
      'M. Starzak, S. D. Peacock, "Water activity coefficient in aqueous solutions of sucrose - a comprehensive data analysis", Zuckerindustrie 122 (1997)',
  },
  {
    key: 'lyle-1957',
    reference:
      'O. Lyle, "Technology for Sugar Refinery Workers", Chapman & Hall, London (heat capacity of sugar solutions)',
  },
  {
    key: 'vavrinecz-1962',
    reference:
      'G. Vavrinecz, "Neue Tabelle über die Löslichkeit reiner Saccharose in Wasser", Zeitschrift für die Zuckerindustrie 12 (1962) 481-487',
  },
  {
    key: 'genotelle-1978',
    reference:
      'J. Genotelle, "Expression de la viscosité des solutions sucrées", Industries Alimentaires et Agricoles 95 (1978) 747-755 (viscosity)',
  },
  {
    key: 'laliberte-2009',
    reference:
      'M. Laliberté, W. E. Cooper, "Model for calculating the density of aqueous electrolyte solutions", Journal of Chemical & Engineering Data 49 (2004) 1141-1151, with the sucrose parameters of M. Laliberté, Journal of Chemical & Engineering Data 54 (2009) 1725-1760 (density)',
  },
  {
    key: 'choi-okos-1986',
    reference:
      'Y. Choi, M. R. Okos, "Effects of temperature and composition on the thermal properties of foods", in Food Engineering and Process Applications, vol. 1, Elsevier Applied Science (1986) (thermal conductivity)',
  },
  if97CitationFor('water vapour pressure and pure-water parts'),
];

const cautions: EngineCaution[] = [
  {
    code: 'hot-syrup',
    message:
      'Hot concentrated syrup sticks to skin and causes deep burns; handle boiling sugar solutions with face and hand protection.',
  },
  {
    code: 'sucrose-degradation',
    message:
      'Sucrose inverts and colours at high temperature, low pH and long residence time; keep juice temperatures and hold-up times as low as the process allows.',
  },
];

function checkMassFraction(value: number, range: Interval, warnings: WarningSink): void {
  checkAgainst(MODEL_ID, 'massFraction', value, 'kg/kg', range, MASS_FRACTION_LIMITS, warnings);
}

function checkTemperature(value: number, range: Interval, warnings: WarningSink): void {
  checkAgainst(MODEL_ID, 'temperature', value, 'K', range, TEMPERATURE_LIMITS, warnings);
}

/** Warns when x is above pure-sucrose solubility at T (supersaturated: crystals may form). */
function checkSaturation(massFraction: number, temperature: number, warnings: WarningSink): void {
  if (!warnings || temperature < SOLUBILITY_LIMITS.min || temperature > SOLUBILITY_LIMITS.max) return;
  const limit = vavrineczSolubility(temperature);
  if (massFraction > limit) {
    addWarning(warnings, {
      code: 'above-solubility',
      field: 'massFraction',
      message: `massFraction = ${massFraction} kg/kg is above the solubility of pure sucrose at ${temperature.toFixed(2)} K (${limit.toFixed(4)} kg/kg): the solution is supersaturated and may crystallise`,
      template:
        '{field} = {x} is above the solubility of pure sucrose at {t} ({limit}): the solution is supersaturated and may crystallise',
      values: {
        x: { value: massFraction, kind: 'massFraction' },
        t: { value: temperature, kind: 'temperature' },
        limit: { value: limit, kind: 'massFraction' },
      },
      validRange: { min: 0, max: limit, unit: 'kg/kg' },
    });
  }
}

function boilingPoint(massFraction: number, pressure: number, warnings?: WarningSink): number {
  checkMassFraction(massFraction, MASS_FRACTION_VALIDITY, warnings);
  checkAgainst(MODEL_ID, 'pressure', pressure, 'Pa', PRESSURE_VALIDITY, PRESSURE_LIMITS, warnings);
  const t = sucroseBoilingTemperature(massFraction, pressure, TEMPERATURE_LIMITS.max + 100);
  if (t > TEMPERATURE_LIMITS.max) {
    throw new EngineRangeError(
      'pressure',
      pressure,
      { min: PRESSURE_LIMITS.min, max: PRESSURE_LIMITS.max, unit: 'Pa' },
      `sucrose at ${massFraction} kg/kg boils at ${t.toFixed(2)} K at ${pressure} Pa, above the model's ${TEMPERATURE_LIMITS.max} K limit; lower the pressure`,
      undefined,
      "at this pressure the solution would boil above the sucrose model's temperature limit; lower the pressure",
    );
  }
  checkTemperature(t, TEMPERATURE_VALIDITY, warnings);
  checkSaturation(massFraction, t, warnings);
  return t;
}

export const sucrose: LiquorModel = defineLiquorModel({
  id: MODEL_ID,
  name: 'Sucrose solution (sugar juice and syrup)',
  kind: 'built-in',
  compositionVariable: 'mass fraction of sucrose (kg/kg, about °Bx/100)',
  validity,
  limits,
  sources,
  cautions,

  boilingPoint,

  /** h = h_f,IF97(T) + Δh_Lyle(x, T): IF97 saturated liquid at T plus the sucrose increment, J/kg. */
  enthalpy(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkMassFraction(massFraction, HEAT_CAPACITY_MASS_FRACTION, warnings);
    checkTemperature(temperature, HEAT_CAPACITY_TEMPERATURE, warnings);
    checkSaturation(massFraction, temperature, warnings);
    return (
      saturatedLiquidAtTemperature(temperature).enthalpy + lyleEnthalpyDifference(massFraction, temperature)
    );
  },

  /** c_p = c_p,IF97(T) + [c_p,Lyle(x, T) − c_p,Lyle(0, T)], the derivative of `enthalpy`, J/(kg·K). */
  heatCapacity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkMassFraction(massFraction, HEAT_CAPACITY_MASS_FRACTION, warnings);
    checkTemperature(temperature, HEAT_CAPACITY_TEMPERATURE, warnings);
    const water = saturatedLiquidAtTemperature(temperature).heatCapacity;
    if (water === undefined) {
      throw new EngineNoSolutionError('IF97 gave no heat capacity for saturated liquid', {
        reason: 'missing-property',
      });
    }
    return water + lyleHeatCapacity(massFraction, temperature) - lyleHeatCapacity(0, temperature);
  },

  transportValidity: {
    viscosity: { ...TRANSPORT_BOXES.viscosity },
    density: { ...TRANSPORT_BOXES.density },
    thermalConductivity: { ...TRANSPORT_BOXES.thermalConductivity },
  },

  /** Genotelle (1978) as published (its own pure-water limit, see {@link genotelleViscosity}), Pa·s. */
  viscosity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkTransport('viscosity', massFraction, temperature, warnings);
    checkSaturation(massFraction, temperature, warnings);
    return genotelleViscosity(massFraction, temperature);
  },

  /** Laliberté's density model with his sucrose parameters, on IF97 water, kg/m³. */
  density(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkTransport('density', massFraction, temperature, warnings);
    return laliberteSucroseDensity(massFraction, temperature);
  },

  /** Choi and Okos' volume-fraction rule, W/(m·K). */
  thermalConductivity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    checkTransport('thermalConductivity', massFraction, temperature, warnings);
    return choiOkosSucroseThermalConductivity(massFraction, temperature);
  },

  /**
   * Solubility of pure sucrose, kg/kg (Vavrinecz 1962), 273.15–403.15 K. Between 373.15 and
   * 403.15 K the value is extrapolated (a "model-extrapolated" warning goes to the optional sink).
   */
  solubilityLimit(temperature: number, warnings?: WarningSink): number {
    checkAgainst(MODEL_ID, 'temperature', temperature, 'K', SOLUBILITY_VALIDITY, SOLUBILITY_LIMITS, warnings);
    return vavrineczSolubility(temperature);
  },
});
