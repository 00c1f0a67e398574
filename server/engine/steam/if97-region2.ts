/**
 * IAPWS-IF97 region 2 (steam), lean: the basic equation for the specific Gibbs free energy, ideal-gas
 * part plus residual part, and the properties derived from it, evaluated with plain arithmetic and
 * no allocation.
 *
 * Source: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam", section 6.1: eqs. 15–17, Table 10 (ideal-gas
 * part), Table 11 (residual part), Table 12 (relations of the properties to γ° and γʳ), Tables 13
 * and 14 (the derivatives).
 *
 * Validity (R7-97(2012) section 4): 0 < p ≤ p_s(T) for 273.15 K ≤ T ≤ 623.15 K, 0 < p ≤ p_B23(T)
 * for 623.15 K < T ≤ 863.15 K, 0 < p ≤ 100 MPa for 863.15 K < T ≤ 1073.15 K. No range checks here:
 * the adapter (steam/if97.ts) checks every input before it calls this module.
 */
import * as series from './if97-lean-series.js';
import type { LeanProperties } from './if97-lean-series.js';

// Module-local aliases: the hot loops below then read constants of this module, not imported
// bindings (which some loaders compile to property getters).
const { derivativeSeries, derivativeSums, fillPowers, R, xPowers, yPowers } = series;

/** Reducing pressure p* = 1 MPa and temperature T* = 540 K (eq. 15). */
const P_STAR = 1e6;
const T_STAR = 540;

/**
 * IAPWS R7-97(2012) Table 10: J°, n° of the ideal-gas part, eq. 16,
 *   γ°(π, τ) = ln π + Σ n°ᵢ·τ^J°ᵢ.
 */
// prettier-ignore
const TABLE_10 = [
  // J°, n°
  0, -0.96927686500217e1,
  1, 0.10086655968018e2,
  -5, -0.5608791128302e-2,
  -4, 0.71452738081455e-1,
  -3, -0.40710498223928e0,
  -2, 0.14240819171444e1,
  -1, -0.4383951131945e1,
  2, -0.28408632460772e0,
  3, 0.21268463753307e-1,
];

/**
 * IAPWS R7-97(2012) Table 11: I, J, n of the residual part, eq. 17,
 *   γʳ(π, τ) = Σ nᵢ·π^Iᵢ·(τ − 0.5)^Jᵢ.
 */
// prettier-ignore
const TABLE_11 = [
  // I, J, n
  1, 0, -0.17731742473213e-2,
  1, 1, -0.17834862292358e-1,
  1, 2, -0.45996013696365e-1,
  1, 3, -0.57581259083432e-1,
  1, 6, -0.5032527872793e-1,
  2, 1, -0.33032641670203e-4,
  2, 2, -0.18948987516315e-3,
  2, 4, -0.39392777243355e-2,
  2, 7, -0.43797295650573e-1,
  2, 36, -0.26674547914087e-4,
  3, 0, 0.20481737692309e-7,
  3, 1, 0.43870667284435e-6,
  3, 3, -0.3227767723857e-4,
  3, 6, -0.15033924542148e-2,
  3, 35, -0.40668253562649e-1,
  4, 1, -0.78847309559367e-9,
  4, 2, 0.12790717852285e-7,
  4, 3, 0.48225372718507e-6,
  5, 7, 0.22922076337661e-5,
  6, 3, -0.16714766451061e-10,
  6, 16, -0.21171472321355e-2,
  6, 35, -0.23895741934104e2,
  7, 0, -0.5905956432427e-17,
  7, 11, -0.12621808899101e-5,
  7, 25, -0.38946842435739e-1,
  8, 8, 0.11256211360459e-10,
  8, 36, -0.82311340897998e1,
  9, 13, 0.19809712802088e-7,
  10, 4, 0.10406965210174e-18,
  10, 10, -0.10234747095929e-12,
  10, 14, -0.10018179379511e-8,
  16, 29, -0.80882908646985e-10,
  16, 50, 0.10693031879409e0,
  18, 57, -0.33662250574171e0,
  20, 20, 0.89185845355421e-24,
  20, 35, 0.30629316876232e-12,
  20, 48, -0.42002467698208e-5,
  21, 21, -0.59056029685639e-25,
  22, 53, 0.37826947613457e-5,
  23, 39, -0.12768608934681e-14,
  24, 26, 0.73087610595061e-28,
  24, 40, 0.55414715350778e-16,
  24, 58, -0.9436970724121e-6,
];

const IDEAL_COUNT = TABLE_10.length / 2;
const J0 = new Int32Array(IDEAL_COUNT);
const N0 = new Float64Array(IDEAL_COUNT);
for (let k = 0; k < IDEAL_COUNT; k++) {
  J0[k] = TABLE_10[2 * k] as number;
  N0[k] = TABLE_10[2 * k + 1] as number;
}
/** τ^J° for J° = −5 … 3, at index J° + IDEAL_OFFSET (with room for fillPowers' chains). */
const idealPowers = new Float64Array(16);
const IDEAL_MIN = -5;
const IDEAL_OFFSET = -IDEAL_MIN + series.POWER_OFFSET;

const T11 = derivativeSeries(TABLE_11);
const { count, xIndex, yIndex, nJ } = T11;
/** s0 … sIJ of {@link derivativeSums}. */
const sums = new Float64Array(6);

/**
 * Sums of the ideal-gas part at τ (Table 13): γ° − ln π, τ·γ°_τ and τ²·γ°_ττ, left in
 * idealSums[0..2].
 */
const idealSums = new Float64Array(3);
function idealPart(tau: number): void {
  fillPowers(idealPowers, tau, IDEAL_MIN, 3);
  let g = 0;
  let tg = 0;
  let ttg = 0;
  for (let k = 0; k < IDEAL_COUNT; k++) {
    const J = J0[k] as number;
    const t = (N0[k] as number) * (idealPowers[J + IDEAL_OFFSET] as number);
    g += t;
    tg += J * t;
    ttg += J * (J - 1) * t;
  }
  idealSums[0] = g;
  idealSums[1] = tg;
  idealSums[2] = ttg;
}

/**
 * Specific enthalpy of region 2, R7-97(2012) Table 12: h = R·T·τ·(γ°_τ + γʳ_τ), with
 * γ°_τ = Σ n°ᵢ·J°ᵢ·τ^(J°ᵢ−1) (Table 13) and γʳ_τ = Σ nᵢ·π^Iᵢ·Jᵢ·(τ − 0.5)^(Jᵢ−1) (Table 14).
 *
 * @param p pressure, Pa
 * @param T temperature, K
 * @returns h, J/kg
 */
export function region2Enthalpy(p: number, T: number): number {
  const pi = p / P_STAR;
  const tau = T_STAR / T;
  const y = tau - 0.5;
  // Ideal-gas part: τ·γ°_τ = Σ n°·J°·τ^J°, with the powers built by multiplication.
  fillPowers(idealPowers, tau, IDEAL_MIN, 3);
  let tg0 = 0;
  for (let k = 0; k < IDEAL_COUNT; k++) {
    const J = J0[k] as number;
    tg0 += J * (N0[k] as number) * (idealPowers[J + IDEAL_OFFSET] as number);
  }
  fillPowers(xPowers, pi, T11.iMin, T11.iMax);
  fillPowers(yPowers, y, T11.jMin, T11.jMax);
  let sJ = 0;
  for (let k = 0; k < count; k++) {
    sJ +=
      (nJ[k] as number) * (xPowers[xIndex[k] as number] as number) * (yPowers[yIndex[k] as number] as number);
  }
  // R·T·τ·(γ°_τ + γʳ_τ) = R·T·(τγ°_τ) + R·T*·(Σ n·J·π^I·y^J)/y
  return R * T * tg0 + (R * T_STAR * sJ) / y;
}

/**
 * All forward properties of region 2 at (p, T): R7-97(2012) eqs. 15–17 with the relations of
 * Table 12,
 *   v = RT/p·π(γ°_π + γʳ_π),  u = RT(τ(γ°_τ + γʳ_τ) − π(γ°_π + γʳ_π)),
 *   s = R(τ(γ°_τ + γʳ_τ) − (γ° + γʳ)),  h = RTτ(γ°_τ + γʳ_τ),  c_p = −Rτ²(γ°_ττ + γʳ_ττ),
 *   c_v = R(−τ²(γ°_ττ + γʳ_ττ) − (1 + πγʳ_π − τπγʳ_πτ)²/(1 − π²γʳ_ππ)),
 *   w² = RT(1 + 2πγʳ_π + π²γʳ_π²)/((1 − π²γʳ_ππ) + (1 + πγʳ_π − τπγʳ_πτ)²/(τ²(γ°_ττ + γʳ_ττ))),
 * with γ°_π = 1/π.
 *
 * @param p pressure, Pa
 * @param T temperature, K
 * @param out filled with v (m³/kg), u, h (J/kg), s, c_p, c_v (J/(kg·K)), w (m/s)
 * @returns out
 */
export function region2Properties(p: number, T: number, out: LeanProperties): LeanProperties {
  const pi = p / P_STAR;
  const tau = T_STAR / T;
  const y = tau - 0.5;
  idealPart(tau);
  const g0 = Math.log(pi) + (idealSums[0] as number);
  const tg0 = idealSums[1] as number; // τ·γ°_τ
  const ttg0 = idealSums[2] as number; // τ²·γ°_ττ
  derivativeSums(T11, pi, y, sums);
  const s0 = sums[0] as number;
  const sI = sums[1] as number;
  const sII = sums[2] as number;
  const sJ = sums[3] as number;
  const sJJ = sums[4] as number;
  const sIJ = sums[5] as number;
  // Table 14, written as π·γʳ_π = sI, π²·γʳ_ππ = sII, τ·γʳ_τ = τ·sJ/y, τ²·γʳ_ττ = τ²·sJJ/y²,
  // τ·π·γʳ_πτ = τ·sIJ/y.
  const piGr = sI;
  const pi2Grr = sII;
  const tauGr = (tau * sJ) / y;
  const tau2Grr = (tau * tau * sJJ) / (y * y);
  const tauPiGrt = (tau * sIJ) / y;
  const RT = R * T;
  const tauG = tg0 + tauGr; // τ(γ°_τ + γʳ_τ)
  const tau2Gtt = ttg0 + tau2Grr; // τ²(γ°_ττ + γʳ_ττ)
  const a = 1 + piGr - tauPiGrt;
  const b = 1 - pi2Grr;
  out.v = (RT / p) * (1 + piGr);
  out.u = RT * (tauG - (1 + piGr));
  out.s = R * (tauG - (g0 + s0));
  out.h = RT * tauG;
  out.cp = -R * tau2Gtt;
  out.cv = R * (-tau2Gtt - (a * a) / b);
  out.w = Math.sqrt((RT * (1 + 2 * piGr + piGr * piGr)) / (b + (a * a) / tau2Gtt));
  return out;
}
