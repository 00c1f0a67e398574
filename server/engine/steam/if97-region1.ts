/**
 * IAPWS-IF97 region 1 (liquid water), lean: the basic equation for the specific Gibbs free energy
 * and the properties derived from it, evaluated with plain arithmetic and no allocation.
 *
 * Source: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam", section 5.1: eq. 7, Table 2 (coefficients), Table 3
 * (relations of the properties to γ and its derivatives), Table 4 (the derivatives).
 *
 * Validity (R7-97(2012) section 4): 273.15 K ≤ T ≤ 623.15 K, p_s(T) ≤ p ≤ 100 MPa. No range checks
 * here: the adapter (steam/if97.ts) checks every input before it calls this module.
 */
import * as series from './if97-lean-series.js';
import type { LeanProperties } from './if97-lean-series.js';

// Module-local aliases: the hot loops below then read constants of this module, not imported
// bindings (which some loaders compile to property getters).
const { derivativeSeries, derivativeSums, fillPowers, R, xPowers, yPowers } = series;

/** Reducing pressure p* = 16.53 MPa and temperature T* = 1386 K (eq. 7). */
const P_STAR = 16.53e6;
const T_STAR = 1386;

/**
 * IAPWS R7-97(2012) Table 2: I, J, n of eq. 7,
 *   γ(π, τ) = g/(RT) = Σ nᵢ·(7.1 − π)^Iᵢ·(τ − 1.222)^Jᵢ,  π = p/p*,  τ = T* / T.
 */
// prettier-ignore
const TABLE_2 = [
  // I, J, n
  0, -2, 0.14632971213167e0,
  0, -1, -0.84548187169114e0,
  0, 0, -0.3756360367204e1,
  0, 1, 0.33855169168385e1,
  0, 2, -0.95791963387872e0,
  0, 3, 0.15772038513228e0,
  0, 4, -0.16616417199501e-1,
  0, 5, 0.81214629983568e-3,
  1, -9, 0.28319080123804e-3,
  1, -7, -0.60706301565874e-3,
  1, -1, -0.18990068218419e-1,
  1, 0, -0.32529748770505e-1,
  1, 1, -0.21841717175414e-1,
  1, 3, -0.5283835796993e-4,
  2, -3, -0.47184321073267e-3,
  2, 0, -0.30001780793026e-3,
  2, 1, 0.47661393906987e-4,
  2, 3, -0.44141845330846e-5,
  2, 17, -0.72694996297594e-15,
  3, -4, -0.31679644845054e-4,
  3, 0, -0.28270797985312e-5,
  3, 6, -0.85205128120103e-9,
  4, -5, -0.22425281908e-5,
  4, -2, -0.65171222895601e-6,
  4, 10, -0.14341729937924e-12,
  5, -8, -0.40516996860117e-6,
  8, -11, -0.12734301741641e-8,
  8, -6, -0.17424871230634e-9,
  21, -29, -0.68762131295531e-18,
  23, -31, 0.14478307828521e-19,
  29, -38, 0.26335781662795e-22,
  30, -39, -0.11947622640071e-22,
  31, -40, 0.18228094581404e-23,
  32, -41, -0.93537087292458e-25,
];

const T2 = derivativeSeries(TABLE_2);
const { count, xIndex, yIndex, nJ } = T2;
/** s0 … sIJ of {@link derivativeSums}. */
const sums = new Float64Array(6);

/**
 * Specific enthalpy of region 1, R7-97(2012) Table 3: h = R·T·τ·γ_τ, with
 * γ_τ = Σ nᵢ·(7.1 − π)^Iᵢ·Jᵢ·(τ − 1.222)^(Jᵢ−1) (Table 4). R·T·τ = R·T*.
 *
 * @param p pressure, Pa
 * @param T temperature, K
 * @returns h, J/kg
 */
export function region1Enthalpy(p: number, T: number): number {
  const x = 7.1 - p / P_STAR;
  const y = T_STAR / T - 1.222;
  fillPowers(xPowers, x, T2.iMin, T2.iMax);
  fillPowers(yPowers, y, T2.jMin, T2.jMax);
  let sJ = 0;
  for (let k = 0; k < count; k++) {
    sJ +=
      (nJ[k] as number) * (xPowers[xIndex[k] as number] as number) * (yPowers[yIndex[k] as number] as number);
  }
  // Σ n·J·x^I·y^J = y·γ_τ
  return (R * T_STAR * sJ) / y;
}

/**
 * All forward properties of region 1 at (p, T): R7-97(2012) eq. 7 with the relations of Table 3,
 *   v = π·γ_π·RT/p,  u = RT(τγ_τ − πγ_π),  s = R(τγ_τ − γ),  h = RTτγ_τ,  c_p = −Rτ²γ_ττ,
 *   c_v = R(−τ²γ_ττ + (γ_π − τγ_πτ)²/γ_ππ),  w² = RT·γ_π²/((γ_π − τγ_πτ)²/(τ²γ_ττ) − γ_ππ).
 *
 * @param p pressure, Pa
 * @param T temperature, K
 * @param out filled with v (m³/kg), u, h (J/kg), s, c_p, c_v (J/(kg·K)), w (m/s)
 * @returns out
 */
export function region1Properties(p: number, T: number, out: LeanProperties): LeanProperties {
  const pi = p / P_STAR;
  const tau = T_STAR / T;
  const x = 7.1 - pi;
  const y = tau - 1.222;
  derivativeSums(T2, x, y, sums);
  const s0 = sums[0] as number;
  const sI = sums[1] as number;
  const sII = sums[2] as number;
  const sJ = sums[3] as number;
  const sJJ = sums[4] as number;
  const sIJ = sums[5] as number;
  // Table 4: d/dπ of (7.1 − π)^I is −I·(7.1 − π)^(I−1).
  const g = s0;
  const gPi = -sI / x;
  const gPiPi = sII / (x * x);
  const gTau = sJ / y;
  const gTauTau = sJJ / (y * y);
  const gPiTau = -sIJ / (x * y);
  const RT = R * T;
  const a = gPi - tau * gPiTau;
  out.v = (RT * gPi) / P_STAR; // π·γ_π·RT/p with π/p = 1/p*
  out.u = RT * (tau * gTau - pi * gPi);
  out.s = R * (tau * gTau - g);
  out.h = RT * tau * gTau;
  out.cp = -R * tau * tau * gTauTau;
  out.cv = R * (-tau * tau * gTauTau + (a * a) / gPiPi);
  out.w = Math.sqrt((RT * gPi * gPi) / ((a * a) / (tau * tau * gTauTau) - gPiPi));
  return out;
}
