/**
 * Bracketed scalar root finding for the engine (pure, no allocation inside the loop).
 *
 * Brent's method: inverse quadratic interpolation and secant steps, falling back to
 * bisection whenever the fast step would leave the bracket or converge too slowly, so it is
 * guaranteed to converge for any continuous f with a sign change on [lo, hi].
 * Source: R. P. Brent, "Algorithms for Minimization without Derivatives", Prentice-Hall, 1973,
 * chapter 4 (procedure zero); the same algorithm as W. H. Press et al., "Numerical Recipes",
 * 3rd ed., Cambridge University Press, 2007, section 9.3 (zbrent).
 */
import { EngineNoSolutionError } from '../errors.js';

export interface BrentOptions {
  /** Absolute tolerance on the root, in the unit of x. Default 1e-10 (relative part added: 4·ε·|x|). */
  tol?: number;
  /** Maximum number of iterations. Default 200. */
  maxIter?: number;
}

export interface BrentResult {
  root: number;
  /** f(root) */
  residual: number;
  iterations: number;
}

/**
 * Finds x in [lo, hi] with f(x) = 0, given f(lo) and f(hi) of opposite sign (or one of them 0).
 * Throws {@link EngineNoSolutionError} when the interval does not bracket a root, when f returns
 * a non-finite value, or when maxIter is exhausted; never returns NaN.
 */
export function brentSolve(
  f: (x: number) => number,
  lo: number,
  hi: number,
  options: BrentOptions = {},
): BrentResult {
  const tol = options.tol ?? 1e-10;
  const maxIter = options.maxIter ?? 200;
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || !(tol > 0) || !(maxIter >= 1)) {
    throw new EngineNoSolutionError('Root finder called with a non-finite bracket or bad options', {
      reason: 'bad-bracket',
    });
  }
  let a = lo;
  let b = hi;
  let fa = f(a);
  let fb = f(b);
  if (!Number.isFinite(fa) || !Number.isFinite(fb)) {
    throw new EngineNoSolutionError('The function is not finite at the ends of the bracket', {
      reason: 'non-finite',
    });
  }
  if (fa === 0) return { root: a, residual: 0, iterations: 0 };
  if (fb === 0) return { root: b, residual: 0, iterations: 0 };
  if (fa > 0 === fb > 0) {
    throw new EngineNoSolutionError(
      `No sign change between ${lo} and ${hi}: the interval does not bracket a root`,
      {
        reason: 'not-bracketed',
        residual: Math.min(Math.abs(fa), Math.abs(fb)),
      },
    );
  }
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 1; iter <= maxIter; iter++) {
    if (fb > 0 === fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) {
      return { root: b, residual: fb, iterations: iter };
    }
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      p = Math.abs(p);
      const min1 = 3 * xm * q - Math.abs(tol1 * q);
      const min2 = Math.abs(e * q);
      if (2 * p < Math.min(min1, min2)) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : xm >= 0 ? tol1 : -tol1;
    fb = f(b);
    if (!Number.isFinite(fb)) {
      throw new EngineNoSolutionError(`The function is not finite at x = ${b}`, {
        reason: 'non-finite',
        iterations: iter,
      });
    }
  }
  throw new EngineNoSolutionError(`Root finder did not converge in ${maxIter} iterations`, {
    reason: 'not-converged',
    iterations: maxIter,
    residual: Math.abs(fb),
  });
}

/** {@link brentSolve} returning only the root. */
export function brent(f: (x: number) => number, lo: number, hi: number, options: BrentOptions = {}): number {
  return brentSolve(f, lo, hi, options).root;
}
