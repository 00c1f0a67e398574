// One way for engine tests to say "this input is refused with a range error naming the field".
import { expect } from 'vitest';
import { EngineRangeError } from '../../server/engine/errors.js';

/**
 * Runs `call`, expects it to throw an EngineRangeError whose field (and, when given, value and
 * valid range) match, and returns the error for any further checks.
 */
export function expectRangeError(
  call: () => unknown,
  expected: { field: string; value?: number; validRange?: EngineRangeError['validRange'] },
): EngineRangeError {
  let caught: unknown;
  try {
    call();
  } catch (error) {
    caught = error;
  }
  expect(caught).toBeInstanceOf(EngineRangeError);
  const e = caught as EngineRangeError;
  expect(e.field).toBe(expected.field);
  if (expected.value !== undefined) expect(e.value).toBe(expected.value);
  if (expected.validRange !== undefined) expect(e.validRange).toEqual(expected.validRange);
  return e;
}
