/**
 * Dense linear solver (Gaussian elimination with partial pivoting). Checks are property-free:
 * a system built from a chosen solution x must give x back; a singular system must be refused.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineNoSolutionError } from '../../../server/engine/errors.js';
import { solveLinearSystem } from '../../../server/engine/numeric/linear.js';

describe('solveLinearSystem', () => {
  it('needs pivoting to solve a system with a zero leading entry', () => {
    // [[0, 1], [1, 0]]·x = [2, 3] has x = [3, 2] (elimination without pivoting divides by 0)
    const x = solveLinearSystem(Float64Array.from([0, 1, 1, 0]), Float64Array.from([2, 3]), 2);
    expect(Array.from(x)).toEqual([3, 2]);
  });

  it('recovers a chosen solution of a diagonally dominant random system', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 12 }).chain((n) =>
          fc.record({
            n: fc.constant(n),
            a: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n * n, maxLength: n * n }),
            x: fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: n, maxLength: n }),
          }),
        ),
        ({ n, a, x }) => {
          const m = Float64Array.from(a);
          for (let i = 0; i < n; i++) m[i * n + i] = (m[i * n + i] as number) + 2 * n; // well conditioned
          const b = new Float64Array(n);
          for (let i = 0; i < n; i++) {
            let s = 0;
            for (let j = 0; j < n; j++) s += (m[i * n + j] as number) * (x[j] as number);
            b[i] = s;
          }
          const got = solveLinearSystem(Float64Array.from(m), b, n);
          for (let i = 0; i < n; i++)
            expect(Math.abs((got[i] as number) - (x[i] as number))).toBeLessThan(1e-9);
        },
      ),
      { numRuns: 200, seed: 7 },
    );
  });

  it('refuses a singular system instead of returning NaN or Infinity', () => {
    expect(() => solveLinearSystem(Float64Array.from([1, 2, 2, 4]), Float64Array.from([1, 2]), 2)).toThrow(
      EngineNoSolutionError,
    );
    expect(() =>
      solveLinearSystem(Float64Array.from([1, Number.NaN, 0, 1]), Float64Array.from([1, 1]), 2),
    ).toThrow(EngineNoSolutionError);
  });
});
