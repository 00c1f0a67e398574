/**
 * Typed errors raised by the engine. The HTTP layer maps them to RFC 9457 problem details
 * (422 with the field, the value and the valid range); the engine itself knows nothing of HTTP.
 */

import type { EngineQuantity } from './types.js';

/** A closed or half-open interval in SI units (the unit is named for the message). */
export interface ValidRange {
  min: number;
  max: number;
  unit: string;
}

/** An input lies outside the range where a method or model can give a meaningful answer. */
export class EngineRangeError extends Error {
  override readonly name = 'EngineRangeError';
  constructor(
    /** Dotted path of the offending input as the engine knows it, e.g. "massFraction", "effects[2].area". */
    readonly field: string,
    readonly value: number,
    readonly validRange: ValidRange,
    message?: string,
    /** Where in a larger calculation the value arose, unit-free (e.g. "effect 2"), for messages. */
    readonly context?: string,
    /**
     * Why the range applies, free of numbers and units ("the solution would boil above the
     * model's temperature limit; lower the pressure"): a caller says the numbers in its units.
     */
    readonly reason?: string,
  ) {
    super(
      message ??
        `${field} = ${value} ${validRange.unit} is outside the valid range ${validRange.min} to ${validRange.max} ${validRange.unit}`,
    );
  }
}

/** Inputs that are each valid but contradict one another (e.g. a product leaner than the feed). */
export class EngineInputError extends Error {
  override readonly name = 'EngineInputError';
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
  }
}

/** The balances have no physical solution for these inputs, or the solver could not find one. */
export class EngineNoSolutionError extends Error {
  override readonly name = 'EngineNoSolutionError';
  constructor(
    message: string,
    readonly detail: {
      iterations?: number;
      residual?: number;
      reason: string;
      /** The message as data (as a warning's): `{name}` stands for `values.name`, an SI value. */
      template?: string;
      values?: Record<string, EngineQuantity>;
    } = { reason: 'no-solution' },
  ) {
    super(message);
  }
}
