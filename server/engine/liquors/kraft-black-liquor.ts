/**
 * Built-in liquor model "kraft-black-liquor": spent cooking liquor of the kraft pulping process,
 * described by its dry-solids mass fraction S (kg dry solids per kg liquor).
 *
 * Correlations (both as given in W.J. Frederick, "Black liquor properties", chapter 3 of
 * T.N. Adams (ed.), Kraft Recovery Boilers, TAPPI Press, Atlanta, 1997, which collects the work of
 * Frederick and co-workers). The coefficients below are recalled ("from memory"), not read from
 * the book on this project; they agree with the form quoted in our brief, but the two are not
 * independent. Check them against the book before relying on the model for design.
 *
 * Black liquors differ from mill to mill (wood species, cooking, inorganic content): Zaman,
 * McNally and Fricke (Ind. Eng. Chem. Res. 37 (1998) 275–283) measured liquors to 85 % solids and
 * found the BPR pressure-dependent, with a change of slope near 65 % solids where salts reach
 * their solubility limit. A generic correlation is a preliminary estimate; users with measured
 * data for their liquor should bring it as a custom (Dühring-table) liquor.
 *
 * Density and viscosity are generic correlations (see {@link blackLiquorDensity} and
 * {@link blackLiquorKinematicViscosity}); the viscosity always carries a warning that it is
 * liquor-specific. Thermal conductivity is the linear correlation in temperature and solids of the
 * kraft recovery literature (see {@link blackLiquorThermalConductivity}), flagged the same way.
 * Surface tension and a solubility (burkeite / sodium-salt crystallisation) limit are not provided.
 */
import { saturationPressure, saturationTemperature, IF97, if97CitationFor } from '../steam/if97.js';
import { addWarning, KELVIN_OFFSET, type Citation, type WarningSink } from '../types.js';
import { defineLiquorModel, type Interval, type LiquorModel, type ValidityBox } from './model.js';
import { checkAgainst, checkPropertyBox } from './validity.js';
import { EngineRangeError } from '../errors.js';

const MODEL_ID = 'kraft-black-liquor';

function requireSolids(solidsMassFraction: number): void {
  if (!Number.isFinite(solidsMassFraction) || solidsMassFraction < 0 || solidsMassFraction > 1) {
    throw new EngineRangeError('solidsMassFraction', solidsMassFraction, {
      min: 0,
      max: 1,
      unit: 'kg dry solids/kg liquor',
    });
  }
}

/**
 * Boiling-point rise of kraft black liquor at atmospheric pressure (Frederick 1997).
 *
 *   ΔT_atm = 6.173·S − 7.48·S^1.5 + 32.747·S²   [K]
 *
 * Validity: given for S up to about 0.5 (from memory); the model uses it with a warning up to 0.85.
 * Source: W.J. Frederick, "Black liquor properties", ch. 3 in T.N. Adams (ed.), Kraft Recovery
 * Boilers, TAPPI Press 1997 (coefficients from memory).
 *
 * @param solidsMassFraction S, kg dry solids per kg liquor (0–1)
 * @returns ΔT_atm, K (at 101.325 kPa, water boiling at 373.16 K in the source's notation)
 * @example frederickAtmosphericBoilingPointRise(0.5) // ≈ 8.63 K
 */
export function frederickAtmosphericBoilingPointRise(solidsMassFraction: number): number {
  requireSolids(solidsMassFraction);
  const s = solidsMassFraction;
  return 6.173 * s - 7.48 * s * Math.sqrt(s) + 32.747 * s * s;
}

/**
 * Pressure (boiling-temperature) correction of the black-liquor BPR (Frederick 1997).
 *
 *   ΔT(p) = ΔT_atm·[1 + 0.6·(T_b,water − 373.16)/373.16]
 *
 * Validity: the source's fitted range is not in our notes; the model trusts it for water boiling
 * temperatures of 50–150 °C (the usual multiple-effect train) and warns outside that.
 * Source: as {@link frederickAtmosphericBoilingPointRise} (from memory).
 *
 * @param waterBoilingTemperature T_b,water = T_sat(p) of pure water at the liquor's pressure, K (> 0)
 * @returns the dimensionless factor in square brackets
 * @example frederickBoilingPointRisePressureFactor(333.15) // ≈ 0.9357 (water boiling at 60 °C)
 */
export function frederickBoilingPointRisePressureFactor(waterBoilingTemperature: number): number {
  if (!Number.isFinite(waterBoilingTemperature) || waterBoilingTemperature <= 0) {
    throw new EngineRangeError('waterBoilingTemperature', waterBoilingTemperature, {
      min: 0,
      max: Number.POSITIVE_INFINITY,
      unit: 'K',
    });
  }
  return 1 + (0.6 * (waterBoilingTemperature - 373.16)) / 373.16;
}

/**
 * Isobaric specific heat capacity of kraft black liquor: ideal-mixture part plus an excess term
 * (Frederick 1997).
 *
 *   c_p = 4.216·(1 − S) + (1.675 + 3.31·t/1000)·S + (4.87 − 20·t/1000)·(1 − S)·S³   [kJ/(kg·K)]
 *
 * 4.216 kJ/(kg·K) stands for water, 1.675 + 3.31·t/1000 for the dry solids; the last term is the
 * excess heat capacity of the non-ideal solution (cf. Zaman, Tavares and Fricke, J. Chem. Eng.
 * Data 41 (1996) 266–271, who measured black-liquor heat capacities at 313–393 K and described
 * them by such an excess term).
 *
 * Validity: black-liquor data roughly 40–150 °C, S up to about 0.8 (from memory).
 * Source: as {@link frederickAtmosphericBoilingPointRise} (equation from memory).
 *
 * @param solidsMassFraction S, kg dry solids per kg liquor (0–1)
 * @param temperatureCelsius t, °C
 * @returns c_p, kJ/(kg·K)
 * @example blackLiquorHeatCapacityKJPerKgK(0.5, 80) // ≈ 3.28 kJ/(kg·K)
 */
export function blackLiquorHeatCapacityKJPerKgK(
  solidsMassFraction: number,
  temperatureCelsius: number,
): number {
  requireSolids(solidsMassFraction);
  const s = solidsMassFraction;
  const t = temperatureCelsius;
  return 4.216 * (1 - s) + (1.675 + 3.31e-3 * t) * s + (4.87 - 20e-3 * t) * (1 - s) * s ** 3;
}

/** Temperature of the enthalpy datum, °C: liquid water at the triple point (as IF97). */
export const BLACK_LIQUOR_ENTHALPY_DATUM_CELSIUS = 0.01;

/**
 * Specific enthalpy of kraft black liquor on the steam-table datum: the exact integral of
 * {@link blackLiquorHeatCapacityKJPerKgK} from 0.01 °C (h = 0 there, as liquid water in IF97).
 *
 *   h = ∫_{0.01 °C}^{t} c_p(S, t′) dt′   [kJ/kg]
 *
 * The heat of dilution at the datum is neglected (as for the custom liquors), so h of pure water
 * (S = 0) is 4.216·(t − 0.01), within 2.5 kJ/kg of IF97 up to 100 °C.
 *
 * Validity: as {@link blackLiquorHeatCapacityKJPerKgK}.
 * Source: as {@link blackLiquorHeatCapacityKJPerKgK}, integrated here.
 *
 * @param solidsMassFraction S, kg dry solids per kg liquor (0–1)
 * @param temperatureCelsius t, °C
 * @returns h, kJ/kg
 * @example blackLiquorEnthalpyKJPerKg(0.5, 80) // ≈ 261.25 kJ/kg
 * @example blackLiquorEnthalpyKJPerKg(0, 80) // → 337.23784 kJ/kg (= 4.216 × 79.99; IF97 h_f(80 °C) is 334.95 kJ/kg)
 */
export function blackLiquorEnthalpyKJPerKg(solidsMassFraction: number, temperatureCelsius: number): number {
  requireSolids(solidsMassFraction);
  const s = solidsMassFraction;
  const t = temperatureCelsius;
  const t0 = BLACK_LIQUOR_ENTHALPY_DATUM_CELSIUS;
  const dt = t - t0;
  const dt2 = (t * t - t0 * t0) / 2;
  return (
    4.216 * (1 - s) * dt + s * (1.675 * dt + 3.31e-3 * dt2) + (1 - s) * s ** 3 * (4.87 * dt - 20e-3 * dt2)
  );
}

/**
 * Density of kraft black liquor against dry solids and temperature (Frederick 1997).
 *
 *   ρ_25 = 997 + 694·S   [kg/m³],   ρ(t) = ρ_25·(1.008 − 0.237·(t/1000) − 1.94·(t/1000)²)
 *
 * The equation is recalled ("from memory"); its digits agree with an open-source transcription of
 * the book's black-liquor correlations (which also carries the BPR coefficients used above),
 * except that we recall a solids slope of 649 rather than 694 kg/m³: the two differ by 2 % at 70 %
 * solids. Check against the book before design. Its water end (S = 0) is within 1 % of IF97
 * between 20 and 150 °C.
 *
 * Validity: the fitted range is not in our notes; used with the model's box (silent to 80 % solids
 * and 40–150 °C) and flagged as generic.
 * Source: W.J. Frederick, "Black liquor properties", ch. 3 in T.N. Adams (ed.), Kraft Recovery
 * Boilers, TAPPI Press 1997 (from memory, see above).
 *
 * @param solidsMassFraction S, kg dry solids per kg liquor (0–1)
 * @param temperatureCelsius t, °C
 * @returns ρ, kg/m³
 * @example blackLiquorDensity(0.65, 100) // ≈ 1397.3 kg/m³
 */
export function blackLiquorDensity(solidsMassFraction: number, temperatureCelsius: number): number {
  requireSolids(solidsMassFraction);
  const r = temperatureCelsius / 1000;
  return (997 + 694 * solidsMassFraction) * (1.008 - 0.237 * r - 1.94 * r * r);
}

/**
 * Kinematic viscosity of kraft black liquor (a generic fit of the form used in the black-liquor
 * literature, as Frederick 1997 collects it).
 *
 *   ln(ν/cSt) = A + B/T³,  T in K
 *   A = −2.4273 + 3.3532·S + 3.7654·S² − 2.49·S³
 *   B = 6.1347e7 − 5.442e7·S + 2.1915e8·S² + 1.7042e8·S³
 *
 * Coefficients recalled ("from memory") and as transcribed in the same open-source code as
 * {@link blackLiquorDensity}; not read from the book here. Its water end (S = 0) reproduces IAPWS
 * water within 2.3 % from 20 to 150 °C, which checks A and B at S = 0 only. Real black-liquor
 * viscosity depends on the liquor (wood species, cooking, lignin molecular weight, residual
 * alkali; Zaman and Fricke, Ind. Eng. Chem. Res. 33 (1994) 428–435): at high solids two liquors
 * can differ by a factor of several, so this is an order-of-magnitude estimate.
 *
 * Validity: the fitted range is not in our notes; used silently to 80 % solids and 40–150 °C,
 * always with a warning that the property is liquor-specific.
 * Source: W.J. Frederick, "Black liquor properties", ch. 3 in T.N. Adams (ed.), Kraft Recovery
 * Boilers, TAPPI Press 1997 (form and coefficients from memory, see above).
 *
 * @param solidsMassFraction S, kg dry solids per kg liquor (0–1)
 * @param temperature T, K
 * @returns ν, m²/s
 * @example blackLiquorKinematicViscosity(0.65, 373.15) // ≈ 4.662e-5 m²/s (about 47 cSt)
 */
export function blackLiquorKinematicViscosity(solidsMassFraction: number, temperature: number): number {
  requireSolids(solidsMassFraction);
  const s = solidsMassFraction;
  const a = -2.4273 + s * (3.3532 + s * (3.7654 - 2.49 * s));
  const b = 6.1347e7 + s * (-5.442e7 + s * (2.1915e8 + 1.7042e8 * s));
  return Math.exp(a + b / temperature ** 3) * 1e-6;
}

/**
 * Thermal conductivity of kraft black liquor, linear in temperature and dry solids (the form the
 * kraft recovery literature uses, after Harvin and Brown's measurements as Frederick 1997 gives
 * it).
 *
 *   k = 1.44×10⁻³·t − 0.335·S + 0.58   [W/(m·K)],  t in °C
 *
 * Coefficients recalled ("from memory"), not read from the book here. Its water end (S = 0) runs
 * above IAPWS water: +1.8 % at 20 °C, +4.2 % at 80 °C, +6.9 % at 100 °C, +10 % at 120 °C and
 * +17 % at 150 °C (tests), because water's conductivity flattens near 130 °C and a line does not;
 * so the model trusts it only to 100 °C. Ramamurthy, Fricke and co-workers
 * measured black liquors to 83 % solids with a line-source probe and found the earlier data could
 * be extrapolated to high solids (Tappi J. 76(11) (1993) 175–179). Liquors differ with their
 * organic-to-inorganic ratio, so the value is generic.
 *
 * Validity: the fitted range is not in our notes; used silently to 80 % dry solids and 20–100 °C
 * (where its water end is within 7 % of IAPWS), always with a warning that the property is
 * liquor-specific.
 * Source: W.J. Frederick, "Black liquor properties", ch. 3 in T.N. Adams (ed.), Kraft Recovery
 * Boilers, TAPPI Press 1997 (form and coefficients from memory); P. Ramamurthy et al., "Viscosity
 * and thermal conductivity of black liquor", Tappi Journal 76(11) (1993) 175–179 (range).
 *
 * @param solidsMassFraction S, kg dry solids per kg liquor (0–1)
 * @param temperatureCelsius t, °C
 * @returns k, W/(m·K)
 * @example blackLiquorThermalConductivity(0.65, 100) // ≈ 0.50625 W/(m·K)
 */
export function blackLiquorThermalConductivity(
  solidsMassFraction: number,
  temperatureCelsius: number,
): number {
  requireSolids(solidsMassFraction);
  return 1.44e-3 * temperatureCelsius - 0.335 * solidsMassFraction + 0.58;
}

const C = (celsius: number): number => celsius + KELVIN_OFFSET;
const KJ = 1e3;

/**
 * Validity and limits, and why:
 * - Dry solids: silent to 0.50 (the BPR polynomial's stated range, from memory), a warning from
 *   0.50 to 0.85 (Zaman et al. 1998 measured liquors to 85 % solids; product liquors of 65–80 %
 *   are normal, so users need the estimate, flagged), refused above 0.85 (a near-solid melt).
 * - Temperature: silent at 40–150 °C (heat-capacity data 313–393 K and the usual train), a warning
 *   down to 0.01 °C and up to 200 °C, refused beyond (no data, and liquor chemistry changes).
 * - Pressure: the IF97 saturation pressures of those temperatures (the BPR needs T_sat(p)).
 */
const S_VALID_BPR: Interval = { min: 0, max: 0.5 };
const S_VALID_CP: Interval = { min: 0, max: 0.8 };
const S_LIMITS: Interval = { min: 0, max: 0.85 };
const T_VALID: Interval = { min: C(40), max: C(150) };
const T_VALID_WATER_BOILING: Interval = { min: C(50), max: C(150) };
const T_LIMITS: Interval = { min: IF97.tripleTemperature, max: C(200) };

const validity: ValidityBox = {
  massFraction: S_VALID_BPR,
  temperature: T_VALID,
  pressure: {
    min: saturationPressure(T_VALID_WATER_BOILING.min),
    max: saturationPressure(T_VALID_WATER_BOILING.max),
  },
  notes: [
    'x is the dry-solids mass fraction (kg dry solids per kg liquor).',
    'Boiling-point rise: silent to 50 % dry solids; from 50 % to 85 % a "model-extrapolated" warning is returned (real liquors change slope near 65 % solids, where salts crystallise).',
    'Enthalpy and heat capacity: silent to 80 % dry solids and 40–150 °C.',
    'The pressure correction is trusted for water boiling temperatures of 50–150 °C.',
    'A generic correlation: liquors from different mills differ by several kelvin in BPR at high solids. Use a custom Dühring table for measured data.',
    'Density and viscosity: generic correlations (Frederick 1997, from memory), used silently to 80 % dry solids and 40–150 °C; every viscosity carries a warning that black-liquor viscosity is liquor-specific (a factor of several between liquors at high solids).',
    'Thermal conductivity: a generic linear correlation in temperature and solids (from memory), used silently to 80 % dry solids and 20–100 °C (its water end runs 2–7 % above IAPWS water there, 17 % at 150 °C), always with a warning that it is liquor-specific.',
    'Surface tension and a solubility limit are not provided by this model.',
  ],
};

const limits: ValidityBox = {
  massFraction: S_LIMITS,
  temperature: T_LIMITS,
  pressure: { min: saturationPressure(T_LIMITS.min), max: saturationPressure(T_LIMITS.max) },
  notes: ['Refused above 85 % dry solids and outside 0.01–200 °C (liquor or water boiling temperature).'],
};

const sources: Citation[] = [
  {
    key: 'frederick-1997',
    reference:
      'W.J. Frederick, "Black liquor properties", chapter 3 in T.N. Adams (ed.), Kraft Recovery Boilers, TAPPI Press, Atlanta (1997): BPR at atmospheric pressure, its pressure correction, heat capacity',
  },
  {
    key: 'zaman-1998',
    reference:
      'A.A. Zaman, T.W. McNally, A.L. Fricke, "Vapor pressure and boiling point elevation of slash pine black liquors: predictive models with statistical approach", Industrial & Engineering Chemistry Research 37 (1998) 275–283 (data range and slope change near 65 % solids)',
  },
  {
    key: 'zaman-fricke-1994',
    reference:
      'A.A. Zaman, A.L. Fricke, "Newtonian viscosity of high solids kraft black liquors: effects of temperature and solids concentrations", Industrial & Engineering Chemistry Research 33 (1994) 428–435 (viscosity depends on the liquor)',
  },
  {
    key: 'ramamurthy-1993',
    reference:
      'P. Ramamurthy, A.R.P. van Heiningen, G.J. Kubes, "Viscosity and thermal conductivity of black liquor", Tappi Journal 76(11) (1993) 175–179 (thermal conductivity measured to 83 % solids)',
  },
  if97CitationFor('pure-water saturation temperature'),
];

/** Water boiling temperature at p (IF97) and the liquor's rise over it, both K. */
function riseOverWater(
  massFraction: number,
  pressure: number,
  warnings: WarningSink,
): { waterBoilingTemperature: number; rise: number } {
  checkAgainst(
    MODEL_ID,
    'massFraction',
    massFraction,
    'kg dry solids/kg liquor',
    S_VALID_BPR,
    S_LIMITS,
    warnings,
  );
  const tWater = saturationTemperature(pressure);
  checkAgainst(MODEL_ID, 'waterBoilingTemperature', tWater, 'K', T_VALID_WATER_BOILING, T_LIMITS, warnings);
  const rise =
    frederickAtmosphericBoilingPointRise(massFraction) * frederickBoilingPointRisePressureFactor(tWater);
  checkAgainst(MODEL_ID, 'temperature', tWater + rise, 'K', T_VALID, T_LIMITS, warnings);
  return { waterBoilingTemperature: tWater, rise };
}

/** Box in which the generic density and viscosity are used without an extrapolation warning. */
const TRANSPORT_BOX: ValidityBox = { massFraction: S_VALID_CP, temperature: T_VALID };
/** Box of the linear conductivity: to 100 °C, where its water end stays within 7 % of IAPWS. */
const CONDUCTIVITY_BOX: ValidityBox = { massFraction: S_VALID_CP, temperature: { min: C(20), max: C(100) } };

function checkTransportInputs(
  property: 'density' | 'viscosity' | 'thermal conductivity',
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
): number {
  checkPropertyBox(
    MODEL_ID,
    property,
    property === 'thermal conductivity' ? CONDUCTIVITY_BOX : TRANSPORT_BOX,
    { massFraction: S_LIMITS, temperature: T_LIMITS },
    massFraction,
    temperature,
    warnings,
    'kg dry solids/kg liquor',
  );
  return temperature - KELVIN_OFFSET;
}

function checkEnthalpyInputs(massFraction: number, temperature: number, warnings: WarningSink): number {
  checkAgainst(
    MODEL_ID,
    'massFraction',
    massFraction,
    'kg dry solids/kg liquor',
    S_VALID_CP,
    S_LIMITS,
    warnings,
  );
  checkAgainst(MODEL_ID, 'temperature', temperature, 'K', T_VALID, T_LIMITS, warnings);
  return temperature - KELVIN_OFFSET;
}

/**
 * Kraft black liquor (Frederick 1997). boilingPoint = T_sat,IF97(p) + BPR(S, p); the BPR is zero
 * for S = 0 and never negative. enthalpy = ∫ c_p dT from 0.01 °C, kJ → J.
 */
export const kraftBlackLiquor: LiquorModel = defineLiquorModel({
  id: MODEL_ID,
  name: 'Kraft black liquor',
  kind: 'built-in',
  compositionVariable: 'dry-solids mass fraction (kg dry solids per kg liquor)',
  validity,
  limits,
  sources,
  cautions: [
    {
      code: 'hot-alkaline-liquor-burns',
      message:
        'Hot black liquor is strongly alkaline (it contains sodium hydroxide and sodium sulfide) and causes severe chemical and thermal burns and eye damage; flashing liquor and hot spills add scalding.',
    },
    {
      code: 'black-liquor-scaling',
      message:
        'Sodium salts (sodium carbonate and sulfate) crystallise from concentrated black liquor and scale heating surfaces; viscosity rises steeply with solids. This model gives no solubility limit: check the product solids against your liquor data.',
    },
    {
      code: 'black-liquor-viscosity-varies',
      message:
        'Black-liquor viscosity rises steeply with solids and differs from liquor to liquor; above about 65 % solids it can gel or set on cooling. Size pumps, lines and heating surfaces on measured viscosities of your liquor.',
    },
    {
      code: 'reduced-sulfur-gases',
      message:
        'Evaporator vapours and condensates from black liquor carry hydrogen sulfide and other reduced sulfur compounds that are toxic; they must be collected and treated.',
    },
  ],

  boilingPoint(massFraction: number, pressure: number, warnings?: WarningSink): number {
    const { waterBoilingTemperature, rise } = riseOverWater(massFraction, pressure, warnings);
    return waterBoilingTemperature + rise;
  },

  // Frederick's correlation gives the rise itself: returned as computed, not as boilingPoint − T_sat.
  boilingPointRise(massFraction: number, pressure: number, warnings?: WarningSink): number {
    return riseOverWater(massFraction, pressure, warnings).rise;
  },

  enthalpy(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkEnthalpyInputs(massFraction, temperature, warnings);
    return blackLiquorEnthalpyKJPerKg(massFraction, t) * KJ;
  },

  heatCapacity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkEnthalpyInputs(massFraction, temperature, warnings);
    return blackLiquorHeatCapacityKJPerKgK(massFraction, t) * KJ;
  },

  transportValidity: {
    density: TRANSPORT_BOX,
    viscosity: TRANSPORT_BOX,
    thermalConductivity: CONDUCTIVITY_BOX,
  },

  density(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkTransportInputs('density', massFraction, temperature, warnings);
    return blackLiquorDensity(massFraction, t);
  },

  /** μ = ν·ρ, Pa·s; always with a "liquor-specific-property" warning. */
  viscosity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkTransportInputs('viscosity', massFraction, temperature, warnings);
    addWarning(warnings, {
      code: 'liquor-specific-property',
      field: 'massFraction',
      property: 'viscosity',
      message:
        'Black-liquor viscosity depends on the liquor (wood, cooking, lignin and residual alkali): this generic correlation can be off by a factor of several at high solids. Use measured viscosities of your liquor (a custom liquor) for design.',
    });
    return blackLiquorKinematicViscosity(massFraction, temperature) * blackLiquorDensity(massFraction, t);
  },

  /** The linear correlation, W/(m·K); always with a "liquor-specific-property" warning. */
  thermalConductivity(massFraction: number, temperature: number, warnings?: WarningSink): number {
    const t = checkTransportInputs('thermal conductivity', massFraction, temperature, warnings);
    addWarning(warnings, {
      code: 'liquor-specific-property',
      field: 'massFraction',
      property: 'thermal conductivity',
      message:
        'Black-liquor thermal conductivity depends on the liquor (its organic and inorganic solids): this generic linear correlation is an estimate. Use a measured conductivity of your liquor (liquorProperties.thermalConductivity or a custom liquor) for design.',
    });
    return blackLiquorThermalConductivity(massFraction, t);
  },
});
