/**
 * IAPWS-IF97 backward equations of regions 1 and 2, lean: T(p, h) and T(p, s), plus their
 * refinement on the forward equations and h(p, s). Plain arithmetic, no allocation.
 *
 * Source: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam": section 5.2 (region 1: eq. 11 with Table 6, eq. 13
 * with Table 8) and section 6.3 (region 2: eqs. 22–24 with Tables 20–22 and the B2bc boundary,
 * eqs. 25–27 with Tables 25–27 and the boundary s = 5.85 kJ/(kg·K)).
 *
 * The backward equations are consistent with the forward ones only within the release's
 * tolerances (region 1: 25 mK, eqs. 12 and 14; region 2: 10 mK in subregions 2a and 2b, 25 mK in
 * 2c, Tables 23 and 28, from memory; measured on 10 000 evaporator-range states: 23.5 mK for
 * region 1 T(p, h), 9.3, 8.2 and 16.8 mK for 2a, 2b and 2c T(p, h)), so the `…AtPH` / `…AtPS` functions take them as the start of Newton steps on the forward
 * equation (∂h/∂T)_p = c_p, (∂s/∂T)_p = c_p/T, until h or s is reproduced to about 1e-13 relative;
 * one or two steps are enough from a 25 mK start.
 *
 * Table 20's n₃₂ is 0.19127729239660e5 and Table 25's n₁₂ is 0.42163260207864e6 as the release
 * prints them; the wrapped npm package `@neutrium/thermo.eos.iapws97` 2.0.2 carries
 * 19127.7292396 and 421632.6027864 (python3-iapws carries the release's values).
 *
 * No range checks here: the adapter (steam/if97.ts) checks every input and picks the region.
 */
import { b2bcPressure } from './if97-boundaries.js';
import * as region1 from './if97-region1.js';
import * as region2 from './if97-region2.js';
import * as series from './if97-lean-series.js';

const { powerSeries, sumSeries } = series;
const { region1Enthalpy, region1Properties } = region1;
const { region2Enthalpy, region2Properties } = region2;

/**
 * IAPWS R7-97(2012) Table 6: I, J, n of eq. 11, region 1 T(p, h):
 *   θ = T/1 K = Σ nᵢ·π^Iᵢ·(η + 1)^Jᵢ,  π = p/1 MPa,  η = h/2500 kJ/kg.
 */
// prettier-ignore
const TABLE_6 = [
  // I, J, n
  0, 0, -0.23872489924521e3,
  0, 1, 0.40421188637945e3,
  0, 2, 0.11349746881718e3,
  0, 6, -0.58457616048039e1,
  0, 22, -0.1528548241314e-3,
  0, 32, -0.10866707695377e-5,
  1, 0, -0.13391744872602e2,
  1, 1, 0.43211039183559e2,
  1, 2, -0.54010067170506e2,
  1, 3, 0.30535892203916e2,
  1, 4, -0.65964749423638e1,
  1, 10, 0.93965400878363e-2,
  1, 32, 0.1157364750534e-6,
  2, 10, -0.25858641282073e-4,
  2, 32, -0.40644363084799e-8,
  3, 10, 0.66456186191635e-7,
  3, 32, 0.80670734103027e-10,
  4, 32, -0.93477771213947e-12,
  5, 32, 0.58265442020601e-14,
  6, 32, -0.15020185953503e-16,
];

/**
 * IAPWS R7-97(2012) Table 8: I, J, n of eq. 13, region 1 T(p, s):
 *   θ = T/1 K = Σ nᵢ·π^Iᵢ·(σ + 2)^Jᵢ,  π = p/1 MPa,  σ = s/1 kJ/(kg·K).
 */
// prettier-ignore
const TABLE_8 = [
  // I, J, n
  0, 0, 0.17478268058307e3,
  0, 1, 0.34806930892873e2,
  0, 2, 0.65292584978455e1,
  0, 3, 0.33039981775489e0,
  0, 11, -0.19281382923196e-6,
  0, 31, -0.24909197244573e-22,
  1, 0, -0.26107636489332e0,
  1, 1, 0.22592965981586e0,
  1, 2, -0.64256463395226e-1,
  1, 3, 0.78876289270526e-2,
  1, 12, 0.35672110607366e-9,
  1, 31, 0.17332496994895e-23,
  2, 0, 0.56608900654837e-3,
  2, 1, -0.32635483139717e-3,
  2, 2, 0.44778286690632e-4,
  2, 9, -0.51322156908507e-9,
  2, 31, -0.42522657042207e-25,
  3, 10, 0.26400441360689e-12,
  3, 32, 0.78124600459723e-28,
  4, 32, -0.30732199903668e-30,
];

/**
 * IAPWS R7-97(2012) Table 20: I, J, n of eq. 22, subregion 2a T(p, h):
 *   θ = T/1 K = Σ nᵢ·π^Iᵢ·(η − 2.1)^Jᵢ,  π = p/1 MPa,  η = h/2000 kJ/kg.
 */
// prettier-ignore
const TABLE_20 = [
  // I, J, n
  0, 0, 0.10898952318288e4,
  0, 1, 0.84951654495535e3,
  0, 2, -0.10781748091826e3,
  0, 3, 0.33153654801263e2,
  0, 7, -0.74232016790248e1,
  0, 20, 0.11765048724356e2,
  1, 0, 0.1844574935579e1,
  1, 1, -0.41792700549624e1,
  1, 2, 0.62478196935812e1,
  1, 3, -0.17344563108114e2,
  1, 7, -0.20058176862096e3,
  1, 9, 0.27196065473796e3,
  1, 11, -0.45511318285818e3,
  1, 18, 0.30919688604755e4,
  1, 44, 0.25226640357872e6,
  2, 0, -0.61707422868339e-2,
  2, 2, -0.31078046629583e0,
  2, 7, 0.11670873077107e2,
  2, 36, 0.12812798404046e9,
  2, 38, -0.98554909623276e9,
  2, 40, 0.28224546973002e10,
  2, 42, -0.35948971410703e10,
  2, 44, 0.17227349913197e10,
  3, 24, -0.13551334240775e5,
  3, 44, 0.1284873466465e8,
  4, 12, 0.13865724283226e1,
  4, 32, 0.23598832556514e6,
  4, 44, -0.13105236545054e8,
  5, 32, 0.73999835474766e4,
  5, 36, -0.5519669703006e6,
  5, 42, 0.37154085996233e7,
  6, 34, 0.1912772923966e5,
  6, 44, -0.41535164835634e6,
  7, 28, -0.62459855192507e2,
];

/**
 * IAPWS R7-97(2012) Table 21: I, J, n of eq. 23, subregion 2b T(p, h):
 *   θ = Σ nᵢ·(π − 2)^Iᵢ·(η − 2.6)^Jᵢ.
 */
// prettier-ignore
const TABLE_21 = [
  // I, J, n
  0, 0, 0.14895041079516e4,
  0, 1, 0.74307798314034e3,
  0, 2, -0.97708318797837e2,
  0, 12, 0.24742464705674e1,
  0, 18, -0.63281320016026e0,
  0, 24, 0.11385952129658e1,
  0, 28, -0.47811863648625e0,
  0, 40, 0.85208123431544e-2,
  1, 0, 0.93747147377932e0,
  1, 2, 0.33593118604916e1,
  1, 6, 0.33809355601454e1,
  1, 12, 0.16844539671904e0,
  1, 18, 0.73875745236695e0,
  1, 24, -0.47128737436186e0,
  1, 28, 0.15020273139707e0,
  1, 40, -0.2176411421975e-2,
  2, 2, -0.21810755324761e-1,
  2, 8, -0.10829784403677e0,
  2, 18, -0.46333324635812e-1,
  2, 40, 0.71280351959551e-4,
  3, 1, 0.11032831789999e-3,
  3, 2, 0.18955248387902e-3,
  3, 12, 0.30891541160537e-2,
  3, 24, 0.13555504554949e-2,
  4, 2, 0.28640237477456e-6,
  4, 12, -0.10779857357512e-4,
  4, 18, -0.76462712454814e-4,
  4, 24, 0.14052392818316e-4,
  4, 28, -0.31083814331434e-4,
  4, 40, -0.10302738212103e-5,
  5, 18, 0.2821728163504e-6,
  5, 24, 0.12704902271945e-5,
  5, 40, 0.73803353468292e-7,
  6, 28, -0.11030139238909e-7,
  7, 2, -0.81456365207833e-13,
  7, 28, -0.25180545682962e-10,
  9, 1, -0.17565233969407e-17,
  9, 40, 0.86934156344163e-14,
];

/**
 * IAPWS R7-97(2012) Table 22: I, J, n of eq. 24, subregion 2c T(p, h):
 *   θ = Σ nᵢ·(π + 25)^Iᵢ·(η − 1.8)^Jᵢ.
 */
// prettier-ignore
const TABLE_22 = [
  // I, J, n
  -7, 0, -0.32368398555242e13,
  -7, 4, 0.73263350902181e13,
  -6, 0, 0.35825089945447e12,
  -6, 2, -0.5834013185159e12,
  -5, 0, -0.1078306821747e11,
  -5, 2, 0.20825544563171e11,
  -2, 0, 0.61074783564516e6,
  -2, 1, 0.8597772253558e6,
  -1, 0, -0.2574572360417e5,
  -1, 2, 0.31081088422714e5,
  0, 0, 0.12082315865936e4,
  0, 1, 0.48219755109255e3,
  1, 4, 0.37966001272486e1,
  1, 8, -0.10842984880077e2,
  2, 4, -0.4536417267666e-1,
  6, 0, 0.14559115658698e-12,
  6, 1, 0.1126159740723e-11,
  6, 4, -0.17804982240686e-10,
  6, 10, 0.12324579690832e-6,
  6, 12, -0.11606921130984e-5,
  6, 16, 0.27846367088554e-4,
  6, 20, -0.59270038474176e-3,
  6, 22, 0.12918582991878e-2,
];

/**
 * IAPWS R7-97(2012) Table 25: I, J, n of eq. 25, subregion 2a T(p, s):
 *   θ = T/1 K = Σ nᵢ·π^Iᵢ·(σ − 2)^Jᵢ,  π = p/1 MPa,  σ = s/2 kJ/(kg·K).
 * I runs in steps of 0.25: the powers are built from π^(1/4).
 */
// prettier-ignore
const TABLE_25 = [
  // I, J, n
  -1.5, -24, -0.39235983861984e6,
  -1.5, -23, 0.5152657382727e6,
  -1.5, -19, 0.40482443161048e5,
  -1.5, -13, -0.32193790923902e3,
  -1.5, -11, 0.96961424218694e2,
  -1.5, -10, -0.22867846371773e2,
  -1.25, -19, -0.44942914124357e6,
  -1.25, -15, -0.50118336020166e4,
  -1.25, -6, 0.35684463560015e0,
  -1, -26, 0.4423533584819e5,
  -1, -21, -0.13673388811708e5,
  -1, -17, 0.42163260207864e6,
  -1, -16, 0.22516925837475e5,
  -1, -9, 0.47442144865646e3,
  -1, -8, -0.14931130797647e3,
  -0.75, -15, -0.19781126320452e6,
  -0.75, -14, -0.2355439947076e5,
  -0.5, -26, -0.19070616302076e5,
  -0.5, -13, 0.55375669883164e5,
  -0.5, -9, 0.38293691437363e4,
  -0.5, -7, -0.60391860580567e3,
  -0.25, -27, 0.19363102620331e4,
  -0.25, -25, 0.4266064369861e4,
  -0.25, -11, -0.59780638872718e4,
  -0.25, -6, -0.70401463926862e3,
  0.25, 1, 0.33836784107553e3,
  0.25, 4, 0.20862786635187e2,
  0.25, 8, 0.33834172656196e-1,
  0.25, 11, -0.43124428414893e-4,
  0.5, 0, 0.16653791356412e3,
  0.5, 1, -0.13986292055898e3,
  0.5, 5, -0.78849547999872e0,
  0.5, 6, 0.72132411753872e-1,
  0.5, 10, -0.59754839398283e-2,
  0.5, 14, -0.12141358953904e-4,
  0.5, 16, 0.23227096733871e-6,
  0.75, 0, -0.10538463566194e2,
  0.75, 4, 0.20718925496502e1,
  0.75, 9, -0.72193155260427e-1,
  0.75, 17, 0.2074988708112e-6,
  1, 7, -0.18340657911379e-1,
  1, 18, 0.29036272348696e-6,
  1.25, 3, 0.21037527893619e0,
  1.25, 15, 0.25681239729999e-3,
  1.5, 5, -0.12799002933781e-1,
  1.5, 18, -0.82198102652018e-5,
];

/**
 * IAPWS R7-97(2012) Table 26: I, J, n of eq. 26, subregion 2b T(p, s):
 *   θ = Σ nᵢ·π^Iᵢ·(10 − σ)^Jᵢ,  σ = s/0.7853 kJ/(kg·K).
 */
// prettier-ignore
const TABLE_26 = [
  // I, J, n
  -6, 0, 0.31687665083497e6,
  -6, 11, 0.20864175881858e2,
  -5, 0, -0.39859399803599e6,
  -5, 11, -0.21816058518877e2,
  -4, 0, 0.22369785194242e6,
  -4, 1, -0.27841703445817e4,
  -4, 11, 0.9920743607148e1,
  -3, 0, -0.75197512299157e5,
  -3, 1, 0.29708605951158e4,
  -3, 11, -0.34406878548526e1,
  -3, 12, 0.38815564249115e0,
  -2, 0, 0.1751129508575e5,
  -2, 1, -0.14237112854449e4,
  -2, 6, 0.10943803364167e1,
  -2, 10, 0.89971619308495e0,
  -1, 0, -0.33759740098958e4,
  -1, 1, 0.47162885818355e3,
  -1, 5, -0.19188241993679e1,
  -1, 8, 0.41078580492196e0,
  -1, 9, -0.33465378172097e0,
  0, 0, 0.13870034777505e4,
  0, 1, -0.40663326195838e3,
  0, 2, 0.4172734715961e2,
  0, 4, 0.21932549434532e1,
  0, 5, -0.10320050009077e1,
  0, 6, 0.35882943516703e0,
  0, 9, 0.52511453726066e-2,
  1, 0, 0.12838916450705e2,
  1, 1, -0.28642437219381e1,
  1, 2, 0.56912683664855e0,
  1, 3, -0.99962954584931e-1,
  1, 7, -0.32632037778459e-2,
  1, 8, 0.23320922576723e-3,
  2, 0, -0.1533480985745e0,
  2, 1, 0.29072288239902e-1,
  2, 5, 0.37534702741167e-3,
  3, 0, 0.17296691702411e-2,
  3, 1, -0.38556050844504e-3,
  3, 3, -0.35017712292608e-4,
  4, 0, -0.14566393631492e-4,
  4, 1, 0.56420857267269e-5,
  5, 0, 0.41286150074605e-7,
  5, 1, -0.20684671118824e-7,
  5, 2, 0.16409393674725e-8,
];

/**
 * IAPWS R7-97(2012) Table 27: I, J, n of eq. 27, subregion 2c T(p, s):
 *   θ = Σ nᵢ·π^Iᵢ·(2 − σ)^Jᵢ,  σ = s/2.9251 kJ/(kg·K).
 */
// prettier-ignore
const TABLE_27 = [
  // I, J, n
  -2, 0, 0.90968501005365e3,
  -2, 1, 0.2404566708842e4,
  -1, 0, -0.5916232638713e3,
  0, 0, 0.54145404128074e3,
  0, 1, -0.27098308411192e3,
  0, 2, 0.97976525097926e3,
  0, 3, -0.46966772959435e3,
  1, 0, 0.14399274604723e2,
  1, 1, -0.19104204230429e2,
  1, 3, 0.53299167111971e1,
  1, 4, -0.21252975375934e2,
  2, 0, -0.3114733441376e0,
  2, 1, 0.60334840894623e0,
  2, 2, -0.42764839702509e-1,
  3, 0, 0.58185597255259e-2,
  3, 1, -0.14597008284753e-1,
  3, 5, 0.56631175631027e-2,
  4, 0, -0.76155864584577e-4,
  4, 1, 0.22440342919332e-3,
  4, 4, -0.12561095013413e-4,
  5, 0, 0.63323132660934e-6,
  5, 1, -0.20541989675375e-5,
  5, 2, 0.36405370390082e-7,
  6, 0, -0.29759897789215e-8,
  6, 1, 0.10136618529763e-7,
  7, 0, 0.59925719692351e-11,
  7, 1, -0.20677870105164e-10,
  7, 3, -0.20874278181886e-10,
  7, 4, 0.10162166825089e-9,
  7, 5, -0.16429828281347e-9,
];

const S6 = powerSeries(TABLE_6);
const S8 = powerSeries(TABLE_8);
const S20 = powerSeries(TABLE_20);
const S21 = powerSeries(TABLE_21);
const S22 = powerSeries(TABLE_22);
const S25 = powerSeries(TABLE_25, 4);
const S26 = powerSeries(TABLE_26);
const S27 = powerSeries(TABLE_27);

/** Upper pressure of subregion 2a, Pa (R7-97(2012) section 6.3.1). */
export const SUBREGION_2A_MAX_PRESSURE = 4e6;
/** Entropy separating subregions 2b and 2c for T(p, s), J/(kg·K) (R7-97(2012) section 6.3.2). */
export const SUBREGION_2BC_ENTROPY = 5.85e3;

/**
 * Region 1 backward temperature T(p, h), R7-97(2012) eq. 11 (Table 6), without refinement.
 *
 * @param p pressure, Pa
 * @param h specific enthalpy, J/kg
 * @returns T, K
 */
export function region1TemperaturePH(p: number, h: number): number {
  return sumSeries(S6, p / 1e6, h / 2.5e6 + 1);
}

/**
 * Region 1 backward temperature T(p, s), R7-97(2012) eq. 13 (Table 8), without refinement.
 *
 * @param p pressure, Pa
 * @param s specific entropy, J/(kg·K)
 * @returns T, K
 */
export function region1TemperaturePS(p: number, s: number): number {
  return sumSeries(S8, p / 1e6, s / 1e3 + 2);
}

/**
 * Region 2 backward temperature T(p, h), R7-97(2012) eqs. 22–24 (Tables 20–22), without
 * refinement. Subregion 2a for p ≤ 4 MPa; above, 2b for p ≤ p_B2bc(h) (eq. 20), 2c otherwise.
 *
 * @param p pressure, Pa
 * @param h specific enthalpy, J/kg
 * @returns T, K
 */
export function region2TemperaturePH(p: number, h: number): number {
  const pi = p / 1e6;
  const eta = h / 2e6;
  if (p <= SUBREGION_2A_MAX_PRESSURE) return sumSeries(S20, pi, eta - 2.1);
  if (p <= b2bcPressure(h)) return sumSeries(S21, pi - 2, eta - 2.6);
  return sumSeries(S22, pi + 25, eta - 1.8);
}

/**
 * Region 2 backward temperature T(p, s), R7-97(2012) eqs. 25–27 (Tables 25–27), without
 * refinement. Subregion 2a for p ≤ 4 MPa; above, 2b for s ≥ 5.85 kJ/(kg·K), 2c otherwise.
 *
 * @param p pressure, Pa
 * @param s specific entropy, J/(kg·K)
 * @returns T, K
 */
export function region2TemperaturePS(p: number, s: number): number {
  const pi = p / 1e6;
  if (p <= SUBREGION_2A_MAX_PRESSURE) return sumSeries(S25, Math.sqrt(Math.sqrt(pi)), s / 2e3 - 2);
  if (s >= SUBREGION_2BC_ENTROPY) return sumSeries(S26, pi, 10 - s / 0.7853e3);
  return sumSeries(S27, pi, 2 - s / 2.9251e3);
}

const scratch = series.leanProperties();
type Forward = (p: number, T: number, out: series.LeanProperties) => series.LeanProperties;
/** Newton steps stop when the residual is below this fraction of max(|target|, floor). */
const RESIDUAL = 1e-13;
const MAX_STEPS = 8;

/** Newton on h(p, T) = h from T0 (at most MAX_STEPS; NaN if it does not settle). */
function refineOnEnthalpy(forward: Forward, p: number, h: number, T0: number): number {
  let T = T0;
  const tol = RESIDUAL * Math.max(Math.abs(h), 1e3);
  for (let i = 0; i < MAX_STEPS; i++) {
    forward(p, T, scratch);
    const f = scratch.h - h;
    if (Math.abs(f) <= tol) return T;
    T -= f / scratch.cp;
  }
  forward(p, T, scratch);
  return Math.abs(scratch.h - h) <= 1e3 * tol ? T : NaN;
}

/** Newton on s(p, T) = s from T0, (∂s/∂T)_p = c_p/T. */
function refineOnEntropy(forward: Forward, p: number, s: number, T0: number): number {
  let T = T0;
  const tol = RESIDUAL * Math.max(Math.abs(s), 1);
  for (let i = 0; i < MAX_STEPS; i++) {
    forward(p, T, scratch);
    const f = scratch.s - s;
    if (Math.abs(f) <= tol) return T;
    T -= (f * T) / scratch.cp;
  }
  forward(p, T, scratch);
  return Math.abs(scratch.s - s) <= 1e3 * tol ? T : NaN;
}

/**
 * T(p, h) in region 1 consistent with the forward equation: eq. 11 as the start, then Newton on
 * eq. 7 until h(p, T) reproduces h to 1e-13 relative.
 *
 * @param p pressure, Pa
 * @param h specific enthalpy, J/kg
 * @returns T, K (NaN if the steps did not settle, e.g. far outside region 1)
 */
export function region1TemperatureAtPH(p: number, h: number): number {
  return refineOnEnthalpy(region1Properties, p, h, region1TemperaturePH(p, h));
}

/**
 * T(p, h) in region 2 consistent with the forward equation: eqs. 22–24 as the start, then Newton
 * on eq. 15.
 *
 * @param p pressure, Pa
 * @param h specific enthalpy, J/kg
 * @returns T, K (NaN if the steps did not settle)
 */
export function region2TemperatureAtPH(p: number, h: number): number {
  return refineOnEnthalpy(region2Properties, p, h, region2TemperaturePH(p, h));
}

/**
 * T(p, s) in region 1 consistent with the forward equation: eq. 13 as the start, then Newton on
 * eq. 7 until s(p, T) reproduces s to 1e-13 relative (absolute 1e-13 J/(kg·K) near s = 0).
 *
 * @param p pressure, Pa
 * @param s specific entropy, J/(kg·K)
 * @returns T, K (NaN if the steps did not settle)
 */
export function region1TemperatureAtPS(p: number, s: number): number {
  return refineOnEntropy(region1Properties, p, s, region1TemperaturePS(p, s));
}

/**
 * T(p, s) in region 2 consistent with the forward equation: eqs. 25–27 as the start, then Newton
 * on eq. 15.
 *
 * @param p pressure, Pa
 * @param s specific entropy, J/(kg·K)
 * @returns T, K (NaN if the steps did not settle)
 */
export function region2TemperatureAtPS(p: number, s: number): number {
  return refineOnEntropy(region2Properties, p, s, region2TemperaturePS(p, s));
}

/**
 * h(p, s) in region 1. R7-97(2012) gives no h(p, s) equation for region 1, so: T from
 * {@link region1TemperatureAtPS}, then h(p, T) from eq. 7.
 *
 * @param p pressure, Pa
 * @param s specific entropy, J/(kg·K)
 * @returns h, J/kg
 */
export function region1EnthalpyAtPS(p: number, s: number): number {
  return region1Enthalpy(p, region1TemperatureAtPS(p, s));
}

/**
 * h(p, s) in region 2 (R7-97(2012) gives none): T from {@link region2TemperatureAtPS}, then h(p, T)
 * from eq. 15.
 *
 * @param p pressure, Pa
 * @param s specific entropy, J/(kg·K)
 * @returns h, J/kg
 */
export function region2EnthalpyAtPS(p: number, s: number): number {
  return region2Enthalpy(p, region2TemperatureAtPS(p, s));
}
