/**
 * The arithmetic shared by Ebullio's lean IAPWS-IF97 core (see if97-lean.ts): coefficient tables
 * of the form Σ nᵢ·x^Iᵢ·y^Jᵢ, as IAPWS R7-97(2012) prints them (one row per term: I, J, n), and
 * the powers of x and y built by repeated multiplication into module-level scratch arrays, so an
 * evaluation allocates nothing and calls no Math.pow.
 *
 * Pure arithmetic: no I/O, no range checks (the adapter, steam/if97.ts, checks every input).
 */

/** A table of terms nᵢ·x^Iᵢ·y^Jᵢ with integer exponents, ready for evaluation. */
export interface PowerSeries {
  readonly count: number;
  /** nᵢ */
  readonly n: Float64Array;
  /** Iᵢ and Jᵢ as numbers (for derivative factors). */
  readonly I: Float64Array;
  readonly J: Float64Array;
  /** Iᵢ − iMin + 3 and Jᵢ − jMin + 3: the index of x^Iᵢ and y^Jᵢ in the power scratch arrays. */
  readonly xIndex: Int32Array;
  readonly yIndex: Int32Array;
  /** Exponent ranges, widened to include 0. */
  readonly iMin: number;
  readonly iMax: number;
  readonly jMin: number;
  readonly jMax: number;
}

/**
 * Builds a {@link PowerSeries} from rows `I, J, n` (in the release's order). `iScale` turns
 * fractional exponents into integers: region 2a's T(p, s) has I in steps of 0.25, so it is written
 * with iScale = 4 and evaluated with x = π^(1/4).
 */
export function powerSeries(rows: readonly number[], iScale = 1): PowerSeries {
  if (rows.length % 3 !== 0) throw new Error('coefficient rows must be I, J, n triples');
  const count = rows.length / 3;
  const n = new Float64Array(count);
  const I = new Float64Array(count);
  const J = new Float64Array(count);
  const scaledI = new Int32Array(count);
  for (let k = 0; k < count; k++) {
    I[k] = rows[3 * k] as number;
    J[k] = rows[3 * k + 1] as number;
    n[k] = rows[3 * k + 2] as number;
    const si = Math.round((I[k] as number) * iScale);
    if (Math.abs(si - (I[k] as number) * iScale) > 1e-12 || !Number.isInteger(J[k])) {
      throw new Error(`exponent not representable at row ${k + 1}`);
    }
    scaledI[k] = si;
  }
  const iMin = Math.min(0, ...scaledI);
  const iMax = Math.max(0, ...scaledI);
  const jMin = Math.min(0, ...J);
  const jMax = Math.max(0, ...J);
  if (iMax - iMin + 2 * POWER_OFFSET >= SCRATCH || jMax - jMin + 2 * POWER_OFFSET >= SCRATCH) {
    throw new Error('exponent range too wide');
  }
  const xIndex = new Int32Array(count);
  const yIndex = new Int32Array(count);
  for (let k = 0; k < count; k++) {
    xIndex[k] = (scaledI[k] as number) - iMin + POWER_OFFSET;
    yIndex[k] = (J[k] as number) - jMin + POWER_OFFSET;
  }
  return { count, n, I, J, xIndex, yIndex, iMin, iMax, jMin, jMax };
}

const SCRATCH = 128;
/**
 * x^k lies at buf[k − min + POWER_OFFSET] after {@link fillPowers}: the offset leaves room for the
 * entries its four chains write before min.
 */
export const POWER_OFFSET = 3;
/** Powers of x and y for the current evaluation (module scratch: evaluation is synchronous). */
export const xPowers = new Float64Array(SCRATCH);
export const yPowers = new Float64Array(SCRATCH);

/**
 * Writes x^k into buf[k − min] for min ≤ k ≤ max (min ≤ 0 ≤ max): positive powers by repeated
 * multiplication, negative ones by repeated multiplication of 1/x. Four interleaved chains
 * (x^k = x^(k−4)·x⁴) keep the multiplications independent of each other, so the processor can
 * overlap them; each power carries at most k/4 + 2 roundings. May write up to three entries past
 * max and before min (the scratch arrays leave room for that).
 */
export function fillPowers(buf: Float64Array, x: number, min: number, max: number): void {
  const zero = -min + 3;
  const x2 = x * x;
  const x4 = x2 * x2;
  let a = 1;
  let b = x;
  let c = x2;
  let d = x2 * x;
  for (let k = zero; k <= zero + max; k += 4) {
    buf[k] = a;
    buf[k + 1] = b;
    buf[k + 2] = c;
    buf[k + 3] = d;
    a *= x4;
    b *= x4;
    c *= x4;
    d *= x4;
  }
  if (min < 0) {
    const i1 = 1 / x;
    const i2 = i1 * i1;
    const i4 = i2 * i2;
    b = i1;
    c = i2;
    d = i2 * i1;
    a = i4;
    for (let k = zero - 1; k >= zero + min; k -= 4) {
      buf[k] = b;
      buf[k - 1] = c;
      buf[k - 2] = d;
      buf[k - 3] = a;
      b *= i4;
      c *= i4;
      d *= i4;
      a *= i4;
    }
  }
}

/** Σ nᵢ·x^Iᵢ·y^Jᵢ (I scaled as the table was built), summed in the table's order. */
export function sumSeries(t: PowerSeries, x: number, y: number): number {
  fillPowers(xPowers, x, t.iMin, t.iMax);
  fillPowers(yPowers, y, t.jMin, t.jMax);
  const { n, xIndex, yIndex, count } = t;
  let sum = 0;
  for (let k = 0; k < count; k++) {
    sum +=
      (n[k] as number) * (xPowers[xIndex[k] as number] as number) * (yPowers[yIndex[k] as number] as number);
  }
  return sum;
}

/**
 * A series with the coefficients of its derivatives ready: n·I, n·I(I−1), n·J, n·J(J−1), n·I·J,
 * so that γ and its first and second derivatives come from one pass over the terms.
 */
export interface DerivativeSeries extends PowerSeries {
  readonly nI: Float64Array;
  readonly nII: Float64Array;
  readonly nJ: Float64Array;
  readonly nJJ: Float64Array;
  readonly nIJ: Float64Array;
}

export function derivativeSeries(rows: readonly number[]): DerivativeSeries {
  const t = powerSeries(rows);
  const nI = new Float64Array(t.count);
  const nII = new Float64Array(t.count);
  const nJ = new Float64Array(t.count);
  const nJJ = new Float64Array(t.count);
  const nIJ = new Float64Array(t.count);
  for (let k = 0; k < t.count; k++) {
    const n = t.n[k] as number;
    const I = t.I[k] as number;
    const J = t.J[k] as number;
    nI[k] = n * I;
    nII[k] = n * I * (I - 1);
    nJ[k] = n * J;
    nJJ[k] = n * J * (J - 1);
    nIJ[k] = n * I * J;
  }
  return { ...t, nI, nII, nJ, nJJ, nIJ };
}

/**
 * The six sums Σ c·x^I·y^J of a {@link DerivativeSeries} for c = n, n·I, n·I(I−1), n·J, n·J(J−1),
 * n·I·J, left in `sums[0..5]` (x and y powers built here). A region turns them into γ and its
 * derivatives by its own variables (Tables 4 and 14 of R7-97(2012)).
 */
export function derivativeSums(t: DerivativeSeries, x: number, y: number, sums: Float64Array): void {
  fillPowers(xPowers, x, t.iMin, t.iMax);
  fillPowers(yPowers, y, t.jMin, t.jMax);
  const { n, nI, nII, nJ, nJJ, nIJ, xIndex, yIndex, count } = t;
  let s0 = 0;
  let sI = 0;
  let sII = 0;
  let sJ = 0;
  let sJJ = 0;
  let sIJ = 0;
  for (let k = 0; k < count; k++) {
    const v = (xPowers[xIndex[k] as number] as number) * (yPowers[yIndex[k] as number] as number);
    s0 += (n[k] as number) * v;
    sI += (nI[k] as number) * v;
    sII += (nII[k] as number) * v;
    sJ += (nJ[k] as number) * v;
    sJJ += (nJJ[k] as number) * v;
    sIJ += (nIJ[k] as number) * v;
  }
  sums[0] = s0;
  sums[1] = sI;
  sums[2] = sII;
  sums[3] = sJ;
  sums[4] = sJJ;
  sums[5] = sIJ;
}

/** Forward properties of one (p, T) state, SI: filled by the lean forward equations. */
export interface LeanProperties {
  /** m³/kg */
  v: number;
  /** J/kg */
  u: number;
  /** J/(kg·K) */
  s: number;
  /** J/kg */
  h: number;
  /** J/(kg·K) */
  cp: number;
  /** J/(kg·K) */
  cv: number;
  /** m/s */
  w: number;
}

/** A fresh {@link LeanProperties} to pass as `out` (allocate once, reuse). */
export function leanProperties(): LeanProperties {
  return { v: NaN, u: NaN, s: NaN, h: NaN, cp: NaN, cv: NaN, w: NaN };
}

/** Specific gas constant of IF97, J/(kg·K) (R7-97(2012) eq. 1). */
export const R = 461.526;
