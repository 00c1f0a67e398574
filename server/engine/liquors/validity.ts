/**
 * The one implementation of the validity rule shared by every liquor model:
 * silent inside `validity`, a "model-extrapolated" warning between `validity` and `limits`,
 * an EngineRangeError beyond `limits` (or for a non-finite value).
 */
import { EngineRangeError } from '../errors.js';
import { addWarning, kindOfSiUnit, templated, type WarningSink } from '../types.js';
import type { Interval } from './model.js';

/**
 * Relative slack at a bound. A value that reaches the engine through a round trip (a water boiling
 * point of exactly 50 °C turned into p_sat and back into T_sat by IAPWS-IF97 equations 30 and 31)
 * can land 1e-13 K on the wrong side of a bound it sits on; a few parts in 10^12 are round-off,
 * not a step outside the model.
 */
const EDGE_SLACK = 1e-12;

function below(value: number, bound: number): boolean {
  return value < bound - EDGE_SLACK * Math.abs(bound);
}
function above(value: number, bound: number): boolean {
  return value > bound + EDGE_SLACK * Math.abs(bound);
}

export function checkAgainst(
  modelId: string,
  field: string,
  value: number,
  unit: string,
  validity: Interval,
  limits: Interval,
  warnings: WarningSink,
  /**
   * The property whose source's range `validity` is, in words ("viscosity"), when it is not the
   * model's main data range: the warning then names it (and is kept apart from other properties').
   */
  property?: string,
): void {
  if (!Number.isFinite(value) || below(value, limits.min) || above(value, limits.max)) {
    throw new EngineRangeError(
      field,
      value,
      { min: limits.min, max: limits.max, unit },
      `${field} = ${value} ${unit} is outside the range of the ${modelId} model (${limits.min} to ${limits.max} ${unit})`,
      undefined,
      `the limits of the ${modelId} model`,
    );
  }
  if (below(value, validity.min) || above(value, validity.max)) {
    const range = property ? `${property} data range` : 'data range';
    const what = property ? `the ${property} is extrapolated` : 'the result is extrapolated';
    addWarning(warnings, {
      code: 'model-extrapolated',
      field,
      message: `${field} = ${value} ${unit} lies outside the ${modelId} model's ${range} (${validity.min} to ${validity.max} ${unit}); ${what}`,
      validRange: { min: validity.min, max: validity.max, unit },
      ...templated(
        `{field} = {value} lies outside the ${modelId} model's ${range} ({min} to {max}); ${what}`,
        kindOfSiUnit(unit),
        { value, min: validity.min, max: validity.max },
      ),
      ...(property ? { property } : {}),
    });
  }
}

/**
 * The validity rule for a property whose source has its own box in mass fraction and temperature
 * (a transport property): each input is checked with {@link checkAgainst} against that box and the
 * model's hard limits, and an extrapolation warning names the property.
 */
export function checkPropertyBox(
  modelId: string,
  property: string,
  box: { massFraction: Interval; temperature: Interval },
  limits: { massFraction: Interval; temperature: Interval },
  massFraction: number,
  temperature: number,
  warnings: WarningSink,
  massFractionUnit = 'kg/kg',
): void {
  checkAgainst(
    modelId,
    'massFraction',
    massFraction,
    massFractionUnit,
    box.massFraction,
    limits.massFraction,
    warnings,
    property,
  );
  checkAgainst(
    modelId,
    'temperature',
    temperature,
    'K',
    box.temperature,
    limits.temperature,
    warnings,
    property,
  );
}
