/**
 * The one implementation of the validity rule shared by every liquor model:
 * silent inside `validity`, a "model-extrapolated" warning between `validity` and `limits`,
 * an EngineRangeError beyond `limits` (or for a non-finite value).
 */
import { EngineRangeError } from '../errors.js';
import { addWarning, kindOfSiUnit, templated, type WarningSink } from '../types.js';
import type { Interval } from './model.js';

export function checkAgainst(
  modelId: string,
  field: string,
  value: number,
  unit: string,
  validity: Interval,
  limits: Interval,
  warnings: WarningSink,
): void {
  if (!Number.isFinite(value) || value < limits.min || value > limits.max) {
    throw new EngineRangeError(
      field,
      value,
      { min: limits.min, max: limits.max, unit },
      `${field} = ${value} ${unit} is outside the range of the ${modelId} model (${limits.min} to ${limits.max} ${unit})`,
      undefined,
      `the limits of the ${modelId} model`,
    );
  }
  if (value < validity.min || value > validity.max) {
    addWarning(warnings, {
      code: 'model-extrapolated',
      field,
      message: `${field} = ${value} ${unit} lies outside the ${modelId} model's data range (${validity.min} to ${validity.max} ${unit}); the result is extrapolated`,
      validRange: { min: validity.min, max: validity.max, unit },
      ...templated(
        `{field} = {value} lies outside the ${modelId} model's data range ({min} to {max}); the result is extrapolated`,
        kindOfSiUnit(unit),
        { value, min: validity.min, max: validity.max },
      ),
    });
  }
}
