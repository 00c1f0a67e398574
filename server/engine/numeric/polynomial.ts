/**
 * Polynomials given by their coefficients in ascending powers: p(x) = Σ c_i·x^i.
 */
import { brent } from './roots.js';

/** p(x) = Σ c_i·x^i by Horner's rule. An empty coefficient list is the zero polynomial. */
export function polyval(coefficients: readonly number[], x: number): number {
  let y = 0;
  for (let i = coefficients.length - 1; i >= 0; i--) y = y * x + (coefficients[i] as number);
  return y;
}

/** Coefficients of p′(x). */
export function polyder(coefficients: readonly number[]): number[] {
  return coefficients.slice(1).map((c, i) => c * (i + 1));
}

/**
 * Minimum of p over [lo, hi] and where it occurs: the ends plus every interior stationary point,
 * located as sign changes of p′ on a fine grid refined by Brent's method. For the low degrees
 * used here (≤ 8) the grid of 512 cells misses only stationary pairs closer than (hi − lo)/512,
 * whose dip below the grid values is negligible.
 */
export function polyMinimum(
  coefficients: readonly number[],
  lo: number,
  hi: number,
): { x: number; value: number } {
  let best = { x: lo, value: polyval(coefficients, lo) };
  const consider = (x: number): void => {
    const value = polyval(coefficients, x);
    if (!(value >= best.value)) best = { x, value };
  };
  consider(hi);
  const d = polyder(coefficients);
  if (d.length === 0 || hi <= lo) return best;
  const cells = 512;
  let xPrev = lo;
  let dPrev = polyval(d, lo);
  for (let k = 1; k <= cells; k++) {
    const x = lo + ((hi - lo) * k) / cells;
    const dx = polyval(d, x);
    consider(x);
    if (dPrev === 0) consider(xPrev);
    else if (dPrev < 0 !== dx < 0 && dx !== 0) {
      consider(brent((t) => polyval(d, t), xPrev, x, { tol: 1e-12 * Math.max(1, Math.abs(hi - lo)) }));
    }
    xPrev = x;
    dPrev = dx;
  }
  return best;
}
