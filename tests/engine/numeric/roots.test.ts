import { describe, expect, it } from 'vitest';
import { brent, brentSolve } from '../../../server/engine/numeric/roots.js';
import { EngineNoSolutionError } from '../../../server/engine/errors.js';

describe('brent', () => {
  it('finds the square root of 2 to the requested tolerance', () => {
    // Reference: Math.SQRT2 is the IEEE-754 double nearest to √2 (ECMAScript specification, §21.3.1.8).
    expect(brent((x) => x * x - 2, 0, 2, { tol: 1e-14 })).toBeCloseTo(Math.SQRT2, 13);
  });

  it("solves Wallis's cubic x³ − 2x − 5 = 0", () => {
    // Reference: the real root 2.0945514815423265… of Wallis's equation, the test Newton's method is
    // classically shown on (e.g. Press et al., Numerical Recipes, 3rd ed., §9.4), from memory;
    // the residual check below does not depend on that recollection.
    const r = brentSolve((x) => x ** 3 - 2 * x - 5, 2, 3, { tol: 1e-13 });
    expect(r.root).toBeCloseTo(2.0945514815423265, 12);
    expect(Math.abs(r.residual)).toBeLessThan(1e-11);
  });

  it('finds the fixed point of cos (the Dottie number) from a wide bracket', () => {
    // Reference: the solution of cos x = x, 0.7390851332151607 (OEIS A003957), from memory.
    expect(brent((x) => Math.cos(x) - x, -10, 10, { tol: 1e-14 })).toBeCloseTo(0.7390851332151607, 13);
  });

  it('converges on a function with a nearly flat region where secant steps stall', () => {
    // Exact root: x = 1 (by construction); Brent must fall back to bisection and still converge.
    const r = brentSolve((x) => (x - 1) ** 9, 0, 3, { tol: 1e-9, maxIter: 500 });
    expect(Math.abs(r.root - 1)).toBeLessThan(1e-2);
    expect(r.iterations).toBeLessThan(500);
  });

  it('returns an end of the bracket when the function is zero there', () => {
    expect(brent((x) => x - 5, 5, 6)).toBe(5);
    expect(brent((x) => x - 6, 5, 6)).toBe(6);
  });

  it('rejects a bracket without a sign change with a typed no-solution error', () => {
    expect(() => brent((x) => x * x + 1, -1, 1)).toThrow(EngineNoSolutionError);
    try {
      brent((x) => x * x + 1, -1, 1);
    } catch (e) {
      expect((e as EngineNoSolutionError).detail.reason).toBe('not-bracketed');
    }
  });

  it('rejects a function that turns NaN inside the bracket instead of returning NaN', () => {
    expect(() => brent((x) => (x > 0.3 ? NaN : x - 0.5), 0, 1)).toThrow(EngineNoSolutionError);
  });

  it('reports non-convergence when the iteration budget is too small', () => {
    expect(() => brent((x) => Math.cos(x) - x, -10, 10, { tol: 1e-15, maxIter: 2 })).toThrow(
      /did not converge in 2 iterations/,
    );
  });

  it('rejects a non-finite bracket', () => {
    expect(() => brent((x) => x, -Infinity, 1)).toThrow(EngineNoSolutionError);
  });
});
