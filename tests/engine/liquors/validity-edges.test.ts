// The validity rule at its bounds: round-off from an IAPWS-IF97 round trip is not extrapolation.
import { describe, expect, it } from 'vitest';
import { EngineRangeError } from '../../../server/engine/errors.js';
import { checkAgainst } from '../../../server/engine/liquors/validity.js';
import { saturationPressure, saturationTemperature } from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';

const validity = { min: 323.15, max: 423.15 };
const limits = { min: 273.16, max: 473.15 };

describe('checkAgainst at a bound', () => {
  it('keeps a water boiling point of exactly 50 °C inside after the p_sat → T_sat round trip', () => {
    // IF97 equations 30 and 31 are inverses up to round-off: T_sat(p_sat(323.15 K)) lands about
    // 1e-13 K below 323.15 K (measured here).
    const roundTrip = saturationTemperature(saturationPressure(323.15));
    const warnings: EngineWarning[] = [];
    checkAgainst('test-model', 'waterBoilingTemperature', roundTrip, 'K', validity, limits, warnings);
    expect(warnings).toEqual([]);
  });

  it('still warns a millikelvin outside the data range and refuses a millikelvin beyond the limits', () => {
    const warnings: EngineWarning[] = [];
    checkAgainst('test-model', 'temperature', 323.149, 'K', validity, limits, warnings);
    expect(warnings.map((w) => w.code)).toEqual(['model-extrapolated']);
    expect(() => checkAgainst('test-model', 'temperature', 473.151, 'K', validity, limits, [])).toThrow(
      EngineRangeError,
    );
  });
});
