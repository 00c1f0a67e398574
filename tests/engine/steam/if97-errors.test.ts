/**
 * Out-of-range input to the IF97 adapter raises EngineRangeError naming the input and its range.
 * The ranges are those of IAPWS R7-97(2012) section 4 (273.15–1073.15 K at p ≤ 100 MPa; region 5
 * 1073.15–2273.15 K at p ≤ 50 MPa; saturation 273.15 K–Tc, 611.213 Pa–pc).
 */
import { describe, expect, it } from 'vitest';
import { EngineRangeError } from '../../../server/engine/errors.js';
import {
  saturationAtPressure,
  saturationAtTemperature,
  saturationPressure,
  saturationTemperature,
  stateAtPH,
  stateAtPT,
} from '../../../server/engine/steam/if97.js';

function rangeError(fn: () => unknown): EngineRangeError {
  try {
    fn();
  } catch (e) {
    if (e instanceof EngineRangeError) return e;
    throw e;
  }
  throw new Error('no error thrown');
}

describe('IF97 adapter range errors', () => {
  it('rejects a negative pressure with the valid pressure range', () => {
    const e = rangeError(() => stateAtPT(-1e5, 300));
    expect(e.field).toBe('pressure');
    expect(e.validRange).toEqual({ min: 0, max: 100e6, unit: 'Pa' }); // R7-97(2012) section 4
  });

  it('rejects NaN pressure and NaN temperature instead of returning NaN', () => {
    expect(rangeError(() => stateAtPT(Number.NaN, 300)).field).toBe('pressure');
    expect(rangeError(() => stateAtPT(1e5, Number.NaN)).field).toBe('temperature');
    expect(rangeError(() => stateAtPH(1e5, Number.NaN)).field).toBe('enthalpy');
  });

  it('rejects 200 MPa with the 100 MPa upper limit', () => {
    const e = rangeError(() => stateAtPT(200e6, 500));
    expect(e.field).toBe('pressure');
    expect(e.validRange.max).toBe(100e6); // R7-97(2012) section 4
  });

  it('rejects 250 K with the 273.15 K lower limit', () => {
    const e = rangeError(() => stateAtPT(1e5, 250));
    expect(e.field).toBe('temperature');
    expect(e.validRange).toEqual({ min: 273.15, max: 2273.15, unit: 'K' }); // R7-97(2012) section 4
  });

  it('rejects 3000 K with the region-5 upper limit of 2273.15 K', () => {
    expect(rangeError(() => stateAtPT(1e5, 3000)).validRange.max).toBe(2273.15); // R7-97(2012) section 4
  });

  it('rejects region-5 temperatures above 50 MPa', () => {
    const e = rangeError(() => stateAtPT(60e6, 1500));
    expect(e.field).toBe('pressure');
    expect(e.validRange.max).toBe(50e6); // R7-97(2012) section 4, region 5
  });

  it('rejects saturation outside the saturation line with its range', () => {
    // R7-97(2012) section 8: eq. 30 valid 273.15 K to 647.096 K, eq. 31 611.213 Pa to 22.064 MPa.
    expect(rangeError(() => saturationPressure(700)).validRange.max).toBe(647.096);
    expect(rangeError(() => saturationTemperature(30e6)).validRange.max).toBe(22.064e6);
    expect(rangeError(() => saturationTemperature(100)).validRange.min).toBe(611.213);
    expect(rangeError(() => saturationAtTemperature(650)).field).toBe('temperature');
    expect(rangeError(() => saturationAtPressure(-5)).field).toBe('pressure');
  });

  it('rejects an enthalpy outside the formulation at that pressure with the enthalpy range', () => {
    const e = rangeError(() => stateAtPH(1e5, 1e8));
    expect(e.field).toBe('enthalpy');
    expect(e.validRange.unit).toBe('J/kg');
    expect(e.validRange.max).toBeLessThan(1e8);
  });
});
