/**
 * Small dense linear systems for the engine's solvers (n up to a few dozen).
 *
 * Gaussian elimination with partial (row) pivoting, in place, on a row-major Float64Array.
 * Source: G. H. Golub and C. F. Van Loan, "Matrix Computations", 4th ed., Johns Hopkins
 * University Press, 2013, algorithm 3.4.1 (Gaussian elimination with partial pivoting) and
 * 3.1.1/3.1.2 (forward and back substitution).
 */
import { EngineNoSolutionError } from '../errors.js';

/**
 * Solves A·x = b for x. A is n×n, row-major (A[i·n + j] is row i, column j); both A and b are
 * overwritten (b receives x, which is also returned). Throws {@link EngineNoSolutionError} when a
 * pivot is zero or tiny relative to the largest entry of its column (a singular or nearly
 * singular system), or when an entry is not finite; never returns NaN.
 *
 * @param a n×n matrix, row-major, overwritten by its LU factors
 * @param b right-hand side of length n, overwritten by the solution
 * @param n order of the system
 */
export function solveLinearSystem(a: Float64Array, b: Float64Array, n: number): Float64Array {
  if (a.length < n * n || b.length < n) {
    throw new EngineNoSolutionError(`Linear system of order ${n} given arrays that are too short`, {
      reason: 'bad-linear-system',
    });
  }
  let scale = 0;
  for (let k = 0; k < n * n; k++) {
    const v = a[k] as number;
    if (!Number.isFinite(v)) {
      throw new EngineNoSolutionError('Linear system has a non-finite coefficient', { reason: 'non-finite' });
    }
    scale = Math.max(scale, Math.abs(v));
  }
  const tiny = scale * 1e-14;
  for (let k = 0; k < n; k++) {
    // pivot: the largest |a[i][k]| for i ≥ k
    let p = k;
    let best = Math.abs(a[k * n + k] as number);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k] as number);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (!(best > tiny)) {
      throw new EngineNoSolutionError('The linear system is singular (no unique solution)', {
        reason: 'singular-matrix',
      });
    }
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const t = a[k * n + j] as number;
        a[k * n + j] = a[p * n + j] as number;
        a[p * n + j] = t;
      }
      const t = b[k] as number;
      b[k] = b[p] as number;
      b[p] = t;
    }
    const pivot = a[k * n + k] as number;
    for (let i = k + 1; i < n; i++) {
      const f = (a[i * n + k] as number) / pivot;
      if (f === 0) continue;
      a[i * n + k] = f;
      for (let j = k + 1; j < n; j++) a[i * n + j] = (a[i * n + j] as number) - f * (a[k * n + j] as number);
      b[i] = (b[i] as number) - f * (b[k] as number);
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i] as number;
    for (let j = i + 1; j < n; j++) s -= (a[i * n + j] as number) * (b[j] as number);
    b[i] = s / (a[i * n + i] as number);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(b[i] as number)) {
      throw new EngineNoSolutionError('The linear system gave a non-finite solution', {
        reason: 'non-finite',
      });
    }
  }
  return b;
}
