/**
 * Helpers shared by every evaporator solver (single effect, multiple effects): the heating-steam
 * supply, the hydrostatic head of a liquid column, the vapour leaving a boiling liquor, the
 * standard warnings and cautions, and the relative residual used to report balance closure.
 *
 * Pure: SI numbers in and out, water properties only through ../steam/if97.ts. Nothing here is
 * specific to one evaporator arrangement.
 *
 * Method: the chain of an evaporator effect (steam condensing at T_sat(p_s), liquor boiling at
 * T_sat(p) + BPR, vapour leaving superheated by the BPR, A = Q/(U·ΔT)) is the textbook one, e.g.
 * C.J. Geankoplis, Transport Processes and Separation Process Principles, 4th ed., Prentice Hall
 * (2003), section 8.4; W.L. McCabe, J.C. Smith, P. Harriott, Unit Operations of Chemical
 * Engineering, 7th ed., McGraw-Hill (2005), chapter 16.
 */
import { EngineInputError, EngineRangeError } from '../errors.js';
import type { LiquorModel } from '../liquors/model.js';
import {
  enthalpyAtPT,
  IF97,
  IF97_CITATION,
  regionAtPT,
  saturatedLiquidAtTemperature,
  saturationEnthalpies,
  saturationPressure,
  saturationTemperature,
  saturatedVaporEnthalpy,
} from '../steam/if97.js';
import {
  addWarning,
  templated,
  type EngineQuantity,
  STANDARD_ATMOSPHERE,
  STANDARD_GRAVITY,
  type Citation,
  type EngineCaution,
  type WarningSink,
} from '../types.js';

/** The citation of the water and steam properties every evaporator result uses (defined in steam/if97.ts). */
export { IF97_CITATION };

/** ΔT (K) below which a heating surface is flagged as impractically large (common practice). */
export const SMALL_TEMPERATURE_DIFFERENCE = 5;
/**
 * Steam superheat (K) above which a result is flagged: a strongly superheated chest first works as
 * a gas cooler with a poor film coefficient, so U falls (common practice: desuperheat first).
 * The API contract states the same threshold (shared/contracts/common.ts).
 */
export const LARGE_STEAM_SUPERHEAT = 50;
/**
 * ΔT (K) across a heating surface above which a result is flagged: past the nucleate-boiling peak
 * the surface may film-boil and fouls fast (common practice: evaporator ΔT of 10–40 K).
 */
export const LARGE_TEMPERATURE_DIFFERENCE = 60;
/** Relative margin to a solubility limit that triggers the near-limit warning (5 %). */
export const SOLUBILITY_MARGIN = 0.05;

// ---------------------------------------------------------------------------------------------
// Input checks
// ---------------------------------------------------------------------------------------------

/** Throws an EngineRangeError unless min ≤ value ≤ max (and finite). */
export function requireInRange(field: string, value: number, min: number, max: number, unit: string): void {
  if (!Number.isFinite(value) || value < min || value > max) {
    throw new EngineRangeError(field, value, { min, max, unit });
  }
}

/** Throws an EngineRangeError unless value is finite and strictly positive. */
export function requirePositive(field: string, value: number, unit: string): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new EngineRangeError(
      field,
      value,
      { min: Number.MIN_VALUE, max: Number.MAX_VALUE, unit },
      `${field} = ${value} ${unit} must be a finite number greater than 0`,
    );
  }
}

/** Throws an EngineRangeError unless 0 ≤ x < 1 (a solute mass fraction). */
export function requireMassFraction(field: string, value: number): void {
  if (!Number.isFinite(value) || value < 0 || value >= 1) {
    throw new EngineRangeError(
      field,
      value,
      { min: 0, max: 1, unit: 'kg/kg' },
      `${field} = ${value} kg/kg must be a mass fraction from 0 up to (not including) 1`,
    );
  }
}

// ---------------------------------------------------------------------------------------------
// Heating steam
// ---------------------------------------------------------------------------------------------

/** How a user specifies the heating steam: a pressure OR a saturation temperature. */
export interface SteamSupplySpec {
  /** Steam pressure, Pa absolute. Give this or `saturationTemperature`, not both. */
  pressure?: number;
  /** Saturation (condensing) temperature, K. Give this or `pressure`, not both. */
  saturationTemperature?: number;
  /** Degrees of superheat of the steam entering the chest, K (default 0: saturated). */
  superheat?: number;
  /** Degrees the condensate is subcooled below T_sat when it leaves, K (default 0: saturated). */
  condensateSubcooling?: number;
}

/** The resolved heating-steam supply, all SI. */
export interface SteamSupply {
  /** Pa absolute. */
  pressure: number;
  /** T_sat(p_s): the condensing temperature that drives heat transfer, K. */
  condensingTemperature: number;
  /** Temperature of the steam entering, K (condensing temperature + superheat). */
  inletTemperature: number;
  /** Temperature of the condensate leaving, K (condensing temperature − subcooling). */
  condensateTemperature: number;
  superheat: number;
  condensateSubcooling: number;
  /** h_g − h_f at p_s, J/kg. */
  latentHeat: number;
  /** Enthalpy of the steam entering, J/kg (region 2 if superheated, saturated vapour otherwise). */
  enthalpyIn: number;
  /** Enthalpy of the condensate leaving, J/kg (region 1 if subcooled, saturated liquid otherwise). */
  enthalpyOut: number;
  /** Heat given per kg of steam, enthalpyIn − enthalpyOut, J/kg. */
  heatPerKg: number;
}

/**
 * Resolves a heating-steam specification with IAPWS-IF97: condensing temperature T_s = T_sat(p_s)
 * (or p_s = p_sat(T_s)), latent heat h_g − h_f, inlet enthalpy (region 2 at (p_s, T_s + ΔT_sh)
 * when superheated) and outlet enthalpy (region 1 at (p_s, T_s − ΔT_sub) when subcooled).
 * Heat given per kg q = h_in − h_out.
 *
 * Valid for p_s from 611.213 Pa to 16.529 MPa (T_s 273.15 K to 623.15 K, where this adapter gives
 * saturation states); superheat up to 1073.15 K inlet temperature; condensate down to 273.15 K.
 * Source: IAPWS R7-97(2012) (see {@link IF97_CITATION}).
 *
 * @param spec steam pressure (Pa) or saturation temperature (K), superheat (K), subcooling (K)
 * @param field dotted name of the spec in the caller's input, for error messages
 * @throws EngineInputError when both or neither of pressure / saturationTemperature are given
 * @throws EngineRangeError for a value outside the ranges above
 */
export function resolveSteamSupply(spec: SteamSupplySpec, field = 'steam'): SteamSupply {
  const hasP = spec.pressure !== undefined;
  const hasT = spec.saturationTemperature !== undefined;
  if (hasP === hasT) {
    throw new EngineInputError(
      field,
      `${field}: give exactly one of pressure or saturationTemperature (got ${hasP ? 'both' : 'neither'})`,
    );
  }
  const superheat = spec.superheat ?? 0;
  const subcooling = spec.condensateSubcooling ?? 0;
  let pressure: number;
  if (hasP) {
    requireInRange(
      `${field}.pressure`,
      spec.pressure as number,
      IF97.minPressure,
      IF97.region13SaturationPressure,
      'Pa',
    );
    pressure = spec.pressure as number;
  } else {
    requireInRange(
      `${field}.saturationTemperature`,
      spec.saturationTemperature as number,
      IF97.minTemperature,
      IF97.region13Temperature,
      'K',
    );
    pressure = saturationPressure(spec.saturationTemperature as number);
  }
  // Lean IF97 path (enthalpies only, no transport properties): this runs once per solve.
  const sat = saturationEnthalpies(pressure);
  const ts = sat.temperature;
  requireInRange(`${field}.superheat`, superheat, 0, IF97.maxTemperature - ts, 'K');
  requireInRange(`${field}.condensateSubcooling`, subcooling, 0, ts - IF97.minTemperature, 'K');
  // A superheat (subcooling) so small that T rounds onto the saturation line would land in the
  // wrong region: the saturated state is then the right one to the precision of the input.
  let enthalpyIn = sat.vapor;
  if (superheat > 0 && regionAtPT(pressure, ts + superheat) === 2) {
    enthalpyIn = enthalpyAtPT(pressure, ts + superheat);
  }
  let enthalpyOut = sat.liquid;
  if (subcooling > 0 && regionAtPT(pressure, ts - subcooling) === 1) {
    enthalpyOut = enthalpyAtPT(pressure, ts - subcooling);
  }
  return {
    pressure,
    condensingTemperature: ts,
    inletTemperature: ts + superheat,
    condensateTemperature: ts - subcooling,
    superheat,
    condensateSubcooling: subcooling,
    latentHeat: sat.vapor - sat.liquid,
    enthalpyIn,
    enthalpyOut,
    heatPerKg: enthalpyIn - enthalpyOut,
  };
}

// ---------------------------------------------------------------------------------------------
// Vapour leaving a boiling liquor
// ---------------------------------------------------------------------------------------------

/** Water vapour leaving a liquor that boils at T under pressure p. */
export interface LeavingVapor {
  /** Pa */
  pressure: number;
  /** K */
  temperature: number;
  /** J/kg */
  enthalpy: number;
  /** T − T_sat(p), K (the boiling-point rise of the liquor it left). */
  superheat: number;
}

/**
 * Enthalpy of the vapour released by a liquor boiling at T under pressure p: pure water vapour
 * at (p, T), superheated by T − T_sat(p) (IF97 region 2); at T ≤ T_sat(p) (no BPR), or so close that (p, T) rounds onto the liquid side, the
 * saturated-vapour enthalpy at p. Source: IAPWS R7-97(2012); the superheated-vapour convention
 * is domain.md §1 step 4 and e.g. Geankoplis (4th ed.) section 8.4.
 *
 * @param pressure body (vapour-space) pressure, Pa, 611.213 Pa to 16.529 MPa
 * @param temperature liquor boiling temperature at the surface, K
 * @param waterBoilingPoint T_sat(p) if the caller already has it, K (saves a call)
 */
export function leavingVapor(
  pressure: number,
  temperature: number,
  waterBoilingPoint?: number,
): LeavingVapor {
  const tsat = waterBoilingPoint ?? saturationTemperature(pressure);
  const superheat = temperature - tsat;
  if (superheat < -1e-6) {
    throw new EngineInputError(
      'temperature',
      `A liquor cannot boil at ${temperature} K below the boiling point of water ${tsat} K at ${pressure} Pa`,
    );
  }
  // A rise so small that (p, T) rounds onto the liquid side is saturated vapour to that precision.
  const enthalpy =
    superheat > 0 && regionAtPT(pressure, temperature) === 2
      ? enthalpyAtPT(pressure, temperature)
      : saturatedVaporEnthalpy(pressure);
  return { pressure, temperature, enthalpy, superheat: Math.max(0, superheat) };
}

// ---------------------------------------------------------------------------------------------
// Hydrostatic head
// ---------------------------------------------------------------------------------------------

/**
 * Pressure at mid-depth of a liquid column: p_mid = p + ρ·g·H/2 (hydrostatics; the mid-depth
 * convention for the mean boiling point of a tall column is textbook practice, e.g. McCabe,
 * Smith and Harriott, Unit Operations of Chemical Engineering, 7th ed., chapter 16, on the
 * effect of liquid head on the boiling point; section recalled from memory).
 *
 * @param surfacePressure p at the liquid surface, Pa
 * @param density ρ of the liquid, kg/m³
 * @param liquidHeight H, height of the liquid column, m (≥ 0)
 * @returns Pa
 */
export function midDepthPressure(surfacePressure: number, density: number, liquidHeight: number): number {
  return surfacePressure + (density * STANDARD_GRAVITY * liquidHeight) / 2;
}

export interface LiquidColumn {
  /** Pressure at mid-depth, Pa. */
  pressure: number;
  /** Density used, kg/m³. */
  density: number;
  /** Where the density came from. */
  densitySource: 'liquor' | 'water';
}

/**
 * Mid-depth pressure of a column of liquor: the liquor model's density at (x, T) when it has one;
 * otherwise the density of saturated liquid water at T (IF97 region 1 at p_sat(T), never a
 * vapour state), with a
 * "density-assumed-water" warning (the head, and so the boiling point at depth, is then
 * understated for a dense liquor).
 *
 * @param surfacePressure Pa
 * @param liquidHeight m, ≥ 0 (0 returns the surface pressure)
 * @param liquor the liquor model
 * @param massFraction x of the liquor in the column (kg/kg)
 * @param temperature T of the liquor, K (its surface boiling point)
 * @param warnings sink for the warning
 * @param field dotted name of the height input, for messages
 */
export function liquidColumnPressure(
  surfacePressure: number,
  liquidHeight: number,
  liquor: LiquorModel,
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
  field = 'body.liquidHeight',
): LiquidColumn {
  requireInRange(field, liquidHeight, 0, 1000, 'm');
  let density: number;
  let densitySource: LiquidColumn['densitySource'];
  if (liquor.density) {
    density = liquor.density(massFraction, temperature, warnings);
    densitySource = 'liquor';
  } else {
    // Saturated liquid at the boiling temperature (IF97 region 1 on the saturation line). A state
    // looked up by (p, T) at p_sat(T) can round onto the vapour side and give the vapour density
    // (≈ 0.6 kg/m³), which silently dropped the head and made the area jump with x.
    const t = Math.min(temperature, IF97.region13Temperature);
    density = saturatedLiquidAtTemperature(t).density;
    densitySource = 'water';
    addWarning(warnings, {
      code: 'density-assumed-water',
      field,
      message: `The ${liquor.id} model gives no density; the liquid head uses liquid water at ${t.toFixed(2)} K (${density.toFixed(1)} kg/m³), which understates the head of a denser liquor`,
      template: `The ${liquor.id} model gives no density; the liquid head uses liquid water at {t} ({density}), which understates the head of a denser liquor`,
      values: { t: { value: t, kind: 'temperature' }, density: { value: density, kind: 'density' } },
    });
  }
  return { pressure: midDepthPressure(surfacePressure, density, liquidHeight), density, densitySource };
}

// ---------------------------------------------------------------------------------------------
// Standard warnings
// ---------------------------------------------------------------------------------------------

/** Warns "small-temperature-difference" when 0 < ΔT < 5 K (the area grows as 1/ΔT). */
export function warnSmallTemperatureDifference(
  temperatureDifference: number,
  warnings: WarningSink,
  field = 'temperatureDifference',
): void {
  if (temperatureDifference < SMALL_TEMPERATURE_DIFFERENCE) {
    addWarning(warnings, {
      code: 'small-temperature-difference',
      field,
      message: `The temperature difference across the heating surface is only ${temperatureDifference.toFixed(2)} K (below ${SMALL_TEMPERATURE_DIFFERENCE} K): the area is very sensitive to the boiling point and U`,
      ...templated(
        'The temperature difference across the heating surface is only {dt} (below {limit}): the area is very sensitive to the boiling point and U',
        'temperatureDifference',
        { dt: temperatureDifference, limit: SMALL_TEMPERATURE_DIFFERENCE },
      ),
      validRange: { min: SMALL_TEMPERATURE_DIFFERENCE, max: Number.POSITIVE_INFINITY, unit: 'K' },
    });
  }
}

/** Warns "large-steam-superheat" when the heating steam is superheated by more than 50 K. */
export function warnLargeSteamSuperheat(
  superheat: number,
  warnings: WarningSink,
  field = 'steam.superheat',
): void {
  if (superheat > LARGE_STEAM_SUPERHEAT) {
    addWarning(warnings, {
      code: 'large-steam-superheat',
      field,
      message: `The heating steam is superheated by ${superheat.toFixed(2)} K (above ${LARGE_STEAM_SUPERHEAT} K): part of the chest only cools gas, so the overall coefficient U given is likely too high; desuperheat the steam first`,
      ...templated(
        'The heating steam is superheated by {superheat} (above {limit}): part of the chest only cools gas, so the overall coefficient U given is likely too high; desuperheat the steam first',
        'temperatureDifference',
        { superheat, limit: LARGE_STEAM_SUPERHEAT },
      ),
      validRange: { min: 0, max: LARGE_STEAM_SUPERHEAT, unit: 'K' },
    });
  }
}

/** Warns "large-temperature-difference" when ΔT across a heating surface exceeds 60 K. */
export function warnLargeTemperatureDifference(
  temperatureDifference: number,
  warnings: WarningSink,
  field = 'temperatureDifference',
): void {
  if (temperatureDifference > LARGE_TEMPERATURE_DIFFERENCE) {
    addWarning(warnings, {
      code: 'large-temperature-difference',
      field,
      message: `The temperature difference across the heating surface is ${temperatureDifference.toFixed(2)} K (above ${LARGE_TEMPERATURE_DIFFERENCE} K): the liquor may film-boil and foul, and U falls`,
      ...templated(
        'The temperature difference across the heating surface is {dt} (above {limit}): the liquor may film-boil and foul, and U falls',
        'temperatureDifference',
        { dt: temperatureDifference, limit: LARGE_TEMPERATURE_DIFFERENCE },
      ),
      validRange: { min: 0, max: LARGE_TEMPERATURE_DIFFERENCE, unit: 'K' },
    });
  }
}

/**
 * Warns "feed-flash" when the feed enters hotter than its own boiling point at the body pressure:
 * part of it flashes to vapour on entry (the balances still hold; the flash vapour is part of V).
 */
export function warnFeedFlash(
  feedTemperature: number,
  feedBoilingPoint: number,
  warnings: WarningSink,
  field = 'feed.temperature',
): void {
  if (feedTemperature > feedBoilingPoint) {
    addWarning(warnings, {
      code: 'feed-flash',
      field,
      message: `The feed at ${feedTemperature.toFixed(2)} K is above its boiling point ${feedBoilingPoint.toFixed(2)} K at the body pressure: part of it flashes on entry`,
      // Below the boiling point the feed does not flash: no lower bound of its own (the caller
      // states the physical one of its temperatures).
      validRange: { min: 0, max: feedBoilingPoint, unit: 'K' },
      ...templated(
        'The feed at {feed} is above its boiling point {boilingPoint} at the body pressure: part of it flashes on entry',
        'temperature',
        { feed: feedTemperature, boilingPoint: feedBoilingPoint },
      ),
    });
  }
}

/**
 * Warns when a product's mass fraction is within 5 % (relative) of the liquor's solubility
 * limit at its temperature ("near-solubility-limit") or above it ("above-solubility-limit").
 * Silent when the model gives no limit; a "solubility-not-checked" warning (not a refusal) when the
 * temperature lies outside the range of the model's solubility correlation.
 */
export function warnSolubility(
  liquor: LiquorModel,
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
  field = 'product.massFraction',
): void {
  if (!liquor.solubilityLimit) return;
  let limit: number;
  try {
    limit = liquor.solubilityLimit(temperature);
  } catch (err) {
    // A solubility correlation often covers a narrower temperature range than the boiling-point
    // model. Inside the model's own range a missing limit is a warning, never a refusal.
    if (!(err instanceof EngineRangeError)) throw err;
    addWarning(warnings, {
      code: 'solubility-not-checked',
      field,
      message: `The ${liquor.id} solubility correlation does not reach ${temperature.toFixed(2)} K (${err.validRange.min} to ${err.validRange.max} K): the product at x = ${massFraction.toFixed(4)} was not checked against a solubility limit`,
      template: `The ${liquor.id} solubility correlation does not reach {t} ({min} to {max}): the product at x = {x} was not checked against a solubility limit`,
      values: {
        t: { value: temperature, kind: 'temperature' },
        min: { value: err.validRange.min, kind: 'temperature' },
        max: { value: err.validRange.max, kind: 'temperature' },
        x: { value: massFraction, kind: 'massFraction' },
      },
    });
    return;
  }
  if (!Number.isFinite(limit)) return;
  const range = { min: 0, max: limit, unit: 'kg/kg' };
  if (massFraction > limit) {
    addWarning(warnings, {
      code: 'above-solubility-limit',
      field,
      message: `The product at x = ${massFraction.toFixed(4)} is above the ${liquor.id} solubility limit ${limit.toFixed(4)} at ${temperature.toFixed(2)} K: a solid phase would form`,
      template: `The product at x = {x} is above the ${liquor.id} solubility limit {limit} at {t}: a solid phase would form`,
      values: solubilityValues(massFraction, limit, temperature),
      validRange: range,
    });
  } else if (massFraction >= (1 - SOLUBILITY_MARGIN) * limit) {
    addWarning(warnings, {
      code: 'near-solubility-limit',
      field,
      message: `The product at x = ${massFraction.toFixed(4)} is within ${SOLUBILITY_MARGIN * 100} % of the ${liquor.id} solubility limit ${limit.toFixed(4)} at ${temperature.toFixed(2)} K: risk of crystallisation and scaling`,
      template: `The product at x = {x} is within ${SOLUBILITY_MARGIN * 100} % of the ${liquor.id} solubility limit {limit} at {t}: risk of crystallisation and scaling`,
      values: solubilityValues(massFraction, limit, temperature),
      validRange: range,
    });
  }
}

function solubilityValues(x: number, limit: number, t: number): Record<string, EngineQuantity> {
  return {
    x: { value: x, kind: 'massFraction' },
    limit: { value: limit, kind: 'massFraction' },
    t: { value: t, kind: 'temperature' },
  };
}

// ---------------------------------------------------------------------------------------------
// Standard cautions (domain.md §6)
// ---------------------------------------------------------------------------------------------

export interface CautionContext {
  liquor: LiquorModel;
  /** Heating-steam pressure(s), Pa absolute. */
  steamPressures: readonly number[];
  /** Body (vapour-space) pressure(s), Pa absolute. */
  bodyPressures: readonly number[];
}

export const CAUTION_CODES = {
  preliminary: 'preliminary-estimate',
  codes: 'codes-and-licensed-engineer',
  pressure: 'pressure-equipment',
  vacuum: 'vacuum-equipment',
  scalding: 'scalding-steam-and-condensate',
  solubility: 'solubility-and-scaling',
} as const;

/**
 * The cautions every evaporator result carries: preliminary estimate; local codes and a licensed
 * engineer; pressure equipment when any steam is above atmospheric; vacuum equipment when any body
 * is below atmospheric; scalding steam and condensate; a solubility and scaling check; plus the
 * liquor's own cautions (e.g. hot caustic). De-duplicated by code.
 */
export function standardCautions(ctx: CautionContext): EngineCaution[] {
  const out: EngineCaution[] = [
    {
      code: CAUTION_CODES.preliminary,
      message:
        'These results are preliminary engineering estimates from published correlations; verify them before use.',
    },
    {
      code: CAUTION_CODES.codes,
      message:
        'The design of pressure and vacuum equipment falls under local codes and must be done or checked by a licensed engineer.',
    },
  ];
  if (ctx.steamPressures.some((p) => p > STANDARD_ATMOSPHERE)) {
    out.push({
      code: CAUTION_CODES.pressure,
      message:
        'The heating steam is above atmospheric pressure: the steam chest and its lines are pressure equipment (design, relief and inspection under local codes).',
    });
  }
  if (ctx.bodyPressures.some((p) => p < STANDARD_ATMOSPHERE)) {
    out.push({
      code: CAUTION_CODES.vacuum,
      message:
        'The evaporator body runs below atmospheric pressure: it must be designed as a vacuum vessel (external pressure, buckling).',
    });
  }
  out.push({
    code: CAUTION_CODES.scalding,
    message: 'Steam, vapour and condensate lines are scalding hazards.',
  });
  out.push({
    code: CAUTION_CODES.solubility,
    message:
      'Check the product against the solubility limit of its solute: crystallisation, scaling and fouling reduce U and can block tubes.',
  });
  for (const c of ctx.liquor.cautions) {
    if (!out.some((o) => o.code === c.code)) out.push(c);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Sources and balances
// ---------------------------------------------------------------------------------------------

/** The liquor's sources followed by IF97, de-duplicated by key. */
export function collectSources(...liquors: LiquorModel[]): Citation[] {
  const out: Citation[] = [];
  for (const c of [...liquors.flatMap((l) => l.sources), IF97_CITATION]) {
    if (!out.some((o) => o.key === c.key)) out.push(c);
  }
  return out;
}

/**
 * Relative residual of a balance: |Σ in − Σ out| / max(|Σ in|, |Σ out|); 0 when both sides are 0.
 * Each term is a flow of mass (kg/s), solute (kg/s) or energy (W).
 */
export function balanceResidual(inflows: readonly number[], outflows: readonly number[]): number {
  let a = 0;
  let b = 0;
  for (const v of inflows) a += v;
  for (const v of outflows) b += v;
  const scale = Math.max(Math.abs(a), Math.abs(b));
  return scale === 0 ? 0 : Math.abs(a - b) / scale;
}
