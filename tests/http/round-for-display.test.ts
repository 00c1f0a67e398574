// Output rounding (server/http/output.ts `r`): 12 significant digits, computed arithmetically
// for the usual magnitudes. Reference: Number.prototype.toPrecision (ECMA-262 §21.1.3.5), which
// rounds the exact decimal expansion; the two may differ only by one unit in the 12th digit of a
// value that lies within an ulp of a rounding tie.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { r } from '../../server/http/output.js';

const reference = (v: number) => Number(v.toPrecision(12));

describe('r (12 significant digits)', () => {
  it('hides binary noise and keeps exact values', () => {
    expect(r(0.1 + 0.2)).toBe(0.3);
    expect(r(1.375)).toBe(1.375);
    expect(r(-2.5)).toBe(-2.5);
    expect(r(100)).toBe(100);
    expect(r(0)).toBe(0);
    expect(r(101.325)).toBe(101.325);
    expect(r(-0.000123456789012345)).toBe(-0.000123456789012);
  });

  it('agrees with toPrecision(12) to within one unit of the 12th digit, and exactly nearly always', () => {
    let differing = 0;
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e12, max: 1e12 }),
        fc.integer({ min: -12, max: 10 }),
        (mantissa, exponent) => {
          const v = (mantissa / 1e12) * 10 ** exponent;
          const got = r(v);
          const want = reference(v);
          if (got !== want) {
            differing++;
            expect(Math.abs(got - want)).toBeLessThanOrEqual(Math.abs(want) * 1.01e-11);
          }
        },
      ),
      { numRuns: 20_000 },
    );
    expect(differing).toBeLessThan(20); // 65 in 2 000 000 in a run made while writing this test
  });

  it('passes non-finite values and extreme magnitudes through the toPrecision path', () => {
    expect(r(Number.POSITIVE_INFINITY)).toBe(Number.POSITIVE_INFINITY);
    expect(Number.isNaN(r(Number.NaN))).toBe(true);
    expect(r(1.23456789012345e20)).toBe(reference(1.23456789012345e20));
    expect(r(1.23456789012345e-20)).toBe(reference(1.23456789012345e-20));
  });
});
