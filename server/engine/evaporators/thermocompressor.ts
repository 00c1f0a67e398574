/**
 * Thermocompressor (steam-jet ejector) for thermal vapour recompression: the entrainment
 * correlation of El-Dessouky, its validity checks and the mixing balance of the discharge.
 *
 * Pure: SI numbers in and out (the correlation's own units, kPa and °C, are converted inside).
 *
 * Source: H.T. El-Dessouky, H.M. Ettouney, Fundamentals of Salt Water Desalination, Elsevier,
 * Amsterdam (2002), the steam-jet ejector model of the thermal-vapour-compression chapters
 * (correlation of El-Dessouky fitted to manufacturers' ejector curves).
 */
import { EngineNoSolutionError, EngineRangeError } from '../errors.js';
import { IF97 } from '../steam/if97.js';
import { addWarning, KELVIN_OFFSET, type Citation, type WarningSink } from '../types.js';

export const THERMOCOMPRESSOR_SOURCE: Citation = {
  key: 'el-dessouky-ettouney-2002',
  reference:
    'H.T. El-Dessouky, H.M. Ettouney, Fundamentals of Salt Water Desalination, Elsevier (2002): steam-jet ejector entrainment correlation (Ra = 0.296·P_c^1.19/P_e^1.04·(P_m/P_e)^0.015·PCF/TCF) and the gain output ratio',
};

/** Highest pressure with a saturation state (IF97 regions 1/4/2), Pa: the ceiling of the refusal ranges. */
const IF97_SATURATION_LIMIT = IF97.region13SaturationPressure;

/** Validity of the correlation as printed (El-Dessouky and Ettouney 2002), SI. */
export const EL_DESSOUKY_VALIDITY = {
  /** Ra = motive/entrained, at most 4. */
  maxMotivePerEntrained: 4,
  /** Suction saturation temperature, K (10–500 °C). */
  suctionTemperature: { min: 10 + KELVIN_OFFSET, max: 500 + KELVIN_OFFSET },
  /** Motive pressure, Pa (100–3500 kPa). */
  motivePressure: { min: 100e3, max: 3500e3 },
  /** Compression ratio P_c/P_e, at least 1.81. */
  minCompressionRatio: 1.81,
} as const;

/**
 * Motive-pressure correction factor of El-Dessouky's ejector correlation:
 *
 *   PCF = 3×10⁻⁷·P_m² − 0.0009·P_m + 1.6101   (P_m in kPa)
 *
 * Validity: 100 ≤ P_m ≤ 3500 kPa.
 * Source: El-Dessouky and Ettouney (2002), see {@link THERMOCOMPRESSOR_SOURCE}.
 *
 * @param motivePressure P_m, Pa
 * @returns PCF, dimensionless
 * @example elDessoukyPressureCorrectionFactor(1000000) // ≈ 1.0101 (0.3 − 0.9 + 1.6101 by hand)
 */
export function elDessoukyPressureCorrectionFactor(motivePressure: number): number {
  const pm = motivePressure / 1000;
  return 3e-7 * pm * pm - 0.0009 * pm + 1.6101;
}

/**
 * Suction-temperature correction factor of El-Dessouky's ejector correlation:
 *
 *   TCF = 2×10⁻⁸·T_e² − 0.0006·T_e + 1.0047   (T_e in °C, saturation temperature at P_e)
 *
 * Validity: 10 ≤ T_e ≤ 500 °C.
 * Source: El-Dessouky and Ettouney (2002), see {@link THERMOCOMPRESSOR_SOURCE}.
 *
 * @param suctionTemperature T_e, K
 * @returns TCF, dimensionless
 * @example elDessoukyTemperatureCorrectionFactor(323.15) // ≈ 0.97475 (0.00005 − 0.03 + 1.0047 by hand)
 */
export function elDessoukyTemperatureCorrectionFactor(suctionTemperature: number): number {
  const te = suctionTemperature - KELVIN_OFFSET;
  return 2e-8 * te * te - 0.0006 * te + 1.0047;
}

/**
 * Ejector entrainment of El-Dessouky: mass of motive steam per mass of entrained vapour,
 *
 *   Ra = 0.296 · P_c^1.19 / P_e^1.04 · (P_m/P_e)^0.015 · PCF/TCF   (pressures in kPa)
 *
 * with P_m the motive, P_c the discharge and P_e the suction (entrained vapour) pressure, and
 * PCF, TCF from {@link elDessoukyPressureCorrectionFactor} and
 * {@link elDessoukyTemperatureCorrectionFactor}. The entrainment ratio (kg entrained per kg
 * motive) is 1/Ra.
 *
 * Validity: Ra ≤ 4, 10 ≤ T_e ≤ 500 °C, 100 ≤ P_m ≤ 3500 kPa, P_c/P_e ≥ 1.81 (check with
 * {@link checkThermocompressor}); no range checks here.
 * Source: El-Dessouky and Ettouney (2002), see {@link THERMOCOMPRESSOR_SOURCE}.
 *
 * @param motivePressure P_m, Pa
 * @param dischargePressure P_c, Pa
 * @param suctionPressure P_e, Pa
 * @param suctionTemperature T_e, the saturation temperature at P_e, K
 * @returns Ra, kg motive steam per kg entrained vapour
 * @example elDessoukyMotivePerEntrained(1000000, 35000, 15000, 327.12) // ≈ 1.3474 (P_m 10 bar, 35 kPa chest, 15 kPa suction)
 */
export function elDessoukyMotivePerEntrained(
  motivePressure: number,
  dischargePressure: number,
  suctionPressure: number,
  suctionTemperature: number,
): number {
  const pm = motivePressure / 1000;
  const pc = dischargePressure / 1000;
  const pe = suctionPressure / 1000;
  return (
    ((0.296 * Math.pow(pc, 1.19)) / Math.pow(pe, 1.04)) *
    Math.pow(pm / pe, 0.015) *
    (elDessoukyPressureCorrectionFactor(motivePressure) /
      elDessoukyTemperatureCorrectionFactor(suctionTemperature))
  );
}

/**
 * Enthalpy of the ejector discharge from the adiabatic mixing balance (no work, no heat loss):
 *
 *   h_d = (Ra·h_m + h_e)/(1 + Ra)
 *
 * Validity: any Ra > 0. Source: the first law for the ejector as a control volume (common practice;
 * as in El-Dessouky and Ettouney 2002).
 *
 * @param motivePerEntrained Ra, kg/kg
 * @param motiveEnthalpy h_m, J/kg
 * @param entrainedEnthalpy h_e, J/kg
 * @returns h_d, J/kg
 * @example dischargeEnthalpy(2, 2778000, 2600000) // ≈ 2718666.7 J/kg
 */
export function dischargeEnthalpy(
  motivePerEntrained: number,
  motiveEnthalpy: number,
  entrainedEnthalpy: number,
): number {
  return (motivePerEntrained * motiveEnthalpy + entrainedEnthalpy) / (1 + motivePerEntrained);
}

/** The pressures and suction temperature of an ejector, SI. */
export interface EjectorPoint {
  /** P_m, Pa. */
  motivePressure: number;
  /** P_c, Pa. */
  dischargePressure: number;
  /** P_e, Pa. */
  suctionPressure: number;
  /** T_e = T_sat(P_e), K. */
  suctionTemperature: number;
}

/**
 * Refuses an ejector that cannot work (discharge not above suction, motive not above
 * discharge), with the request's field names (`steam.pressure` for the discharge, the chest of
 * effect 1; `thermocompressor.motivePressure`); the ranges are in Pa.
 */
export function requireWorkingEjector(p: EjectorPoint): void {
  if (!(p.dischargePressure > p.suctionPressure)) {
    throw new EngineRangeError(
      'steam.pressure',
      p.dischargePressure,
      { min: p.suctionPressure, max: IF97_SATURATION_LIMIT, unit: 'Pa' },
      `steam.pressure = ${p.dischargePressure} Pa: the thermocompressor's discharge (the chest of effect 1) must be above the suction pressure ${p.suctionPressure} Pa of the vapour it entrains`,
      undefined,
      "the thermocompressor's discharge (the chest of effect 1) must be above the pressure of the vapour it entrains",
    );
  }
  if (!(p.motivePressure > p.dischargePressure)) {
    throw new EngineRangeError(
      'thermocompressor.motivePressure',
      p.motivePressure,
      { min: p.dischargePressure, max: IF97_SATURATION_LIMIT, unit: 'Pa' },
      `thermocompressor.motivePressure = ${p.motivePressure} Pa must be above the discharge (steam) pressure ${p.dischargePressure} Pa`,
      undefined,
      'the motive steam must be above the discharge (chest) pressure to drive the ejector',
    );
  }
}

/**
 * El-Dessouky's entrainment at a working ejector: refuses a meaningless result (Ra not finite
 * or not positive) and, given a sink, warns `model-extrapolated` for each bound of the
 * correlation's validity that the point leaves (fields `thermocompressor.…`).
 *
 * @returns Ra, kg motive per kg entrained
 */
export function checkThermocompressor(p: EjectorPoint, warnings: WarningSink): number {
  const ra = elDessoukyMotivePerEntrained(
    p.motivePressure,
    p.dischargePressure,
    p.suctionPressure,
    p.suctionTemperature,
  );
  if (!Number.isFinite(ra) || !(ra > 0)) {
    throw new EngineNoSolutionError(
      `The ejector correlation gives no meaningful entrainment here (Ra = ${ra})`,
      { reason: 'entrainment-ratio-meaningless' },
    );
  }
  if (!warnings) return ra;
  const v = EL_DESSOUKY_VALIDITY;
  const note = "outside the range of El-Dessouky's ejector correlation";
  if (ra > v.maxMotivePerEntrained) {
    addWarning(warnings, {
      code: 'model-extrapolated',
      field: 'thermocompressor.motivePerEntrained',
      message: `The ejector needs ${ra.toFixed(3)} kg motive steam per kg entrained vapour, above ${v.maxMotivePerEntrained}: ${note}`,
      validRange: { min: 0, max: v.maxMotivePerEntrained, unit: '1' },
    });
  }
  const pm = p.motivePressure;
  if (pm < v.motivePressure.min || pm > v.motivePressure.max) {
    addWarning(warnings, {
      code: 'model-extrapolated',
      field: 'thermocompressor.motivePressure',
      message: `The motive pressure ${pm} Pa is ${note} (${v.motivePressure.min} to ${v.motivePressure.max} Pa)`,
      template: `The motive pressure {pm} is ${note} ({min} to {max})`,
      values: {
        pm: { value: pm, kind: 'pressure' },
        min: { value: v.motivePressure.min, kind: 'pressure' },
        max: { value: v.motivePressure.max, kind: 'pressure' },
      },
      validRange: { min: v.motivePressure.min, max: v.motivePressure.max, unit: 'Pa' },
    });
  }
  const te = p.suctionTemperature;
  if (te < v.suctionTemperature.min || te > v.suctionTemperature.max) {
    addWarning(warnings, {
      code: 'model-extrapolated',
      field: 'thermocompressor.suctionTemperature',
      message: `The entrained vapour's saturation temperature ${te.toFixed(2)} K is ${note} (${v.suctionTemperature.min} to ${v.suctionTemperature.max} K)`,
      template: `The entrained vapour's saturation temperature {te} is ${note} ({min} to {max})`,
      values: {
        te: { value: te, kind: 'temperature' },
        min: { value: v.suctionTemperature.min, kind: 'temperature' },
        max: { value: v.suctionTemperature.max, kind: 'temperature' },
      },
      validRange: { min: v.suctionTemperature.min, max: v.suctionTemperature.max, unit: 'K' },
    });
  }
  const cr = p.dischargePressure / p.suctionPressure;
  if (cr < v.minCompressionRatio) {
    addWarning(warnings, {
      code: 'model-extrapolated',
      field: 'thermocompressor.compressionRatio',
      message: `The compression ratio P_c/P_e = ${cr.toFixed(3)} is below ${v.minCompressionRatio}: ${note}`,
      validRange: { min: v.minCompressionRatio, max: Number.POSITIVE_INFINITY, unit: '1' },
    });
  }
  return ra;
}
