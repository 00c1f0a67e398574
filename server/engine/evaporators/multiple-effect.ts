/**
 * Multiple-effect evaporator train: design for equal heat-transfer areas, or rating of given
 * areas. Pure: SI numbers in and out, water and steam only through ../steam/if97.ts.
 *
 * Model (textbook multiple-effect balances, e.g. C.J. Geankoplis, Transport Processes and
 * Separation Process Principles, 4th ed., Prentice Hall (2003), section 8.5; W.L. McCabe,
 * J.C. Smith, P. Harriott, Unit Operations of Chemical Engineering, 7th ed., McGraw-Hill (2005),
 * chapter 16):
 * - Effects 1…N. Steam condenses in the chest of effect 1 at T_s = T_sat(p_s). Effect i boils at
 *   pressure p_i: water-saturation ("vapour") temperature T_i = T_sat(p_i), liquor boiling point
 *   T_b,i = T_i + BPR_i(x_i, p_i) from the liquor model at the liquor leaving effect i. p_N is given.
 * - The vapour V_i leaves superheated by BPR_i: H_V,i = IF97 region 2 at (p_i, T_b,i). Less any
 *   bleed B_i, it condenses in the chest of effect i+1 at T_i (so the BPR is lost as driving force):
 *   Q_{i+1} = (V_i − B_i)·(H_V,i − h_c,i), h_c,i the condensate enthalpy (saturated at p_i, or
 *   subcooled by `vaporCondensateSubcooling`). Q_1 = S·(h_steam,in − h_steam,condensate).
 * - Energy balance of effect i: Q_i + L_in,i·h_in,i = V_i·H_V,i + L_out,i·h_L,i, with liquor
 *   enthalpies from the liquor model at (x, T_b); mass and solute balances along the liquor path.
 * - Area: A_i = Q_i / (U_i·ΔT_i), ΔT_i = T_cond,i − T_b,i (condensing temperature of the heating
 *   medium minus the liquor boiling point INCLUDING its BPR); T_cond,1 = T_s, T_cond,i = T_{i−1}.
 *
 * Design ('equal-area'): unknowns S, V_1…V_N, T_1…T_{N−1} and the common area A (2N+1); equations:
 * N energy balances, N area equations A_i = A, total evaporation ΣV = F·(1 − x_F/x_P).
 * Rating ('given-areas'): unknowns S, V_1…V_N, T_1…T_{N−1} (2N); equations: N energy balances and
 * N area equations A_i = given A_i; the product concentration is an output. (Rating for a fixed
 * product that finds the feed rate is not implemented.)
 *
 * Solver (a decoupled scheme, the classic area-equalisation made exact):
 * 1. For the current temperatures and concentrations, every enthalpy, BPR and latent heat is
 *    frozen; the N energy balances plus one closure equation are then LINEAR in (S, V_1…V_N):
 *    design closure ΣV = F − L_P; rating closure Σ Q_i/(U_i·A_i) = T_s − T_N − Σ BPR_i (the area
 *    equations summed). Solved by Gaussian elimination with partial pivoting (../numeric/linear.ts).
 * 2. The new duties fix the temperature drops: design ΔT_i ∝ Q_i/U_i, rating ΔT_i = Q_i/(U_i·A_i),
 *    scaled so that ΣΔT_i = T_s − T_N − ΣBPR_i; T_i follows from T_{i−1} − ΔT_i − BPR_i.
 * 3. Concentrations, BPRs and enthalpies are refreshed and the two steps repeated, with Anderson
 *    acceleration (D.G. Anderson, "Iterative procedures for nonlinear integral equations",
 *    J. ACM 12(4), 1965, 547–560; H.F. Walker and P. Ni, "Anderson acceleration for fixed-point
 *    iterations", SIAM J. Numer. Anal. 49(4), 2011, 1715–1735) on the vector of temperatures and
 *    concentrations. The residuals are exact (fresh IF97 and liquor properties each iteration);
 *    only the iteration map is approximate, so the converged point satisfies the full equations.
 *    Each iteration evaluates each needed state once: 2 IF97 states per effect.
 * Flows are kept ≥ 0 by halving the step in V whenever a liquor flow would vanish or a
 * concentration would leave the liquor model's limits; ΔT_i > 0 by construction (Q_i > 0).
 *
 * Feed arrangements: 'forward' (1→N), 'backward' (N→1), an explicit order (a permutation of effect
 * numbers, e.g. [2, 3, 1]), or 'parallel': fresh feed to every effect, each effect concentrating
 * its share to the product concentration x_P. Split rule for parallel feed: each effect takes the
 * share F_i = V_i/(1 − x_F/x_P) that its own evaporation V_i turns into product at x_P (so
 * ΣF_i = F); the split follows from the energy balances and is reported per effect. The product
 * is the mixture of all effect outlets (its temperature from the mixture enthalpy).
 *
 * Options:
 * - vaporBleeds: kg/s taken from effect i's vapour to another user; it does not reach chest i+1.
 * - feedPreheat: the fresh feed is heated from feed.temperature to feedPreheat.temperature before
 *   entering; duty Q_pre = F·(h(x_F, T_pre) − h(x_F, T_F)). Source 'external' (reported as an
 *   external duty), or a further bleed of vapour from effect j condensing at p_j (saturated
 *   condensate; T_pre must stay below T_j): B_pre = Q_pre/(H_V,j − h_c,j), added to effect j's bleed.
 * - condensateFlash: condensate cascade with flash tanks (the usual arrangement): the condensate of
 *   chest j (j ≥ 2, vapour chests only; steam condensate returns to the boiler) together with the
 *   liquid cascaded from the previous flash tank is flashed to the pressure of chest j+1 (p_j);
 *   the flash vapour joins effect j's vapour heading to chest j+1 and the liquid cascades on. With
 *   saturated condensate everywhere, Fl_j = M_j·(h_f,j−1 − h_f,j)/(h_g,j − h_f,j), M_j = Σ_{k<j}(V_k − B_k).
 *   Requires vaporCondensateSubcooling = 0. The last chest's cascade leaves at p_{N−1}.
 * - Hydrostatic head and heat losses are not modelled here (surface boiling points).
 */
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type { LiquorModel } from '../liquors/model.js';
import { solveLinearSystem } from '../numeric/linear.js';
import { brentSolve } from '../numeric/roots.js';
import {
  IF97,
  saturationPressure,
  saturationTemperature,
  saturatedLiquidEnthalpy,
  saturatedVaporEnthalpy,
  enthalpyAtPT,
} from '../steam/if97.js';
import { addWarning, type Citation, type EngineCaution, type EngineWarning } from '../types.js';
import {
  balanceResidual,
  collectSources,
  leavingVapor,
  requireInRange,
  requireMassFraction,
  requirePositive,
  resolveSteamSupply,
  standardCautions,
  warnFeedFlash,
  warnLargeSteamSuperheat,
  warnLargeTemperatureDifference,
  warnSmallTemperatureDifference,
  warnSolubility,
  type SteamSupplySpec,
} from './common.js';

export type FeedArrangement = 'forward' | 'backward' | 'parallel' | readonly number[];
export type MultipleEffectMode = 'equal-area' | 'given-areas';

export interface VaporBleed {
  /** Effect number (1…N) whose vapour is bled. */
  effect: number;
  /** kg/s */
  massFlow: number;
}

export interface FeedPreheat {
  /** Temperature the fresh feed is heated to before it enters, K (≥ feed.temperature). */
  temperature: number;
  /** 'external' (default) or vapour bled from an effect (effect number 1…N). */
  source?: 'external' | { vaporFromEffect: number };
}

export interface MultipleEffectInput {
  mode: MultipleEffectMode;
  liquor: LiquorModel;
  feed: {
    /** kg/s */
    massFlow: number;
    /** Solute mass fraction, 0 < x < 1. */
    massFraction: number;
    /** K */
    temperature: number;
  };
  /** Product solute mass fraction (required for 'equal-area', not allowed for 'given-areas'). */
  productMassFraction?: number;
  steam: SteamSupplySpec;
  /** Vapour-space pressure of the last effect, Pa absolute. */
  lastEffectPressure: number;
  /** U_i per effect, W/(m²·K); its length sets the number of effects (1…10). */
  overallHeatTransferCoefficients: readonly number[];
  /** Areas per effect, m² (required for 'given-areas'). */
  areas?: readonly number[];
  /** Default 'forward'. */
  feedArrangement?: FeedArrangement;
  vaporBleeds?: readonly VaporBleed[];
  feedPreheat?: FeedPreheat;
  /** Condensate flash cascade (see the module comment). Default false. */
  condensateFlash?: boolean;
  /** Subcooling of the condensate leaving the vapour chests 2…N, K. Default 0 (saturated). */
  vaporCondensateSubcooling?: number;
  /**
   * Smallest acceptable ΔT in any effect, K. Default 2 K: an engineering floor (common practice:
   * below a couple of kelvin boiling heat transfer is unreliable and the area grows as 1/ΔT);
   * 0 accepts any positive ΔT.
   */
  minimumTemperatureDifference?: number;
  /** Default 200. */
  maxIterations?: number;
}

export interface HeatingMedium {
  source: 'steam' | number;
  /** Pa */
  pressure: number;
  /** K */
  condensingTemperature: number;
}

export interface EffectResult {
  number: number;
  /** Vapour-space pressure, Pa. */
  pressure: number;
  /** Water saturation temperature at the pressure, K. */
  vaporTemperature: number;
  /** K */
  boilingPoint: number;
  /** K */
  boilingPointRise: number;
  /** Condensing temperature of the heating medium − liquor boiling point (BPR included), K. */
  temperatureDifference: number;
  /** W/(m²·K) */
  overallHeatTransferCoefficient: number;
  /** kg/s of liquor entering (fresh feed share for parallel feed). */
  liquorInFlow: number;
  /** K, temperature of the liquor entering. */
  liquorInTemperature: number;
  /** kg/s */
  liquorOutFlow: number;
  /** Solute mass fraction of the liquor leaving. */
  massFraction: number;
  /** Vapour generated, kg/s. */
  vaporFlow: number;
  /** Vapour superheat (= BPR), K. */
  vaporSuperheat: number;
  /** J/kg */
  vaporEnthalpy: number;
  /** Vapour bled to other users (including any feed-preheat bleed), kg/s. */
  vaporBleed: number;
  /** Condensate-flash vapour joining this effect's vapour to the next chest, kg/s. */
  flashVapor: number;
  /** Heat transferred in the chest, W. */
  duty: number;
  /** m² */
  area: number;
  heatingMedium: HeatingMedium;
}

export interface MultipleEffectResult {
  mode: MultipleEffectMode;
  feedArrangement: 'forward' | 'backward' | 'parallel' | 'custom';
  /** Liquor path as effect numbers (for parallel: every effect takes fresh feed). */
  liquorOrder: number[];
  effects: EffectResult[];
  steam: {
    /** kg/s */
    massFlow: number;
    /** Pa */
    pressure: number;
    /** Condensing temperature, K. */
    temperature: number;
    /** J/kg */
    latentHeat: number;
    /** J/kg given per kg (latent + desuperheat + subcooling). */
    heatPerKg: number;
  };
  /** m² */
  totalArea: number;
  /** Common area (design) or mean area (rating), m². */
  area: number;
  /** Total vapour generated, kg/s. */
  evaporation: number;
  /** evaporation / steam. */
  steamEconomy: number;
  product: { massFlow: number; massFraction: number; temperature: number; enthalpy: number };
  feedPreheat?: { duty: number; source: 'external' | number; bleed: number; temperature: number };
  iterations: number;
  /** Largest scaled residual of the full equations at the returned point. */
  residual: number;
  balances: { mass: number; solute: number; energy: number; effects: number[] };
  warnings: EngineWarning[];
  cautions: EngineCaution[];
  sources: Citation[];
}

const METHOD_SOURCES: Citation[] = [
  {
    key: 'geankoplis-2003',
    reference:
      'C.J. Geankoplis, Transport Processes and Separation Process Principles, 4th ed., Prentice Hall (2003), section 8.5 (multiple-effect evaporators)',
  },
  {
    key: 'anderson-1965',
    reference:
      'D.G. Anderson, Iterative procedures for nonlinear integral equations, J. ACM 12(4) (1965) 547–560',
  },
];

const MAX_EFFECTS = 10;
/** Anderson works on [T (K), 100·x]: a change of 0.01 in x weighs like 1 K. */
const X_SCALE = 100;

// ---------------------------------------------------------------------------------------------
// Input validation
// ---------------------------------------------------------------------------------------------

function resolveOrder(arrangement: FeedArrangement, n: number): { order: number[]; parallel: boolean } {
  if (arrangement === 'forward') return { order: range(n), parallel: false };
  if (arrangement === 'backward') return { order: range(n).reverse(), parallel: false };
  if (arrangement === 'parallel') return { order: range(n), parallel: true };
  if (!Array.isArray(arrangement)) {
    throw new EngineInputError(
      'feedArrangement',
      `feedArrangement must be 'forward', 'backward', 'parallel' or an array of effect numbers`,
    );
  }
  const arr = arrangement as readonly number[];
  if (arr.length !== n) {
    throw new EngineInputError(
      'feedArrangement',
      `feedArrangement lists ${arr.length} effects but the train has ${n}: give a permutation of 1…${n}`,
    );
  }
  const seen = new Set<number>();
  arr.forEach((e, k) => {
    if (!Number.isInteger(e) || e < 1 || e > n) {
      throw new EngineRangeError(`feedArrangement[${k}]`, e, { min: 1, max: n, unit: 'effect number' });
    }
    if (seen.has(e)) {
      throw new EngineInputError(`feedArrangement[${k}]`, `effect ${e} appears twice in feedArrangement`);
    }
    seen.add(e);
  });
  return { order: arr.map((e) => e - 1), parallel: false };
}

function range(n: number): number[] {
  return Array.from({ length: n }, (_, i) => i);
}

function requireEffect(field: string, value: number, n: number): number {
  if (!Number.isInteger(value) || value < 1 || value > n) {
    throw new EngineRangeError(field, value, { min: 1, max: n, unit: 'effect number' });
  }
  return value - 1;
}

// ---------------------------------------------------------------------------------------------
// The solver
// ---------------------------------------------------------------------------------------------

/**
 * Solves a multiple-effect train: mode 'equal-area' (design for equal areas) or 'given-areas'
 * (rating). See the module comment for the model, the feed arrangements, the options and the
 * solver.
 *
 * @throws EngineRangeError / EngineInputError for invalid inputs, naming the field
 * @throws EngineNoSolutionError when no physical solution exists (e.g. the boiling-point rises
 *   use up the available temperature difference, an effect's ΔT falls below the minimum, a bleed
 *   takes more vapour than an effect makes, the areas would evaporate all the feed) or when the
 *   iteration does not converge; never returns NaN.
 */
/**
 * The quantity a liquor model's own input names stands for inside effect i: the model checks
 * "temperature" (the liquor's boiling temperature in the effect), "pressure" (the effect's vapour
 * space) and "massFraction" (the liquor leaving the effect).
 */
const EFFECT_QUANTITY: Record<string, string> = {
  temperature: 'boilingTemperature',
  pressure: 'pressure',
  massFraction: 'massFraction',
};

/**
 * Runs a property evaluation of one stream and re-labels what the liquor model or IF97 reports:
 * a range error or a warning about "temperature" becomes one about `effects[i].boilingTemperature`
 * (or `feed.temperature`), with "effect i+1: " leading its text, so a refusal names the effect and
 * the quantity rather than a request field that merely shares the word.
 */
function labelled<T>(
  where: { field: (quantity: string) => string; text: string },
  sink: EngineWarning[] | undefined,
  run: (inner: EngineWarning[] | undefined) => T,
): T {
  const inner: EngineWarning[] | undefined = sink ? [] : undefined;
  let out: T;
  try {
    out = run(inner);
  } catch (err) {
    if (err instanceof EngineRangeError && !err.context) {
      throw new EngineRangeError(
        where.field(err.field),
        err.value,
        err.validRange,
        `${where.text}: ${err.message}`,
        where.text,
      );
    }
    if (err instanceof EngineInputError) {
      throw new EngineInputError(where.field(err.field), `${where.text}: ${err.message}`);
    }
    throw err;
  }
  for (const w of inner ?? []) {
    addWarning(sink, {
      ...w,
      ...(w.field !== undefined ? { field: where.field(w.field) } : {}),
      message: `${where.text}: ${w.message}`,
    });
  }
  return out;
}

/** Labels for effect i (0-based). */
function effectLabel(i: number): { field: (quantity: string) => string; text: string } {
  return {
    field: (q) => `effects[${i}].${EFFECT_QUANTITY[q] ?? q}`,
    text: `effect ${i + 1}`,
  };
}

export function solveMultipleEffect(input: MultipleEffectInput): MultipleEffectResult {
  // ---- validation ----
  const { liquor } = input;
  if (input.mode !== 'equal-area' && input.mode !== 'given-areas') {
    throw new EngineInputError('mode', `mode must be 'equal-area' or 'given-areas'`);
  }
  const design = input.mode === 'equal-area';
  const U = input.overallHeatTransferCoefficients;
  if (!Array.isArray(U) || U.length < 1 || U.length > MAX_EFFECTS) {
    throw new EngineRangeError(
      'effects',
      Array.isArray(U) ? U.length : Number.NaN,
      { min: 1, max: MAX_EFFECTS, unit: 'effects' },
      `the train must have 1 to ${MAX_EFFECTS} effects (one U per effect in overallHeatTransferCoefficients)`,
    );
  }
  const n = U.length;
  U.forEach((u, i) => requirePositive(`overallHeatTransferCoefficients[${i}]`, u, 'W/(m²·K)'));
  let areas: readonly number[] | undefined;
  if (design) {
    if (input.areas !== undefined) {
      throw new EngineInputError('areas', `areas are an output in 'equal-area' mode; omit them`);
    }
  } else {
    areas = input.areas;
    if (!Array.isArray(areas) || areas.length !== n) {
      throw new EngineInputError('areas', `'given-areas' mode needs one area per effect (${n})`);
    }
    areas.forEach((a, i) => requirePositive(`areas[${i}]`, a, 'm²'));
  }
  const F = input.feed.massFlow;
  requirePositive('feed.massFlow', F, 'kg/s');
  const xF = input.feed.massFraction;
  requireMassFraction('feed.massFraction', xF);
  if (xF <= 0) {
    throw new EngineInputError(
      'feed.massFraction',
      'feed.massFraction = 0: a multiple-effect train is solved for a liquor with solute (feed mass fraction above 0); evaporate pure water with the single-effect calculation',
    );
  }
  const xMax = liquor.limits.massFraction.max;
  let xP = Number.NaN;
  if (design) {
    if (input.productMassFraction === undefined) {
      throw new EngineInputError('productMassFraction', `'equal-area' mode needs productMassFraction`);
    }
    xP = input.productMassFraction;
    requireMassFraction('productMassFraction', xP);
    if (xP <= xF) {
      throw new EngineInputError(
        'productMassFraction',
        `productMassFraction ${xP} must be above the feed mass fraction ${xF}`,
      );
    }
  } else if (input.productMassFraction !== undefined) {
    throw new EngineInputError(
      'productMassFraction',
      `the product concentration is an output in 'given-areas' mode; omit productMassFraction`,
    );
  }
  requireInRange(
    'feed.temperature',
    input.feed.temperature,
    IF97.minTemperature,
    IF97.region13Temperature,
    'K',
  );
  const steam = resolveSteamSupply(input.steam, 'steam');
  const Ts = steam.condensingTemperature;
  requireInRange('lastEffectPressure', input.lastEffectPressure, IF97.minPressure, steam.pressure, 'Pa');
  const pN = input.lastEffectPressure;
  const TN = saturationTemperature(pN);
  const { order, parallel } = resolveOrder(input.feedArrangement ?? 'forward', n);
  const arrangementName: MultipleEffectResult['feedArrangement'] =
    typeof input.feedArrangement === 'string'
      ? input.feedArrangement
      : input.feedArrangement
        ? 'custom'
        : 'forward';
  const minDT = input.minimumTemperatureDifference ?? 2;
  requireInRange('minimumTemperatureDifference', minDT, 0, 100, 'K');
  const subcool = input.vaporCondensateSubcooling ?? 0;
  requireInRange('vaporCondensateSubcooling', subcool, 0, 100, 'K');
  const flash = input.condensateFlash ?? false;
  if (flash && subcool > 0) {
    throw new EngineInputError(
      'condensateFlash',
      'condensate flash assumes saturated condensate: set vaporCondensateSubcooling to 0 or turn the flash off',
    );
  }
  const maxIter = input.maxIterations ?? 200;
  requireInRange('maxIterations', maxIter, 1, 10_000, 'iterations');

  const fixedBleed = new Float64Array(n);
  (input.vaporBleeds ?? []).forEach((b, k) => {
    const e = requireEffect(`vaporBleeds[${k}].effect`, b.effect, n);
    requireInRange(`vaporBleeds[${k}].massFlow`, b.massFlow, 0, F, 'kg/s');
    fixedBleed[e] = (fixedBleed[e] as number) + b.massFlow;
  });

  // feed (after preheat)
  const warnings: EngineWarning[] = [];
  const feedLabel = { field: (q: string) => `feed.${q}`, text: 'feed' };
  const hFeedRaw = labelled(feedLabel, warnings, (w) => liquor.enthalpy(xF, input.feed.temperature, w));
  let TfeedIn = input.feed.temperature;
  let preheatDuty = 0;
  let preheatEffect = -1;
  if (input.feedPreheat) {
    const tp = input.feedPreheat.temperature;
    requireInRange('feedPreheat.temperature', tp, input.feed.temperature, Ts, 'K');
    TfeedIn = tp;
    const src = input.feedPreheat.source ?? 'external';
    if (src !== 'external') {
      preheatEffect = requireEffect('feedPreheat.source.vaporFromEffect', src.vaporFromEffect, n);
    }
  }
  const preheatLabel = {
    field: (q: string) => (q === 'temperature' ? 'feedPreheat.temperature' : `feed.${q}`),
    text: 'preheated feed',
  };
  const hFeed = input.feedPreheat
    ? labelled(preheatLabel, warnings, (w) => liquor.enthalpy(xF, TfeedIn, w))
    : hFeedRaw;
  preheatDuty = F * (hFeed - hFeedRaw);

  // ---- state arrays ----
  const M = n + 1; // unknowns: S, V_1..V_N
  const Tsat = new Float64Array(n); // T_i, water saturation temperature of effect i
  const p = new Float64Array(n);
  const x = new Float64Array(n); // leaving mass fraction
  const bpr = new Float64Array(n);
  const Tb = new Float64Array(n);
  const HV = new Float64Array(n);
  const hf = new Float64Array(n); // saturated liquid at p_i
  const hc = new Float64Array(n); // condensate leaving chest i+1 (condensing vapour of effect i)
  const hL = new Float64Array(n);
  const bleed = new Float64Array(n);
  const z = new Float64Array(M); // S, V
  const zNew = new Float64Array(M);
  const A = new Float64Array(M * M);
  const b = new Float64Array(M);
  const Lin = new Float64Array(n);
  const Lout = new Float64Array(n);
  const Q = new Float64Array(n);
  const dT = new Float64Array(n);
  const Tcond = new Float64Array(n);
  const Uw = new Float64Array(n); // U_i (design) or U_i·A_i (rating)
  for (let i = 0; i < n; i++) Uw[i] = design ? (U[i] as number) : (U[i] as number) * (areas?.[i] as number);
  const E = design ? F * (1 - xF / xP) : Number.NaN;
  let phi = 1; // parallel: F_i = phi·V_i

  const setPressures = (): void => {
    for (let i = 0; i < n - 1; i++) {
      const t = Tsat[i] as number;
      if (!(t > TN && t < Ts)) {
        throw new EngineNoSolutionError(
          'An intermediate effect temperature left the range between the last effect and the steam',
          {
            reason: 'temperature-out-of-range',
          },
        );
      }
      p[i] = saturationPressure(t);
    }
    Tsat[n - 1] = TN;
    p[n - 1] = pN;
  };

  /** Liquor flows and leaving concentrations from V (z), for the current phi. */
  const flowsFrom = (zz: Float64Array): boolean => {
    if (parallel) {
      for (let i = 0; i < n; i++) {
        const v = zz[i + 1] as number;
        Lin[i] = phi * v;
        Lout[i] = (phi - 1) * v;
        if (!(v >= 0)) return false;
      }
      return true;
    }
    let l = F;
    for (let k = 0; k < n; k++) {
      const e = order[k] as number;
      Lin[e] = l;
      const v = zz[e + 1] as number;
      l -= v;
      Lout[e] = l;
      if (!(v >= 0) || !(l > 0)) return false;
    }
    return true;
  };
  const concentrationsFrom = (xx: Float64Array): boolean => {
    for (let i = 0; i < n; i++) {
      const xi = parallel ? xP : (F * xF) / (Lout[i] as number);
      if (!(xi > 0 && xi <= xMax)) return false;
      xx[i] = xi;
    }
    return true;
  };

  /** Freezes every property at the current Tsat, x. */
  const evaluateProperties = (sink: EngineWarning[] | undefined): void => {
    for (let i = 0; i < n; i++) labelled(effectLabel(i), sink, (w) => evaluateEffect(i, w));
    for (let i = 0; i < n; i++) bleed[i] = fixedBleed[i] as number;
    if (preheatEffect >= 0) {
      bleed[preheatEffect] =
        (bleed[preheatEffect] as number) +
        preheatDuty / ((HV[preheatEffect] as number) - (hc[preheatEffect] as number));
    }
  };
  const evaluateEffect = (i: number, sink: EngineWarning[] | undefined): void => {
    {
      const pi = p[i] as number;
      const r = liquor.boilingPointRise(x[i] as number, pi, sink);
      if (!(r >= 0) || !Number.isFinite(r)) {
        throw new EngineNoSolutionError(
          `The liquor model gave an invalid boiling-point rise in effect ${i + 1}`,
          {
            reason: 'invalid-bpr',
          },
        );
      }
      bpr[i] = r;
      const t = (Tsat[i] as number) + r;
      Tb[i] = t;
      HV[i] = leavingVapor(pi, t, Tsat[i] as number).enthalpy;
      hf[i] = saturatedLiquidEnthalpy(pi);
      hc[i] = subcool > 0 ? enthalpyAtPT(pi, (Tsat[i] as number) - subcool) : (hf[i] as number);
      hL[i] = liquor.enthalpy(x[i] as number, t, sink);
    }
  };

  /**
   * Coefficients of Q_i as an affine function of z: Q_i = Σ_j c[j]·z[j] + c[M]. Writes into row.
   */
  const qRow = (i: number, row: Float64Array): void => {
    row.fill(0);
    if (i === 0) {
      row[0] = steam.heatPerKg;
      return;
    }
    const j = i - 1; // vapour of effect j heats chest i
    const lat = (HV[j] as number) - (hc[j] as number);
    row[j + 1] = lat;
    row[M] = -(bleed[j] as number) * lat;
    if (flash && j >= 1) {
      // flash vapour: (h_f,j−1 − h_f,j)·Σ_{k<j}(V_k − B_k)
      const dh = (hf[j - 1] as number) - (hf[j] as number);
      for (let k = 0; k < j; k++) {
        row[k + 1] = (row[k + 1] as number) + dh;
        row[M] = (row[M] as number) - dh * (bleed[k] as number);
      }
    }
  };
  const rowBuf = new Float64Array(M + 1);
  const evalQ = (zz: Float64Array, i: number): number => {
    qRow(i, rowBuf);
    let s = rowBuf[M] as number;
    for (let j = 0; j < M; j++) s += (rowBuf[j] as number) * (zz[j] as number);
    return s;
  };

  const sumBpr = (): number => {
    let s = 0;
    for (let i = 0; i < n; i++) s += bpr[i] as number;
    return s;
  };

  /** Assembles and solves the linear system for (S, V) with frozen properties. */
  const linearSolve = (): void => {
    A.fill(0);
    b.fill(0);
    for (let i = 0; i < n; i++) {
      // Q_i + Lin_i·h_in − V_i·HV_i − Lout_i·hL_i = 0
      qRow(i, rowBuf);
      for (let j = 0; j < M; j++) A[i * M + j] = rowBuf[j] as number;
      let rhs = -(rowBuf[M] as number);
      A[i * M + i + 1] = (A[i * M + i + 1] as number) - (HV[i] as number);
      if (parallel) {
        A[i * M + i + 1] = (A[i * M + i + 1] as number) + phi * hFeed - (phi - 1) * (hL[i] as number);
      } else {
        // Lin_e = F − Σ_{m<k} V_order[m]; Lout_e = Lin_e − V_e
        const k = order.indexOf(i);
        const hin = k === 0 ? hFeed : (hL[order[k - 1] as number] as number);
        const hout = hL[i] as number;
        rhs -= F * (hin - hout);
        for (let m = 0; m < k; m++) {
          const e = order[m] as number;
          A[i * M + e + 1] = (A[i * M + e + 1] as number) - hin + hout;
        }
        A[i * M + i + 1] = (A[i * M + i + 1] as number) + hout;
      }
      b[i] = rhs;
    }
    const r = n * M;
    if (design) {
      for (let j = 1; j < M; j++) A[r + j] = 1;
      b[n] = E;
    } else {
      const avail = Ts - TN - sumBpr();
      for (let i = 0; i < n; i++) {
        qRow(i, rowBuf);
        const w = 1 / (Uw[i] as number);
        for (let j = 0; j < M; j++) A[r + j] = (A[r + j] as number) + w * (rowBuf[j] as number);
        b[n] = (b[n] as number) - w * (rowBuf[M] as number);
      }
      b[n] = (b[n] as number) + avail;
    }
    solveLinearSystem(A, b, M);
    zNew.set(b);
  };

  const noAvailable = (avail: number, iter: number): EngineNoSolutionError =>
    new EngineNoSolutionError(
      `No solution: the boiling-point rises (${sumBpr().toFixed(2)} K in total) use up the available temperature difference ${(Ts - TN).toFixed(2)} K between the steam and the last effect (${avail.toFixed(2)} K left for ${n} effect(s), at least ${(n * minDT).toFixed(2)} K needed)`,
      { iterations: iter, reason: 'boiling-point-rise-exceeds-temperature-difference' },
    );

  // ---- initial guess ----
  if (design) {
    for (let i = 0; i < n; i++) z[i + 1] = E / n;
    if (parallel) phi = 1 / (1 - xF / xP);
  } else {
    for (let i = 0; i < n; i++) z[i + 1] = 0;
    if (parallel) {
      xP = Math.min(2 * xF, 0.5 * (xF + xMax));
      phi = 1 / (1 - xF / xP);
    }
  }
  flowsFrom(z);
  if (parallel) for (let i = 0; i < n; i++) x[i] = design ? xP : xF;
  else if (!concentrationsFrom(x))
    throw new EngineInputError('productMassFraction', 'the product is outside the liquor model');
  // equal drops, first without BPR for the pressures, then with the BPR at those pressures
  for (let i = 0; i < n - 1; i++) Tsat[i] = Ts - ((Ts - TN) * (i + 1)) / n;
  setPressures();
  for (let pass = 0; pass < 2; pass++) {
    for (let i = 0; i < n; i++)
      bpr[i] = labelled(effectLabel(i), undefined, () =>
        liquor.boilingPointRise(x[i] as number, p[i] as number, undefined),
      );
    const avail = Ts - TN - sumBpr();
    if (!(avail > n * minDT) || !(avail > 0)) throw noAvailable(avail, 0);
    let t = Ts;
    for (let i = 0; i < n - 1; i++) {
      t -= avail / n + (bpr[i] as number);
      Tsat[i] = t;
    }
    setPressures();
  }

  // ---- iteration with Anderson acceleration on u = [T_1..T_{N−1}, x_1..x_N] ----
  const nu = n - 1 + n;
  const depth = Math.min(4, nu);
  const u = new Float64Array(nu);
  const gu = new Float64Array(nu);
  const uHist: Float64Array[] = [];
  const fHist: Float64Array[] = [];
  const pack = (dst: Float64Array, tsat: Float64Array, xx: Float64Array): void => {
    for (let i = 0; i < n - 1; i++) dst[i] = tsat[i] as number;
    for (let i = 0; i < n; i++) dst[n - 1 + i] = (xx[i] as number) * X_SCALE;
  };
  const xNew = new Float64Array(n);
  const TsatNew = new Float64Array(n);
  let iterations = 0;
  let converged = false;
  let lastChange = Number.POSITIVE_INFINITY;
  for (let iter = 1; iter <= maxIter; iter++) {
    iterations = iter;
    evaluateProperties(undefined);
    linearSolve();
    // step control on V: halve until flows and concentrations are physical
    let alpha = 1;
    const zTry = new Float64Array(M);
    let ok = false;
    for (let h = 0; h < 30; h++) {
      for (let j = 0; j < M; j++)
        zTry[j] = (z[j] as number) + alpha * ((zNew[j] as number) - (z[j] as number));
      if (parallel && !design) {
        let sv = 0;
        for (let i = 0; i < n; i++) sv += zTry[i + 1] as number;
        if (sv > 0 && sv < F) {
          const xp = (F * xF) / (F - sv);
          if (xp <= xMax) {
            const phiSave = phi;
            phi = 1 / (1 - xF / xp);
            if (flowsFrom(zTry) && zTry[0]! > 0) {
              xP = xp;
              ok = true;
              break;
            }
            phi = phiSave;
          }
        }
      } else if (flowsFrom(zTry) && (zTry[0] as number) > 0 && concentrationsFrom(xNew)) {
        ok = true;
        break;
      }
      alpha *= 0.5;
    }
    if (!ok) {
      throw new EngineNoSolutionError(
        design
          ? 'No physical solution: the balances need a negative flow (a bleed larger than the vapour an effect makes, or an effect whose heat cannot even bring the liquor it receives to its boiling point, e.g. a cold feed with little evaporation per effect)'
          : 'No physical solution: the given areas would evaporate more than the feed can give (or need a negative flow)',
        { iterations: iter, reason: 'negative-flow' },
      );
    }
    if (parallel) for (let i = 0; i < n; i++) xNew[i] = xP;
    z.set(zTry);
    // duties and new temperature drops (BPR at the new concentrations, current pressures)
    let wsum = 0;
    for (let i = 0; i < n; i++) {
      const q = evalQ(z, i);
      Q[i] = q;
      if (!(q > 0)) {
        if (iter > 5) {
          throw new EngineNoSolutionError(
            `No physical solution: effect ${i + 1} would receive no heat (its heating vapour is all bled or condensed elsewhere)`,
            { iterations: iter, reason: 'negative-flow' },
          );
        }
      }
      dT[i] = Math.max(q, 1e-6) / (Uw[i] as number);
      wsum += dT[i] as number;
    }
    for (let i = 0; i < n; i++)
      bpr[i] = labelled(effectLabel(i), undefined, () =>
        liquor.boilingPointRise(xNew[i] as number, p[i] as number, undefined),
      );
    const avail = Ts - TN - sumBpr();
    if (!(avail > 0)) throw noAvailable(avail, iter);
    let t = Ts;
    for (let i = 0; i < n - 1; i++) {
      t -= ((dT[i] as number) / wsum) * avail + (bpr[i] as number);
      TsatNew[i] = t;
    }
    // Anderson mixing
    pack(u, Tsat, x);
    pack(gu, TsatNew, xNew);
    const f = new Float64Array(nu);
    let change = 0;
    for (let k = 0; k < nu; k++) {
      f[k] = (gu[k] as number) - (u[k] as number);
      change = Math.max(change, Math.abs(f[k] as number));
    }
    lastChange = change;
    if (change < 1e-10) {
      converged = true;
      Tsat.set(TsatNew.subarray(0, n - 1));
      x.set(xNew);
      break;
    }
    uHist.push(Float64Array.from(u));
    fHist.push(f);
    if (uHist.length > depth + 1) {
      uHist.shift();
      fHist.shift();
    }
    const next = andersonStep(uHist, fHist, nu);
    // keep the ordering T_s > T_1 > … > T_N and concentrations physical; otherwise plain step
    let valid = true;
    let prev = Ts;
    for (let i = 0; i < n - 1; i++) {
      const ti = next[i] as number;
      if (!(ti < prev - (bpr[i] as number) * 0.5) || !(ti > TN)) valid = false;
      prev = ti;
    }
    for (let i = 0; i < n; i++) {
      const xi = (next[n - 1 + i] as number) / X_SCALE;
      if (!(xi > 0 && xi <= xMax)) valid = false;
    }
    const src = valid ? next : gu;
    for (let i = 0; i < n - 1; i++) Tsat[i] = src[i] as number;
    for (let i = 0; i < n; i++) x[i] = (src[n - 1 + i] as number) / X_SCALE;
    if (!valid) {
      uHist.length = 0;
      fHist.length = 0;
    }
    setPressures();
  }
  if (!converged) {
    throw new EngineNoSolutionError(
      `The multiple-effect iteration did not converge in ${iterations} iterations (last change ${lastChange.toExponential(2)})`,
      { iterations, residual: lastChange, reason: 'not-converged' },
    );
  }

  // ---- final evaluation at the converged point (with warnings) ----
  setPressures();
  flowsFrom(z);
  evaluateProperties(warnings);
  for (let i = 0; i < n; i++) {
    Q[i] = evalQ(z, i);
    Tcond[i] = i === 0 ? Ts : (Tsat[i - 1] as number);
    dT[i] = (Tcond[i] as number) - (Tb[i] as number);
  }
  const areaOut = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const d = dT[i] as number;
    if (!(d > 0) || d < minDT) {
      throw new EngineNoSolutionError(
        `No practical solution: effect ${i + 1} would work with ΔT = ${d.toFixed(3)} K, below the minimum ${minDT} K (too many effects or too little temperature difference for this liquor)`,
        { iterations, reason: 'temperature-difference-below-minimum' },
      );
    }
    areaOut[i] = (Q[i] as number) / ((U[i] as number) * d);
  }
  if (preheatEffect >= 0 && TfeedIn >= (Tsat[preheatEffect] as number)) {
    throw new EngineNoSolutionError(
      `Vapour from effect ${preheatEffect + 1} condenses at ${(Tsat[preheatEffect] as number).toFixed(2)} K and cannot preheat the feed to ${TfeedIn.toFixed(2)} K`,
      { iterations, reason: 'preheat-above-bleed-vapour' },
    );
  }
  for (let i = 0; i < n; i++) {
    const v = z[i + 1] as number;
    if (v - (bleed[i] as number) < -1e-12 * F) {
      throw new EngineNoSolutionError(
        `No physical solution: the vapour bled from effect ${i + 1} (${(bleed[i] as number).toFixed(4)} kg/s) exceeds the vapour it makes (${v.toFixed(4)} kg/s)`,
        { iterations, reason: 'bleed-exceeds-vapour' },
      );
    }
  }

  // residuals of the full equations with fresh properties
  const effBal: number[] = [];
  let residual = 0;
  const qScale = (z[0] as number) * steam.heatPerKg;
  for (let i = 0; i < n; i++) {
    const k = order.indexOf(i);
    const hin = parallel || k === 0 ? hFeed : (hL[order[k - 1] as number] as number);
    const inflow = [Q[i] as number, (Lin[i] as number) * hin];
    const outflow = [(z[i + 1] as number) * (HV[i] as number), (Lout[i] as number) * (hL[i] as number)];
    effBal.push(balanceResidual(inflow, outflow));
    const r = Math.abs(inflow[0]! + inflow[1]! - outflow[0]! - outflow[1]!) / qScale;
    residual = Math.max(residual, r);
  }
  let aMean = 0;
  for (let i = 0; i < n; i++) aMean += (areaOut[i] as number) / n;
  for (let i = 0; i < n; i++) {
    const target = design ? aMean : (areas?.[i] as number);
    residual = Math.max(residual, Math.abs((areaOut[i] as number) - target) / target);
  }

  // flash vapour per effect (reported) and overall energy balance
  const flashV = new Float64Array(n);
  let condensateOut = 0; // energy leaving with vapour-chest condensate
  let cascade = 0;
  for (let j = 0; j < n - 1; j++) {
    const vc = (z[j + 1] as number) - (bleed[j] as number);
    if (flash && j >= 1 && j < n - 1) {
      const hgj = saturatedVaporEnthalpy(p[j] as number);
      flashV[j] = (cascade * ((hf[j - 1] as number) - (hf[j] as number))) / (hgj - (hf[j] as number));
    }
    cascade += vc;
  }
  if (n >= 2) {
    if (flash) condensateOut = cascade * (hf[n - 2] as number);
    else
      for (let j = 0; j < n - 1; j++)
        condensateOut += ((z[j + 1] as number) - (bleed[j] as number)) * (hc[j] as number);
  }
  let productFlow = 0;
  let productEnthalpyFlow = 0;
  if (parallel) {
    for (let i = 0; i < n; i++) {
      productFlow += Lout[i] as number;
      productEnthalpyFlow += (Lout[i] as number) * (hL[i] as number);
    }
  } else {
    const last = order[n - 1] as number;
    productFlow = Lout[last] as number;
    productEnthalpyFlow = productFlow * (hL[last] as number);
  }
  const productX = (F * xF) / productFlow;
  const productH = productEnthalpyFlow / productFlow;
  let productT: number;
  if (parallel && n > 1) {
    let lo = Number.POSITIVE_INFINITY;
    let hi = Number.NEGATIVE_INFINITY;
    for (let i = 0; i < n; i++) {
      lo = Math.min(lo, Tb[i] as number);
      hi = Math.max(hi, Tb[i] as number);
    }
    productT =
      hi - lo < 1e-9
        ? lo
        : brentSolve((t) => liquor.enthalpy(productX, t, undefined) - productH, lo, hi, { tol: 1e-9 }).root;
  } else {
    productT = Tb[parallel ? 0 : (order[n - 1] as number)] as number;
  }
  let vaporOutEnergy = 0;
  let evaporation = 0;
  for (let i = 0; i < n; i++) {
    evaporation += z[i + 1] as number;
    const toCondenserOrUsers = i === n - 1 ? (z[i + 1] as number) : (bleed[i] as number);
    vaporOutEnergy += toCondenserOrUsers * (HV[i] as number);
  }
  const S = z[0] as number;
  const energyIn = [S * steam.enthalpyIn, F * hFeed];
  const energyOut = [S * steam.enthalpyOut, condensateOut, vaporOutEnergy, productEnthalpyFlow];
  const balances = {
    mass: balanceResidual([F], [productFlow, evaporation]),
    solute: balanceResidual([F * xF], [productFlow * productX]),
    energy: balanceResidual(energyIn, energyOut),
    effects: effBal,
  };

  // warnings
  const feedTargets = parallel ? range(n) : [order[0] as number];
  for (const e of feedTargets) warnFeedFlash(TfeedIn, Tb[e] as number, warnings, 'feed.temperature');
  for (let i = 0; i < n; i++) {
    warnSmallTemperatureDifference(dT[i] as number, warnings, `effects[${i}].temperatureDifference`);
    warnLargeTemperatureDifference(dT[i] as number, warnings, `effects[${i}].temperatureDifference`);
  }
  warnLargeSteamSuperheat(steam.superheat, warnings);
  warnSolubility(liquor, productX, productT, warnings, 'product.massFraction');

  const effects: EffectResult[] = [];
  for (let i = 0; i < n; i++) {
    const k = order.indexOf(i);
    const inT = parallel || k === 0 ? TfeedIn : (Tb[order[k - 1] as number] as number);
    effects.push({
      number: i + 1,
      pressure: p[i] as number,
      vaporTemperature: Tsat[i] as number,
      boilingPoint: Tb[i] as number,
      boilingPointRise: bpr[i] as number,
      temperatureDifference: dT[i] as number,
      overallHeatTransferCoefficient: U[i] as number,
      liquorInFlow: Lin[i] as number,
      liquorInTemperature: inT,
      liquorOutFlow: Lout[i] as number,
      massFraction: x[i] as number,
      vaporFlow: z[i + 1] as number,
      vaporSuperheat: bpr[i] as number,
      vaporEnthalpy: HV[i] as number,
      vaporBleed: bleed[i] as number,
      flashVapor: flashV[i] as number,
      duty: Q[i] as number,
      area: areaOut[i] as number,
      heatingMedium:
        i === 0
          ? { source: 'steam', pressure: steam.pressure, condensingTemperature: Ts }
          : { source: i, pressure: p[i - 1] as number, condensingTemperature: Tsat[i - 1] as number },
    });
  }
  let totalArea = 0;
  for (let i = 0; i < n; i++) totalArea += areaOut[i] as number;

  const result: MultipleEffectResult = {
    mode: input.mode,
    feedArrangement: arrangementName,
    liquorOrder: order.map((e) => e + 1),
    effects,
    steam: {
      massFlow: S,
      pressure: steam.pressure,
      temperature: Ts,
      latentHeat: steam.latentHeat,
      heatPerKg: steam.heatPerKg,
    },
    totalArea,
    area: totalArea / n,
    evaporation,
    steamEconomy: evaporation / S,
    product: { massFlow: productFlow, massFraction: productX, temperature: productT, enthalpy: productH },
    iterations,
    residual,
    balances,
    warnings,
    cautions: standardCautions({
      liquor,
      steamPressures: [steam.pressure],
      bodyPressures: Array.from(p),
    }),
    sources: [...collectSources(liquor), ...METHOD_SOURCES],
  };
  if (input.feedPreheat) {
    result.feedPreheat = {
      duty: preheatDuty,
      source: preheatEffect >= 0 ? preheatEffect + 1 : 'external',
      bleed:
        preheatEffect >= 0
          ? preheatDuty / ((HV[preheatEffect] as number) - (hc[preheatEffect] as number))
          : 0,
      temperature: TfeedIn,
    };
  }
  return result;
}

/** Design for equal areas: {@link solveMultipleEffect} with mode 'equal-area'. */
export function designMultipleEffect(input: Omit<MultipleEffectInput, 'mode'>): MultipleEffectResult {
  return solveMultipleEffect({ ...input, mode: 'equal-area' });
}

/** Rating of given areas: {@link solveMultipleEffect} with mode 'given-areas'. */
export function rateMultipleEffect(input: Omit<MultipleEffectInput, 'mode'>): MultipleEffectResult {
  return solveMultipleEffect({ ...input, mode: 'given-areas' });
}

/**
 * One Anderson-acceleration step (type II, least squares by normal equations on the differences):
 * u_new = g_k − Σ γ_j (Δg_j), γ = argmin ‖f_k − ΔF γ‖. With one history entry it is the plain
 * fixed-point step g_k = u_k + f_k. Walker and Ni (2011), algorithm AA with β = 1.
 */
function andersonStep(uHist: Float64Array[], fHist: Float64Array[], nu: number): Float64Array {
  const m = uHist.length - 1;
  const uk = uHist[m] as Float64Array;
  const fk = fHist[m] as Float64Array;
  const out = new Float64Array(nu);
  for (let k = 0; k < nu; k++) out[k] = (uk[k] as number) + (fk[k] as number);
  if (m < 1) return out;
  // ΔF_j = f_{j+1} − f_j, ΔG_j = ΔU_j + ΔF_j
  const dF: Float64Array[] = [];
  const dG: Float64Array[] = [];
  for (let j = 0; j < m; j++) {
    const a = fHist[j] as Float64Array;
    const c = fHist[j + 1] as Float64Array;
    const ua = uHist[j] as Float64Array;
    const uc = uHist[j + 1] as Float64Array;
    const df = new Float64Array(nu);
    const dg = new Float64Array(nu);
    for (let k = 0; k < nu; k++) {
      df[k] = (c[k] as number) - (a[k] as number);
      dg[k] = (uc[k] as number) - (ua[k] as number) + (df[k] as number);
    }
    dF.push(df);
    dG.push(dg);
  }
  const N = new Float64Array(m * m);
  const rhs = new Float64Array(m);
  let diag = 0;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let s = 0;
      for (let k = 0; k < nu; k++) s += (dF[i]![k] as number) * (dF[j]![k] as number);
      N[i * m + j] = s;
    }
    diag = Math.max(diag, N[i * m + i] as number);
    let s = 0;
    for (let k = 0; k < nu; k++) s += (dF[i]![k] as number) * (fk[k] as number);
    rhs[i] = s;
  }
  if (!(diag > 0)) return out;
  for (let i = 0; i < m; i++) N[i * m + i] = (N[i * m + i] as number) + 1e-12 * diag; // regularisation
  let gamma: Float64Array;
  try {
    gamma = solveLinearSystem(N, rhs, m);
  } catch {
    return out;
  }
  for (let j = 0; j < m; j++) {
    const g = gamma[j] as number;
    for (let k = 0; k < nu; k++) out[k] = (out[k] as number) - g * (dG[j]![k] as number);
  }
  return out;
}
