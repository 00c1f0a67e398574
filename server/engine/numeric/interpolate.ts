/**
 * Small interpolation and fitting helpers for tabulated data (pure functions, SI-agnostic).
 */

/** Linear interpolation (or extrapolation) through (x0, y0) and (x1, y1) at x. Requires x0 ≠ x1. */
export function lerp(x0: number, y0: number, x1: number, y1: number, x: number): number {
  return y0 + ((y1 - y0) * (x - x0)) / (x1 - x0);
}

/**
 * Index i of the interval [xs[i], xs[i+1]] of a strictly increasing array (length ≥ 2) to use for
 * x: the interval containing x, or the first / last interval when x lies beyond the ends
 * (so the caller extrapolates the end segment). Binary search, O(log n).
 */
export function segmentIndex(xs: readonly number[], x: number): number {
  const n = xs.length;
  if (n < 2) throw new RangeError('segmentIndex needs at least two abscissae');
  let lo = 0;
  let hi = n - 2;
  if (x <= (xs[1] as number)) return 0;
  if (x >= (xs[n - 2] as number)) return n - 2;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((xs[mid] as number) <= x) lo = mid;
    else hi = mid;
  }
  return lo;
}

/** Piecewise-linear interpolation in a strictly increasing table, extrapolating the end segments. */
export function interpolateLinear(xs: readonly number[], ys: readonly number[], x: number): number {
  const i = segmentIndex(xs, x);
  return lerp(xs[i] as number, ys[i] as number, xs[i + 1] as number, ys[i + 1] as number, x);
}

/** Slope dy/dx of the segment {@link interpolateLinear} uses at x. */
export function interpolateSlope(xs: readonly number[], ys: readonly number[], x: number): number {
  const i = segmentIndex(xs, x);
  return ((ys[i + 1] as number) - (ys[i] as number)) / ((xs[i + 1] as number) - (xs[i] as number));
}

export interface LineFit {
  /** Intercept. */
  intercept: number;
  slope: number;
  /** Largest |y_i − (intercept + slope·x_i)| over the points. */
  maxDeviation: number;
}

/**
 * Ordinary least-squares straight line y = intercept + slope·x through n ≥ 2 points with distinct
 * x (exact for two points). Centred sums for numerical stability.
 */
export function fitLine(xs: readonly number[], ys: readonly number[]): LineFit {
  const n = xs.length;
  if (n < 2 || ys.length !== n) throw new RangeError('fitLine needs at least two (x, y) pairs');
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += xs[i] as number;
    my += ys[i] as number;
  }
  mx /= n;
  my /= n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const dx = (xs[i] as number) - mx;
    sxx += dx * dx;
    sxy += dx * ((ys[i] as number) - my);
  }
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  let maxDeviation = 0;
  for (let i = 0; i < n; i++) {
    maxDeviation = Math.max(
      maxDeviation,
      Math.abs((ys[i] as number) - intercept - slope * (xs[i] as number)),
    );
  }
  return { intercept, slope, maxDeviation };
}
