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
 * - thermocompressor (thermal vapour recompression, TVR): a steam-jet ejector driven by motive
 *   steam at P_m entrains vapour from effect j (default the last) at its pressure p_j and boiling
 *   point (superheated by its BPR, enthalpy H_V,j) and discharges into the chest of effect 1, whose
 *   pressure is then `steam.pressure` (P_c). Ra = motive/entrained from El-Dessouky's correlation
 *   (./thermocompressor.ts) at (P_m, P_c, p_j, T_j); the discharge D = M + E is the chest's steam
 *   (the unknown S), E = D/(1 + Ra) leaves effect j's vapour before chest j+1 (or the condenser),
 *   exactly linear in S, so the linear solve carries it; Ra and the discharge enthalpy
 *   h_d = (Ra·h_m + H_V,j)/(1 + Ra) are refreshed with the other properties each iteration. The
 *   chest gives h_d − h_c per kg (superheat and latent heat down to its condensate).
 * - Hydrostatic head and heat losses are not modelled here (surface boiling points).
 *
 * Figures of merit (./figures-of-merit.ts): distillate = total evaporation; heating steam = the
 * steam (the motive steam with a thermocompressor), its heat released per kg its enthalpy less the
 * chest-1 condensate's.
 */
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type { OverallCoefficientProvider, OverallCoefficientResult } from '../heat-transfer/overall.js';
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
  stateAtPH,
} from '../steam/if97.js';
import { addWarning, type Citation, type EngineCaution, type EngineWarning } from '../types.js';
import { figuresOfMerit, type FiguresOfMerit } from './figures-of-merit.js';
import {
  checkThermocompressor,
  dischargeEnthalpy,
  requireWorkingEjector,
  THERMOCOMPRESSOR_SOURCE,
} from './thermocompressor.js';
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
  type SteamSupply,
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

/** A steam-jet thermocompressor whose discharge heats effect 1 (thermal vapour recompression). */
export interface ThermocompressorSpec {
  /** Motive steam pressure P_m, Pa absolute. */
  motivePressure: number;
  /** Superheat of the motive steam, K (default 0: saturated). */
  motiveSuperheat?: number;
  /** Effect (1…N) whose vapour is entrained; default the last. */
  entrainedFromEffect?: number;
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
  /**
   * U_i per effect, W/(m²·K); its length sets the number of effects (1…10). An entry may be a
   * provider that estimates U at the effect's state (its liquor's mass fraction, boiling point and
   * pressure, and the condensing temperature of its heating steam or vapour), re-evaluated every
   * iteration: U and the area of that effect then refer to the outside area of the tubes.
   */
  overallHeatTransferCoefficients: readonly (number | OverallCoefficientProvider)[];
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
  /** Thermal vapour recompression: `steam` is then the ejector's discharge (see the module comment). */
  thermocompressor?: ThermocompressorSpec;
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
  /** W/(m²·K) (the estimate's at the converged state, when a provider was given) */
  overallHeatTransferCoefficient: number;
  /** The estimate of U at the converged state, when U was given as a provider. */
  heatTransfer?: OverallCoefficientResult;
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
  /** The ejector, with a thermocompressor (then `steam` is its discharge and `steamEconomy` per kg motive). */
  thermocompressor?: {
    /** M, kg/s. */
    motiveSteamFlow: number;
    /** E, kg/s. */
    entrainedVaporFlow: number;
    /** E/M = 1/Ra, kg entrained per kg motive. */
    entrainmentRatio: number;
    /** Ra = M/E, kg motive per kg entrained (El-Dessouky's correlation). */
    motivePerEntrained: number;
    /** P_c/P_e. */
    compressionRatio: number;
    /** P_m/P_e. */
    expansionRatio: number;
    /** Pa */
    motivePressure: number;
    /** J/kg */
    motiveEnthalpy: number;
    /** Effect number (1…N) entrained from. */
    entrainedFromEffect: number;
    /** P_e, Pa. */
    suctionPressure: number;
    /** h_d, J/kg. */
    dischargeEnthalpy: number;
    /** Temperature of the discharge at P_c (superheated, or saturated when wet), K. */
    dischargeTemperature: number;
  };
  /** Desalination figures of merit (./figures-of-merit.ts). */
  figuresOfMerit: FiguresOfMerit;
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

/** The validated thermocompressor (SI). */
interface Ejector {
  motivePressure: number;
  motiveEnthalpy: number;
  /** 0-based effect entrained from. */
  suction: number;
}
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
// Labels: which effect and quantity a liquor or IF97 message is about
// ---------------------------------------------------------------------------------------------

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
        err.reason,
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
      context: w.context ?? where.text,
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

// ---------------------------------------------------------------------------------------------
// Named state
// ---------------------------------------------------------------------------------------------

/** The validated train: everything fixed before the iteration starts (SI). */
interface TrainSpec {
  input: MultipleEffectInput;
  liquor: LiquorModel;
  /** true for 'equal-area' (design), false for 'given-areas' (rating). */
  design: boolean;
  /** Number of effects. */
  n: number;
  /** U_i, W/(m²·K): given, or (with a provider) the estimate at the current iterate. */
  U: Float64Array;
  /** Providers of U per effect (undefined where U is a number); undefined when none. */
  providers: readonly (OverallCoefficientProvider | undefined)[] | undefined;
  /** The providers' estimates at the converged state. */
  estimates: (OverallCoefficientResult | undefined)[];
  /** Given areas (rating only), m². */
  areas: readonly number[] | undefined;
  /** Fresh feed, kg/s. */
  feedFlow: number;
  /** Fresh-feed solute mass fraction. */
  feedFraction: number;
  /** Highest mass fraction the liquor model accepts. */
  maxFraction: number;
  /** Product mass fraction asked for (design); NaN in rating. */
  productFraction: number;
  steam: SteamSupply;
  /** Steam condensing temperature T_s, K. */
  steamTemperature: number;
  /** Last effect's pressure p_N, Pa, and its water saturation temperature T_N, K. */
  lastPressure: number;
  lastTemperature: number;
  /** Liquor path: order[k] is the k-th effect the liquor passes (0-based). */
  order: number[];
  /** position[i] = order.indexOf(i): where effect i sits on the liquor path. */
  position: number[];
  parallel: boolean;
  arrangementName: MultipleEffectResult['feedArrangement'];
  minimumTemperatureDifference: number;
  /** Subcooling of the vapour-chest condensate, K. */
  subcooling: number;
  condensateFlash: boolean;
  /** The thermocompressor, if any. */
  ejector: Ejector | undefined;
  maxIterations: number;
  /** Bleeds asked for per effect (without the preheat bleed), kg/s. */
  fixedBleed: Float64Array;
  /** Temperature and enthalpy of the fresh feed as it enters (after any preheat), K and J/kg. */
  feedInTemperature: number;
  feedEnthalpy: number;
  /** Feed-preheat duty, W, and the effect whose vapour supplies it (−1: external or none). */
  preheatDuty: number;
  preheatEffect: number;
  /** Total evaporation of a design, F·(1 − x_F/x_P), kg/s; NaN in rating. */
  evaporationTarget: number;
  /** Weight of each effect's ΔT: U_i (design) or U_i·A_i (rating). */
  heatWeights: Float64Array;
  /** Warnings collected so far (the feed's, then the converged point's). */
  warnings: EngineWarning[];
}

/** One effect's state at the current iterate. */
interface EffectState {
  /** Water saturation temperature T_i of the vapour space, K. */
  vaporTemperature: number;
  /** Vapour-space pressure p_i, Pa. */
  pressure: number;
  /** Solute mass fraction of the liquor leaving. */
  massFraction: number;
  /** K */
  boilingPointRise: number;
  /** Liquor boiling point T_b,i = T_i + BPR_i, K. */
  boilingPoint: number;
  /** Enthalpy of the vapour leaving (superheated by the BPR), J/kg. */
  vaporEnthalpy: number;
  /** Saturated liquid at p_i, J/kg. */
  saturatedLiquidEnthalpy: number;
  /** Condensate of this effect's vapour leaving the next chest, J/kg. */
  condensateEnthalpy: number;
  /** Liquor leaving, J/kg. */
  liquorEnthalpy: number;
  /** Vapour bled (asked for plus any preheat bleed), kg/s. */
  bleed: number;
  /** Liquor entering and leaving, kg/s. */
  liquorIn: number;
  liquorOut: number;
  /** Heat transferred in the chest, W. */
  duty: number;
  /** ΔT of the chest: a weight while iterating, T_cond − T_b at the converged point, K. */
  temperatureDifference: number;
}

/** The iterate: effect states, the flows and the work buffers of the linear solve. */
interface TrainState {
  effects: EffectState[];
  /** Unknowns of the linear system: [S, V_1 … V_N], kg/s. */
  flows: Float64Array;
  /** The linear solve's answer for `flows` before the step control. */
  proposedFlows: Float64Array;
  /** Parallel feed: the share of effect i is F_i = feedPerVapor·V_i. */
  feedPerVapor: number;
  /** Product mass fraction: the design's, or (parallel rating) the current estimate. */
  productFraction: number;
  /** Heat given in the chest of effect 1 per kg of its steam (the discharge's with TVR), J/kg. */
  chestHeatPerKg: number;
  /** Vapour entrained from effect i per kg of chest-1 steam (1/(1 + Ra) at the suction effect). */
  entrainedPerSteam: Float64Array;
  /** TVR: Ra (motive per entrained) and the discharge enthalpy at the current properties. */
  motivePerEntrained: number;
  dischargeEnthalpy: number;
  /** (N+1)×(N+1) matrix, right-hand side and one coefficient row (length N+2). */
  matrix: Float64Array;
  rhs: Float64Array;
  row: Float64Array;
}

/** What the Anderson mixing remembers between iterations, on u = [T_1…T_{N−1}, 100·x_1…100·x_N]. */
interface AndersonHistory {
  depth: number;
  u: Float64Array;
  g: Float64Array;
  uHist: Float64Array[];
  fHist: Float64Array[];
}

/** The fixed-point map's proposal: new temperatures T_1…T_{N−1} and concentrations. */
interface Proposal {
  vaporTemperature: Float64Array;
  massFraction: Float64Array;
}

const effectAt = (st: TrainState, i: number): EffectState => st.effects[i] as EffectState;

// ---------------------------------------------------------------------------------------------
// Prepare: validation, feed and preheat
// ---------------------------------------------------------------------------------------------

/** Validates the input and fixes everything that does not change while iterating. */
function prepareTrain(input: MultipleEffectInput): TrainSpec {
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
  const Ugiven = new Float64Array(n);
  let providers: (OverallCoefficientProvider | undefined)[] | undefined;
  U.forEach((u, i) => {
    if (typeof u === 'function') {
      providers ??= new Array<OverallCoefficientProvider | undefined>(n).fill(undefined);
      providers[i] = u;
      Ugiven[i] = Number.NaN; // set from the estimate before each use
    } else {
      requirePositive(`overallHeatTransferCoefficients[${i}]`, u, 'W/(m²·K)');
      Ugiven[i] = u;
    }
  });
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
  const ejector = input.thermocompressor ? prepareEjector(input, n, steam, pN) : undefined;
  const maxIter = input.maxIterations ?? 200;
  requireInRange('maxIterations', maxIter, 1, 10_000, 'iterations');
  const heatWeights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    heatWeights[i] = design ? (Ugiven[i] as number) : (Ugiven[i] as number) * (areas?.[i] as number);
  }
  return {
    input,
    liquor,
    design,
    n,
    U: Ugiven,
    providers,
    estimates: new Array<OverallCoefficientResult | undefined>(n).fill(undefined),
    areas,
    feedFlow: F,
    feedFraction: xF,
    maxFraction: liquor.limits.massFraction.max,
    productFraction: xP,
    steam,
    steamTemperature: Ts,
    lastPressure: pN,
    lastTemperature: TN,
    order,
    position: range(n).map((i) => order.indexOf(i)),
    parallel,
    arrangementName,
    minimumTemperatureDifference: minDT,
    subcooling: subcool,
    condensateFlash: flash,
    ejector,
    maxIterations: maxIter,
    ...prepareFeed(input, n, F, xF, Ts),
    evaporationTarget: design ? F * (1 - xF / xP) : Number.NaN,
    heatWeights,
  };
}

/**
 * The thermocompressor's fixed part: the motive steam's enthalpy, the suction effect, and the
 * refusals known before iterating (the steam spec's superheat, which the mixing balance fixes; an
 * ejector that cannot work when the suction pressure is the given last-effect pressure).
 */
function prepareEjector(input: MultipleEffectInput, n: number, steam: SteamSupply, pN: number): Ejector {
  const tc = input.thermocompressor as ThermocompressorSpec;
  if ((input.steam.superheat ?? 0) > 0) {
    throw new EngineInputError(
      'steam.superheat',
      "with a thermocompressor the chest steam is the ejector's discharge, whose state follows from the mixing balance: omit steam.superheat",
    );
  }
  const pm = tc.motivePressure;
  requireInRange(
    'thermocompressor.motivePressure',
    pm,
    IF97.minPressure,
    IF97.region13SaturationPressure,
    'Pa',
  );
  const tm = saturationTemperature(pm);
  const sh = tc.motiveSuperheat ?? 0;
  requireInRange('thermocompressor.motiveSuperheat', sh, 0, IF97.maxTemperature - tm, 'K');
  const suction =
    tc.entrainedFromEffect === undefined
      ? n - 1
      : requireEffect('thermocompressor.entrainedFromEffect', tc.entrainedFromEffect, n);
  // the last effect's pressure is given; an intermediate suction lies below the chest by construction
  requireWorkingEjector({
    motivePressure: pm,
    dischargePressure: steam.pressure,
    suctionPressure: suction === n - 1 ? pN : IF97.minPressure,
    suctionTemperature: tm,
  });
  const motiveEnthalpy = sh > 0 ? enthalpyAtPT(pm, tm + sh) : saturatedVaporEnthalpy(pm);
  return { motivePressure: pm, motiveEnthalpy, suction };
}

/** Bleeds, the feed's enthalpy as it enters and the preheat duty (with the feed's warnings). */
function prepareFeed(
  input: MultipleEffectInput,
  n: number,
  F: number,
  xF: number,
  Ts: number,
): Pick<
  TrainSpec,
  'fixedBleed' | 'feedInTemperature' | 'feedEnthalpy' | 'preheatDuty' | 'preheatEffect' | 'warnings'
> {
  const { liquor } = input;
  const fixedBleed = new Float64Array(n);
  (input.vaporBleeds ?? []).forEach((b, k) => {
    const e = requireEffect(`vaporBleeds[${k}].effect`, b.effect, n);
    requireInRange(`vaporBleeds[${k}].massFlow`, b.massFlow, 0, F, 'kg/s');
    fixedBleed[e] = (fixedBleed[e] as number) + b.massFlow;
  });
  const warnings: EngineWarning[] = [];
  const feedLabel = { field: (q: string) => `feed.${q}`, text: 'feed' };
  const hFeedRaw = labelled(feedLabel, warnings, (w) => liquor.enthalpy(xF, input.feed.temperature, w));
  let TfeedIn = input.feed.temperature;
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
  return {
    fixedBleed,
    feedInTemperature: TfeedIn,
    feedEnthalpy: hFeed,
    preheatDuty: F * (hFeed - hFeedRaw),
    preheatEffect,
    warnings,
  };
}

// ---------------------------------------------------------------------------------------------
// The equations at frozen properties
// ---------------------------------------------------------------------------------------------

function newTrainState(spec: TrainSpec): TrainState {
  const M = spec.n + 1; // unknowns: S, V_1..V_N
  const effects: EffectState[] = [];
  for (let i = 0; i < spec.n; i++) {
    effects.push({
      vaporTemperature: 0,
      pressure: 0,
      massFraction: 0,
      boilingPointRise: 0,
      boilingPoint: 0,
      vaporEnthalpy: 0,
      saturatedLiquidEnthalpy: 0,
      condensateEnthalpy: 0,
      liquorEnthalpy: 0,
      bleed: 0,
      liquorIn: 0,
      liquorOut: 0,
      duty: 0,
      temperatureDifference: 0,
    });
  }
  return {
    effects,
    flows: new Float64Array(M),
    proposedFlows: new Float64Array(M),
    feedPerVapor: 1,
    productFraction: spec.productFraction,
    chestHeatPerKg: spec.steam.heatPerKg,
    entrainedPerSteam: new Float64Array(spec.n),
    motivePerEntrained: Number.NaN,
    dischargeEnthalpy: Number.NaN,
    matrix: new Float64Array(M * M),
    rhs: new Float64Array(M),
    row: new Float64Array(M + 1),
  };
}

/** p_i = p_sat(T_i) for the intermediate effects; the last effect sits at p_N. */
function setPressures(spec: TrainSpec, st: TrainState): void {
  const { n, lastTemperature: TN, steamTemperature: Ts } = spec;
  for (let i = 0; i < n - 1; i++) {
    const e = effectAt(st, i);
    const t = e.vaporTemperature;
    if (!(t > TN && t < Ts)) {
      throw new EngineNoSolutionError(
        'An intermediate effect temperature left the range between the last effect and the steam',
        {
          reason: 'temperature-out-of-range',
        },
      );
    }
    e.pressure = saturationPressure(t);
  }
  const last = effectAt(st, n - 1);
  last.vaporTemperature = TN;
  last.pressure = spec.lastPressure;
}

/** Liquor flows from the vapour flows `flows` (for the current feedPerVapor); false if unphysical. */
function flowsFrom(spec: TrainSpec, st: TrainState, flows: Float64Array): boolean {
  const { n } = spec;
  if (spec.parallel) {
    const phi = st.feedPerVapor;
    for (let i = 0; i < n; i++) {
      const e = effectAt(st, i);
      const v = flows[i + 1] as number;
      e.liquorIn = phi * v;
      e.liquorOut = (phi - 1) * v;
      if (!(v >= 0)) return false;
    }
    return true;
  }
  let l = spec.feedFlow;
  for (let k = 0; k < n; k++) {
    const i = spec.order[k] as number;
    const e = effectAt(st, i);
    e.liquorIn = l;
    const v = flows[i + 1] as number;
    l -= v;
    e.liquorOut = l;
    if (!(v >= 0) || !(l > 0)) return false;
  }
  return true;
}

/** Leaving concentrations from the liquor flows into `out`; false if outside the model. */
function concentrationsFrom(spec: TrainSpec, st: TrainState, out: Float64Array): boolean {
  for (let i = 0; i < spec.n; i++) {
    const xi = spec.parallel
      ? st.productFraction
      : (spec.feedFlow * spec.feedFraction) / effectAt(st, i).liquorOut;
    if (!(xi > 0 && xi <= spec.maxFraction)) return false;
    out[i] = xi;
  }
  return true;
}

/** BPR of effect i at mass fraction x and the current pressure (labelled, no warnings). */
function boilingPointRiseAt(spec: TrainSpec, st: TrainState, i: number, x: number): number {
  return labelled(effectLabel(i), undefined, () =>
    spec.liquor.boilingPointRise(x, effectAt(st, i).pressure, undefined),
  );
}

/** Freezes every property (BPR, boiling point, enthalpies, bleeds) at the current T_i, x_i. */
function evaluateProperties(spec: TrainSpec, st: TrainState, sink: EngineWarning[] | undefined): void {
  const { n } = spec;
  for (let i = 0; i < n; i++) labelled(effectLabel(i), sink, (w) => evaluateEffect(spec, st, i, w));
  for (let i = 0; i < n; i++) effectAt(st, i).bleed = spec.fixedBleed[i] as number;
  if (spec.preheatEffect >= 0) {
    const e = effectAt(st, spec.preheatEffect);
    e.bleed = e.bleed + spec.preheatDuty / (e.vaporEnthalpy - e.condensateEnthalpy);
  }
  if (spec.ejector) evaluateEjector(spec, st, sink);
}

/**
 * U of the effects given by a provider, at the current iterate: each effect's liquor (mass
 * fraction, boiling point, pressure) and the condensing temperature of its heating medium (the
 * steam for effect 1, the previous effect's vapour T_{i−1} after it). The heat weights of the
 * temperature split follow. While iterating, a chest whose ΔT has not yet settled above
 * {@link ESTIMATE_MIN_ITERATE_DT} is evaluated at that ΔT (the estimate needs steam hotter than
 * the liquor); at the converged point (`final`) every ΔT has been checked positive and the
 * estimates are kept for the result.
 */
function evaluateCoefficients(spec: TrainSpec, st: TrainState, final: boolean): void {
  const providers = spec.providers;
  if (!providers) return;
  for (let i = 0; i < spec.n; i++) {
    const provide = providers[i];
    if (!provide) continue;
    const e = effectAt(st, i);
    const condensing = i === 0 ? spec.steamTemperature : effectAt(st, i - 1).vaporTemperature;
    const estimate = provide({
      massFraction: e.massFraction,
      boilingTemperature: e.boilingPoint,
      bodyPressure: e.pressure,
      condensingTemperature: final
        ? condensing
        : Math.max(condensing, e.boilingPoint + ESTIMATE_MIN_ITERATE_DT),
    });
    const u = estimate.overallHeatTransferCoefficient;
    spec.U[i] = u;
    spec.heatWeights[i] = spec.design ? u : u * (spec.areas?.[i] as number);
    if (final) {
      spec.estimates[i] = estimate;
      for (const w of estimate.warnings) spec.warnings.push(w);
    }
  }
}

/** Smallest chest ΔT at which an estimate is evaluated while iterating, K. */
const ESTIMATE_MIN_ITERATE_DT = 0.1;

/**
 * The thermocompressor at the current properties: Ra at the suction effect's pressure and
 * saturation temperature, the entrained share 1/(1 + Ra) of the chest steam, and the discharge
 * enthalpy from the mixing balance with the suction effect's vapour (superheated by its BPR).
 */
function evaluateEjector(spec: TrainSpec, st: TrainState, sink: EngineWarning[] | undefined): void {
  const ej = spec.ejector as Ejector;
  const e = effectAt(st, ej.suction);
  const point = {
    motivePressure: ej.motivePressure,
    dischargePressure: spec.steam.pressure,
    suctionPressure: e.pressure,
    suctionTemperature: e.vaporTemperature,
  };
  requireWorkingEjector(point);
  const ra = checkThermocompressor(point, sink);
  st.motivePerEntrained = ra;
  st.entrainedPerSteam[ej.suction] = 1 / (1 + ra);
  st.dischargeEnthalpy = dischargeEnthalpy(ra, ej.motiveEnthalpy, e.vaporEnthalpy);
  st.chestHeatPerKg = st.dischargeEnthalpy - spec.steam.enthalpyOut;
}

function evaluateEffect(spec: TrainSpec, st: TrainState, i: number, sink: EngineWarning[] | undefined): void {
  const e = effectAt(st, i);
  const pi = e.pressure;
  const r = spec.liquor.boilingPointRise(e.massFraction, pi, sink);
  if (!(r >= 0) || !Number.isFinite(r)) {
    throw new EngineNoSolutionError(
      `The liquor model gave an invalid boiling-point rise in effect ${i + 1}`,
      {
        reason: 'invalid-bpr',
      },
    );
  }
  e.boilingPointRise = r;
  const t = e.vaporTemperature + r;
  e.boilingPoint = t;
  e.vaporEnthalpy = leavingVapor(pi, t, e.vaporTemperature).enthalpy;
  e.saturatedLiquidEnthalpy = saturatedLiquidEnthalpy(pi);
  e.condensateEnthalpy =
    spec.subcooling > 0 ? enthalpyAtPT(pi, e.vaporTemperature - spec.subcooling) : e.saturatedLiquidEnthalpy;
  e.liquorEnthalpy = spec.liquor.enthalpy(e.massFraction, t, sink);
}

/**
 * Coefficients of Q_i as an affine function of the flows: Q_i = Σ_j row[j]·flows[j] + row[M].
 */
function dutyRow(spec: TrainSpec, st: TrainState, i: number, row: Float64Array): void {
  const M = spec.n + 1;
  row.fill(0);
  if (i === 0) {
    row[0] = st.chestHeatPerKg;
    return;
  }
  const j = i - 1; // vapour of effect j heats chest i
  const heating = effectAt(st, j);
  const lat = heating.vaporEnthalpy - heating.condensateEnthalpy;
  const tvr = spec.ejector !== undefined;
  row[j + 1] = lat;
  row[M] = -heating.bleed * lat;
  // the ejector takes E = S/(1 + Ra) of effect j's vapour before chest j+1
  if (tvr) row[0] = (row[0] as number) - lat * (st.entrainedPerSteam[j] as number);
  if (spec.condensateFlash && j >= 1) {
    // flash vapour: (h_f,j−1 − h_f,j)·Σ_{k<j}(V_k − B_k − E_k)
    const dh = effectAt(st, j - 1).saturatedLiquidEnthalpy - heating.saturatedLiquidEnthalpy;
    for (let k = 0; k < j; k++) {
      row[k + 1] = (row[k + 1] as number) + dh;
      row[M] = (row[M] as number) - dh * effectAt(st, k).bleed;
      if (tvr) row[0] = (row[0] as number) - dh * (st.entrainedPerSteam[k] as number);
    }
  }
}

/** Q_i for the given flows, W. */
function dutyOf(spec: TrainSpec, st: TrainState, flows: Float64Array, i: number): number {
  const M = spec.n + 1;
  const row = st.row;
  dutyRow(spec, st, i, row);
  let s = row[M] as number;
  for (let j = 0; j < M; j++) s += (row[j] as number) * (flows[j] as number);
  return s;
}

function sumBoilingPointRises(st: TrainState): number {
  let s = 0;
  for (const e of st.effects) s += e.boilingPointRise;
  return s;
}

/** Enthalpy of the liquor entering effect i (fresh feed, or the previous effect's outlet), J/kg. */
function liquorInEnthalpy(spec: TrainSpec, st: TrainState, i: number): number {
  const k = spec.position[i] as number;
  return spec.parallel || k === 0
    ? spec.feedEnthalpy
    : effectAt(st, spec.order[k - 1] as number).liquorEnthalpy;
}

/** Assembles and solves the linear system for (S, V) with frozen properties → proposedFlows. */
function solveFlows(spec: TrainSpec, st: TrainState): void {
  const { n, order, feedFlow: F } = spec;
  const M = n + 1;
  const { matrix: A, rhs: b, row } = st;
  A.fill(0);
  b.fill(0);
  for (let i = 0; i < n; i++) {
    // Q_i + Lin_i·h_in − V_i·HV_i − Lout_i·hL_i = 0
    const e = effectAt(st, i);
    dutyRow(spec, st, i, row);
    for (let j = 0; j < M; j++) A[i * M + j] = row[j] as number;
    let rhs = -(row[M] as number);
    A[i * M + i + 1] = (A[i * M + i + 1] as number) - e.vaporEnthalpy;
    if (spec.parallel) {
      const phi = st.feedPerVapor;
      A[i * M + i + 1] =
        (A[i * M + i + 1] as number) + phi * spec.feedEnthalpy - (phi - 1) * e.liquorEnthalpy;
    } else {
      // Lin_e = F − Σ_{m<k} V_order[m]; Lout_e = Lin_e − V_e
      const k = spec.position[i] as number;
      const hin = liquorInEnthalpy(spec, st, i);
      const hout = e.liquorEnthalpy;
      rhs -= F * (hin - hout);
      for (let m = 0; m < k; m++) {
        const up = order[m] as number;
        A[i * M + up + 1] = (A[i * M + up + 1] as number) - hin + hout;
      }
      A[i * M + i + 1] = (A[i * M + i + 1] as number) + hout;
    }
    b[i] = rhs;
  }
  const r = n * M;
  if (spec.design) {
    for (let j = 1; j < M; j++) A[r + j] = 1;
    b[n] = spec.evaporationTarget;
  } else {
    // the area equations summed: Σ Q_i/(U_i·A_i) = T_s − T_N − ΣBPR_i
    const avail = spec.steamTemperature - spec.lastTemperature - sumBoilingPointRises(st);
    for (let i = 0; i < n; i++) {
      dutyRow(spec, st, i, row);
      const w = 1 / (spec.heatWeights[i] as number);
      for (let j = 0; j < M; j++) A[r + j] = (A[r + j] as number) + w * (row[j] as number);
      b[n] = (b[n] as number) - w * (row[M] as number);
    }
    b[n] = (b[n] as number) + avail;
  }
  solveLinearSystem(A, b, M);
  st.proposedFlows.set(b);
}

function noAvailable(spec: TrainSpec, st: TrainState, avail: number, iter: number): EngineNoSolutionError {
  const { n, steamTemperature: Ts, lastTemperature: TN } = spec;
  return new EngineNoSolutionError(
    `No solution: the boiling-point rises (${sumBoilingPointRises(st).toFixed(2)} K in total) use up the available temperature difference ${(Ts - TN).toFixed(2)} K between the steam and the last effect (${avail.toFixed(2)} K left for ${n} effect(s), at least ${(n * spec.minimumTemperatureDifference).toFixed(2)} K needed)`,
    { iterations: iter, reason: 'boiling-point-rise-exceeds-temperature-difference' },
  );
}

// ---------------------------------------------------------------------------------------------
// Iterate: initial guess, then linear solve → step control → new drops → Anderson mixing
// ---------------------------------------------------------------------------------------------

/** Equal evaporation and equal drops (first without BPR for the pressures, then with it). */
function initialGuess(spec: TrainSpec, st: TrainState): void {
  const { n, design, parallel, feedFraction: xF, steamTemperature: Ts, lastTemperature: TN } = spec;
  const z = st.flows;
  if (design) {
    for (let i = 0; i < n; i++) z[i + 1] = spec.evaporationTarget / n;
    if (parallel) st.feedPerVapor = 1 / (1 - xF / st.productFraction);
  } else {
    for (let i = 0; i < n; i++) z[i + 1] = 0;
    if (parallel) {
      st.productFraction = Math.min(2 * xF, 0.5 * (xF + spec.maxFraction));
      st.feedPerVapor = 1 / (1 - xF / st.productFraction);
    }
  }
  flowsFrom(spec, st, z);
  const x = new Float64Array(n);
  if (parallel) for (let i = 0; i < n; i++) x[i] = design ? st.productFraction : xF;
  else if (!concentrationsFrom(spec, st, x))
    throw new EngineInputError('productMassFraction', 'the product is outside the liquor model');
  for (let i = 0; i < n; i++) effectAt(st, i).massFraction = x[i] as number;
  for (let i = 0; i < n - 1; i++) effectAt(st, i).vaporTemperature = Ts - ((Ts - TN) * (i + 1)) / n;
  setPressures(spec, st);
  for (let pass = 0; pass < 2; pass++) {
    for (let i = 0; i < n; i++) {
      const e = effectAt(st, i);
      e.boilingPointRise = boilingPointRiseAt(spec, st, i, e.massFraction);
    }
    const avail = Ts - TN - sumBoilingPointRises(st);
    if (!(avail > n * spec.minimumTemperatureDifference) || !(avail > 0))
      throw noAvailable(spec, st, avail, 0);
    let t = Ts;
    for (let i = 0; i < n - 1; i++) {
      const e = effectAt(st, i);
      t -= avail / n + e.boilingPointRise;
      e.vaporTemperature = t;
    }
    setPressures(spec, st);
  }
}

/**
 * Moves the flows towards the linear solve's answer, halving the step until every flow and
 * concentration is physical; writes the new concentrations into `next`.
 */
function stepFlows(spec: TrainSpec, st: TrainState, iter: number, next: Float64Array): void {
  const { n, design, parallel, feedFlow: F, feedFraction: xF } = spec;
  const M = n + 1;
  const z = st.flows;
  const zNew = st.proposedFlows;
  let alpha = 1;
  const zTry = new Float64Array(M);
  let ok = false;
  for (let h = 0; h < 30; h++) {
    for (let j = 0; j < M; j++) zTry[j] = (z[j] as number) + alpha * ((zNew[j] as number) - (z[j] as number));
    if (parallel && !design) {
      // rating with parallel feed: the product concentration follows from the evaporation
      let sv = 0;
      for (let i = 0; i < n; i++) sv += zTry[i + 1] as number;
      if (sv > 0 && sv < F) {
        const xp = (F * xF) / (F - sv);
        if (xp <= spec.maxFraction) {
          const phiSave = st.feedPerVapor;
          st.feedPerVapor = 1 / (1 - xF / xp);
          if (flowsFrom(spec, st, zTry) && zTry[0]! > 0) {
            st.productFraction = xp;
            ok = true;
            break;
          }
          st.feedPerVapor = phiSave;
        }
      }
    } else if (flowsFrom(spec, st, zTry) && (zTry[0] as number) > 0 && concentrationsFrom(spec, st, next)) {
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
  if (parallel) for (let i = 0; i < n; i++) next[i] = st.productFraction;
  z.set(zTry);
}

/**
 * The new temperature drops from the duties (design ΔT_i ∝ Q_i/U_i, rating ΔT_i = Q_i/(U_i·A_i)),
 * scaled to the available ΔT with the BPR at the new concentrations: writes T_1…T_{N−1} into
 * `next.vaporTemperature`.
 */
function proposeTemperatures(spec: TrainSpec, st: TrainState, iter: number, next: Proposal): void {
  const { n, steamTemperature: Ts, lastTemperature: TN } = spec;
  let wsum = 0;
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    const q = dutyOf(spec, st, st.flows, i);
    e.duty = q;
    if (!(q > 0)) {
      if (iter > 5) {
        throw new EngineNoSolutionError(
          `No physical solution: effect ${i + 1} would receive no heat (its heating vapour is all bled or condensed elsewhere)`,
          { iterations: iter, reason: 'negative-flow' },
        );
      }
    }
    e.temperatureDifference = Math.max(q, 1e-6) / (spec.heatWeights[i] as number);
    wsum += e.temperatureDifference;
  }
  for (let i = 0; i < n; i++) {
    effectAt(st, i).boilingPointRise = boilingPointRiseAt(spec, st, i, next.massFraction[i] as number);
  }
  const avail = Ts - TN - sumBoilingPointRises(st);
  if (!(avail > 0)) throw noAvailable(spec, st, avail, iter);
  let t = Ts;
  for (let i = 0; i < n - 1; i++) {
    const e = effectAt(st, i);
    t -= (e.temperatureDifference / wsum) * avail + e.boilingPointRise;
    next.vaporTemperature[i] = t;
  }
}

/**
 * One Anderson-mixed update of the temperatures and concentrations from the current iterate u
 * and the map's proposal g(u). Returns the largest change |g(u) − u| (K, or 0.01 in x); when it is
 * below the tolerance the proposal is accepted as the converged point.
 */
function mixProposal(spec: TrainSpec, st: TrainState, hist: AndersonHistory, next: Proposal): number {
  const { n, steamTemperature: Ts, lastTemperature: TN } = spec;
  const { u, g: gu } = hist;
  const nu = u.length;
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    if (i < n - 1) u[i] = e.vaporTemperature;
    u[n - 1 + i] = e.massFraction * X_SCALE;
  }
  for (let i = 0; i < n - 1; i++) gu[i] = next.vaporTemperature[i] as number;
  for (let i = 0; i < n; i++) gu[n - 1 + i] = (next.massFraction[i] as number) * X_SCALE;
  const f = new Float64Array(nu);
  let change = 0;
  for (let k = 0; k < nu; k++) {
    f[k] = (gu[k] as number) - (u[k] as number);
    change = Math.max(change, Math.abs(f[k] as number));
  }
  if (change < 1e-10) {
    for (let i = 0; i < n; i++) {
      const e = effectAt(st, i);
      if (i < n - 1) e.vaporTemperature = next.vaporTemperature[i] as number;
      e.massFraction = next.massFraction[i] as number;
    }
    return change;
  }
  hist.uHist.push(Float64Array.from(u));
  hist.fHist.push(f);
  if (hist.uHist.length > hist.depth + 1) {
    hist.uHist.shift();
    hist.fHist.shift();
  }
  const mixed = andersonStep(hist.uHist, hist.fHist, nu);
  // keep the ordering T_s > T_1 > … > T_N and concentrations physical; otherwise plain step
  let valid = true;
  let prev = Ts;
  for (let i = 0; i < n - 1; i++) {
    const ti = mixed[i] as number;
    if (!(ti < prev - effectAt(st, i).boilingPointRise * 0.5) || !(ti > TN)) valid = false;
    prev = ti;
  }
  for (let i = 0; i < n; i++) {
    const xi = (mixed[n - 1 + i] as number) / X_SCALE;
    if (!(xi > 0 && xi <= spec.maxFraction)) valid = false;
  }
  const src = valid ? mixed : gu;
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    if (i < n - 1) e.vaporTemperature = src[i] as number;
    e.massFraction = (src[n - 1 + i] as number) / X_SCALE;
  }
  if (!valid) {
    hist.uHist.length = 0;
    hist.fHist.length = 0;
  }
  setPressures(spec, st);
  return change;
}

/** Iterates to the converged point; returns the number of iterations. */
function iterateTrain(spec: TrainSpec, st: TrainState): number {
  const { n } = spec;
  const nu = n - 1 + n;
  const hist: AndersonHistory = {
    depth: Math.min(4, nu),
    u: new Float64Array(nu),
    g: new Float64Array(nu),
    uHist: [],
    fHist: [],
  };
  const next: Proposal = { vaporTemperature: new Float64Array(n), massFraction: new Float64Array(n) };
  let iterations = 0;
  let lastChange = Number.POSITIVE_INFINITY;
  for (let iter = 1; iter <= spec.maxIterations; iter++) {
    iterations = iter;
    evaluateProperties(spec, st, undefined);
    evaluateCoefficients(spec, st, false);
    solveFlows(spec, st);
    stepFlows(spec, st, iter, next.massFraction);
    proposeTemperatures(spec, st, iter, next);
    lastChange = mixProposal(spec, st, hist, next);
    if (lastChange < 1e-10) return iterations;
  }
  throw new EngineNoSolutionError(
    `The multiple-effect iteration did not converge in ${iterations} iterations (last change ${lastChange.toExponential(2)})`,
    { iterations, residual: lastChange, reason: 'not-converged' },
  );
}

// ---------------------------------------------------------------------------------------------
// Assemble: the converged point with fresh properties, its checks, balances and the result
// ---------------------------------------------------------------------------------------------

/**
 * Re-evaluates the converged point (with warnings), sets the final duties and ΔT and returns the
 * areas; refuses a ΔT below the minimum, a preheat the bleed vapour cannot give, and a bleed
 * larger than the vapour.
 */
function finalEvaluation(spec: TrainSpec, st: TrainState, iterations: number): Float64Array {
  const { n, steamTemperature: Ts, minimumTemperatureDifference: minDT } = spec;
  const z = st.flows;
  setPressures(spec, st);
  flowsFrom(spec, st, z);
  evaluateProperties(spec, st, spec.warnings);
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    e.duty = dutyOf(spec, st, z, i);
    const condensing = i === 0 ? Ts : effectAt(st, i - 1).vaporTemperature;
    e.temperatureDifference = condensing - e.boilingPoint;
  }
  const areas = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const d = effectAt(st, i).temperatureDifference;
    if (!(d > 0) || d < minDT) {
      throw new EngineNoSolutionError(
        `No practical solution: effect ${i + 1} would work with ΔT = ${d.toFixed(3)} K, below the minimum ${minDT} K (too many effects or too little temperature difference for this liquor)`,
        { iterations, reason: 'temperature-difference-below-minimum' },
      );
    }
  }
  evaluateCoefficients(spec, st, true);
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    areas[i] = e.duty / ((spec.U[i] as number) * e.temperatureDifference);
  }
  const pre = spec.preheatEffect;
  if (pre >= 0 && spec.feedInTemperature >= effectAt(st, pre).vaporTemperature) {
    throw new EngineNoSolutionError(
      `Vapour from effect ${pre + 1} condenses at ${effectAt(st, pre).vaporTemperature.toFixed(2)} K and cannot preheat the feed to ${spec.feedInTemperature.toFixed(2)} K`,
      {
        iterations,
        reason: 'preheat-above-bleed-vapour',
        template: `Vapour from effect ${pre + 1} condenses at {tv} and cannot preheat the feed to {tf}`,
        values: {
          tv: { value: effectAt(st, pre).vaporTemperature, kind: 'temperature' },
          tf: { value: spec.feedInTemperature, kind: 'temperature' },
        },
      },
    );
  }
  for (let i = 0; i < n; i++) {
    const v = z[i + 1] as number;
    const bleed = effectAt(st, i).bleed;
    const entrained = (z[0] as number) * (st.entrainedPerSteam[i] as number);
    if (entrained > 0 && v - bleed - entrained < -1e-12 * spec.feedFlow) {
      throw new EngineNoSolutionError(
        `No physical solution: the thermocompressor would entrain ${entrained.toFixed(4)} kg/s from effect ${i + 1}, more than the ${(v - bleed).toFixed(4)} kg/s of vapour it makes (less bleeds)`,
        { iterations, reason: 'entrainment-exceeds-vapour' },
      );
    }
    if (v - bleed < -1e-12 * spec.feedFlow) {
      throw new EngineNoSolutionError(
        `No physical solution: the vapour bled from effect ${i + 1} (${bleed.toFixed(4)} kg/s) exceeds the vapour it makes (${v.toFixed(4)} kg/s)`,
        { iterations, reason: 'bleed-exceeds-vapour' },
      );
    }
  }
  return areas;
}

/** Residuals of the full equations (energy balances scaled by the steam duty, area equations). */
function equationResiduals(
  spec: TrainSpec,
  st: TrainState,
  areas: Float64Array,
): { residual: number; effects: number[] } {
  const { n } = spec;
  const z = st.flows;
  const effects: number[] = [];
  let residual = 0;
  const qScale = (z[0] as number) * st.chestHeatPerKg;
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    const hin = liquorInEnthalpy(spec, st, i);
    const inflow = [e.duty, e.liquorIn * hin];
    const outflow = [(z[i + 1] as number) * e.vaporEnthalpy, e.liquorOut * e.liquorEnthalpy];
    effects.push(balanceResidual(inflow, outflow));
    const r = Math.abs(inflow[0]! + inflow[1]! - outflow[0]! - outflow[1]!) / qScale;
    residual = Math.max(residual, r);
  }
  let aMean = 0;
  for (let i = 0; i < n; i++) aMean += (areas[i] as number) / n;
  for (let i = 0; i < n; i++) {
    const target = spec.design ? aMean : (spec.areas?.[i] as number);
    residual = Math.max(residual, Math.abs((areas[i] as number) - target) / target);
  }
  return { residual, effects };
}

/** Flash vapour per effect (reported) and the energy leaving with the vapour-chest condensate. */
function condensateCascade(spec: TrainSpec, st: TrainState): { flashVapor: Float64Array; energyOut: number } {
  const { n, condensateFlash: flash } = spec;
  const z = st.flows;
  const flashVapor = new Float64Array(n);
  let energyOut = 0;
  let cascade = 0;
  for (let j = 0; j < n - 1; j++) {
    const e = effectAt(st, j);
    const vc = (z[j + 1] as number) - e.bleed - (z[0] as number) * (st.entrainedPerSteam[j] as number);
    if (flash && j >= 1 && j < n - 1) {
      const hgj = saturatedVaporEnthalpy(e.pressure);
      const hfPrev = effectAt(st, j - 1).saturatedLiquidEnthalpy;
      flashVapor[j] = (cascade * (hfPrev - e.saturatedLiquidEnthalpy)) / (hgj - e.saturatedLiquidEnthalpy);
    }
    cascade += vc;
  }
  if (n >= 2) {
    if (flash) energyOut = cascade * effectAt(st, n - 2).saturatedLiquidEnthalpy;
    else
      for (let j = 0; j < n - 1; j++) {
        const e = effectAt(st, j);
        energyOut +=
          ((z[j + 1] as number) - e.bleed - (z[0] as number) * (st.entrainedPerSteam[j] as number)) *
          e.condensateEnthalpy;
      }
  }
  return { flashVapor, energyOut };
}

/** The product: the last effect's outlet, or (parallel) the mixture of every outlet. */
function productStream(
  spec: TrainSpec,
  st: TrainState,
): { product: MultipleEffectResult['product']; enthalpyFlow: number } {
  const { n, parallel, order, liquor } = spec;
  let massFlow = 0;
  let enthalpyFlow = 0;
  if (parallel) {
    for (const e of st.effects) {
      massFlow += e.liquorOut;
      enthalpyFlow += e.liquorOut * e.liquorEnthalpy;
    }
  } else {
    const last = effectAt(st, order[n - 1] as number);
    massFlow = last.liquorOut;
    enthalpyFlow = massFlow * last.liquorEnthalpy;
  }
  const massFraction = (spec.feedFlow * spec.feedFraction) / massFlow;
  const enthalpy = enthalpyFlow / massFlow;
  let temperature: number;
  if (parallel && n > 1) {
    let lo = Number.POSITIVE_INFINITY;
    let hi = Number.NEGATIVE_INFINITY;
    for (const e of st.effects) {
      lo = Math.min(lo, e.boilingPoint);
      hi = Math.max(hi, e.boilingPoint);
    }
    temperature =
      hi - lo < 1e-9
        ? lo
        : brentSolve((t) => liquor.enthalpy(massFraction, t, undefined) - enthalpy, lo, hi, { tol: 1e-9 })
            .root;
  } else {
    temperature = effectAt(st, parallel ? 0 : (order[n - 1] as number)).boilingPoint;
  }
  return { product: { massFlow, massFraction, temperature, enthalpy }, enthalpyFlow };
}

/** Mass, solute and energy balances of the whole train (relative residuals). */
function trainBalances(
  spec: TrainSpec,
  st: TrainState,
  product: MultipleEffectResult['product'],
  productEnthalpyFlow: number,
  condensateEnergy: number,
  effectResiduals: number[],
): { balances: MultipleEffectResult['balances']; evaporation: number } {
  const { n, feedFlow: F, feedFraction: xF, steam } = spec;
  const z = st.flows;
  let vaporOutEnergy = 0;
  let evaporation = 0;
  for (let i = 0; i < n; i++) {
    const e = effectAt(st, i);
    evaporation += z[i + 1] as number;
    // the entrained vapour circulates: only the last effect's is missing from the condenser
    const toCondenserOrUsers =
      i === n - 1 ? (z[i + 1] as number) - (z[0] as number) * (st.entrainedPerSteam[i] as number) : e.bleed;
    vaporOutEnergy += toCondenserOrUsers * e.vaporEnthalpy;
  }
  const S = z[0] as number;
  // with a thermocompressor only the motive steam enters; the entrained vapour circulates inside
  const energyIn = spec.ejector
    ? [motiveFlow(st) * spec.ejector.motiveEnthalpy, F * spec.feedEnthalpy]
    : [S * steam.enthalpyIn, F * spec.feedEnthalpy];
  const energyOut = [S * steam.enthalpyOut, condensateEnergy, vaporOutEnergy, productEnthalpyFlow];
  return {
    evaporation,
    balances: {
      mass: balanceResidual([F], [product.massFlow, evaporation]),
      solute: balanceResidual([F * xF], [product.massFlow * product.massFraction]),
      energy: balanceResidual(energyIn, energyOut),
      effects: effectResiduals,
    },
  };
}

/** Motive steam of the thermocompressor, M = D·Ra/(1 + Ra), kg/s. */
function motiveFlow(st: TrainState): number {
  const ra = st.motivePerEntrained;
  return ((st.flows[0] as number) * ra) / (1 + ra);
}

/** Warnings of the converged train: feed flash, ΔT too small or large, steam superheat, solubility. */
function warnTrain(spec: TrainSpec, st: TrainState, product: MultipleEffectResult['product']): void {
  const { n, warnings } = spec;
  const feedTargets = spec.parallel ? range(n) : [spec.order[0] as number];
  for (const i of feedTargets) {
    warnFeedFlash(spec.feedInTemperature, effectAt(st, i).boilingPoint, warnings, 'feed.temperature');
  }
  for (let i = 0; i < n; i++) {
    const dT = effectAt(st, i).temperatureDifference;
    warnSmallTemperatureDifference(dT, warnings, `effects[${i}].temperatureDifference`);
    warnLargeTemperatureDifference(dT, warnings, `effects[${i}].temperatureDifference`);
  }
  warnLargeSteamSuperheat(spec.steam.superheat, warnings);
  warnSolubility(spec.liquor, product.massFraction, product.temperature, warnings, 'product.massFraction');
}

/** The per-effect results. */
function effectResults(
  spec: TrainSpec,
  st: TrainState,
  areas: Float64Array,
  flashVapor: Float64Array,
): EffectResult[] {
  const z = st.flows;
  return st.effects.map((e, i): EffectResult => {
    const k = spec.position[i] as number;
    const inT =
      spec.parallel || k === 0
        ? spec.feedInTemperature
        : effectAt(st, spec.order[k - 1] as number).boilingPoint;
    const heating = i === 0 ? undefined : effectAt(st, i - 1);
    return {
      number: i + 1,
      pressure: e.pressure,
      vaporTemperature: e.vaporTemperature,
      boilingPoint: e.boilingPoint,
      boilingPointRise: e.boilingPointRise,
      temperatureDifference: e.temperatureDifference,
      overallHeatTransferCoefficient: spec.U[i] as number,
      ...(spec.estimates[i] ? { heatTransfer: spec.estimates[i] } : {}),
      liquorInFlow: e.liquorIn,
      liquorInTemperature: inT,
      liquorOutFlow: e.liquorOut,
      massFraction: e.massFraction,
      vaporFlow: z[i + 1] as number,
      vaporSuperheat: e.boilingPointRise,
      vaporEnthalpy: e.vaporEnthalpy,
      vaporBleed: e.bleed,
      flashVapor: flashVapor[i] as number,
      duty: e.duty,
      area: areas[i] as number,
      heatingMedium: heating
        ? { source: i, pressure: heating.pressure, condensingTemperature: heating.vaporTemperature }
        : { source: 'steam', pressure: spec.steam.pressure, condensingTemperature: spec.steamTemperature },
    };
  });
}

const EJECTOR_CAUTION: EngineCaution = {
  code: 'thermocompressor',
  message:
    "The ejector's entrainment is a published correlation's estimate: size the thermocompressor from its maker's performance data. The motive-steam line is pressure equipment under local codes; an ejector is loud and its discharge superheated.",
};

/** The thermocompressor at the converged point. */
function ejectorResult(
  spec: TrainSpec,
  st: TrainState,
): NonNullable<MultipleEffectResult['thermocompressor']> {
  const ej = spec.ejector as Ejector;
  const ra = st.motivePerEntrained;
  const D = st.flows[0] as number;
  const suctionPressure = effectAt(st, ej.suction).pressure;
  const pc = spec.steam.pressure;
  return {
    motiveSteamFlow: motiveFlow(st),
    entrainedVaporFlow: D * (st.entrainedPerSteam[ej.suction] as number),
    entrainmentRatio: 1 / ra,
    motivePerEntrained: ra,
    compressionRatio: pc / suctionPressure,
    expansionRatio: ej.motivePressure / suctionPressure,
    motivePressure: ej.motivePressure,
    motiveEnthalpy: ej.motiveEnthalpy,
    entrainedFromEffect: ej.suction + 1,
    suctionPressure,
    dischargeEnthalpy: st.dischargeEnthalpy,
    dischargeTemperature: stateAtPH(pc, st.dischargeEnthalpy, { transport: false }).temperature,
  };
}

/** Equation residual above which an apparently converged point is refused (converged ones are < 1e-9). */
const STALLED_RESIDUAL = 1e-6;

/** The result at the converged point. */
function assembleResult(spec: TrainSpec, st: TrainState, iterations: number): MultipleEffectResult {
  const { n, steam, liquor } = spec;
  const areas = finalEvaluation(spec, st, iterations);
  const { residual, effects: effectResiduals } = equationResiduals(spec, st, areas);
  // The flow step is damped until every flow is physical. Where the true solution needs a
  // negative flow, that damping can leave the iteration standing still against the boundary: it
  // looks converged (no change) while the equations are not met. Refuse that point rather than
  // return it.
  if (!(residual <= STALLED_RESIDUAL)) {
    throw new EngineNoSolutionError(
      'No physical solution: the iteration stalled where the balances need a negative flow (a bleed larger than the vapour an effect makes, or an effect whose heat cannot even bring the liquor it receives to its boiling point)',
      { iterations, residual, reason: 'negative-flow' },
    );
  }
  const { flashVapor, energyOut: condensateEnergy } = condensateCascade(spec, st);
  const { product, enthalpyFlow } = productStream(spec, st);
  const { balances, evaporation } = trainBalances(
    spec,
    st,
    product,
    enthalpyFlow,
    condensateEnergy,
    effectResiduals,
  );
  warnTrain(spec, st, product);
  const effects = effectResults(spec, st, areas, flashVapor);
  let totalArea = 0;
  for (let i = 0; i < n; i++) totalArea += areas[i] as number;
  const S = st.flows[0] as number;
  const ejector = spec.ejector ? ejectorResult(spec, st) : undefined;
  // the steam bought: the motive steam with a thermocompressor, else the chest's steam
  const boughtSteam = ejector ? ejector.motiveSteamFlow : S;
  const boughtHeatPerKg = ejector ? ejector.motiveEnthalpy - steam.enthalpyOut : steam.heatPerKg;
  const result: MultipleEffectResult = {
    mode: spec.input.mode,
    feedArrangement: spec.arrangementName,
    liquorOrder: spec.order.map((e) => e + 1),
    effects,
    steam: {
      massFlow: S,
      pressure: steam.pressure,
      temperature: spec.steamTemperature,
      latentHeat: steam.latentHeat,
      heatPerKg: st.chestHeatPerKg,
    },
    totalArea,
    area: totalArea / n,
    evaporation,
    steamEconomy: evaporation / boughtSteam,
    product,
    iterations,
    residual,
    balances,
    warnings: spec.warnings,
    cautions: standardCautions({
      liquor,
      steamPressures: ejector ? [steam.pressure, ejector.motivePressure] : [steam.pressure],
      bodyPressures: st.effects.map((e) => e.pressure),
    }),
    sources: [...collectSources(liquor), ...METHOD_SOURCES],
    figuresOfMerit: figuresOfMerit({
      distillateFlow: evaporation,
      heatingSteamFlow: boughtSteam,
      heatPerKgSteam: boughtHeatPerKg,
      totalArea,
    }),
  };
  if (ejector) {
    warnLargeSteamSuperheat(
      ejector.dischargeTemperature - spec.steamTemperature,
      result.warnings,
      'thermocompressor.dischargeTemperature',
    );
    result.thermocompressor = ejector;
    result.sources.push(THERMOCOMPRESSOR_SOURCE);
    result.cautions.push(EJECTOR_CAUTION);
  }
  if (spec.input.feedPreheat) {
    const pre = spec.preheatEffect;
    const bleedEffect = pre >= 0 ? effectAt(st, pre) : undefined;
    result.feedPreheat = {
      duty: spec.preheatDuty,
      source: pre >= 0 ? pre + 1 : 'external',
      bleed: bleedEffect
        ? spec.preheatDuty / (bleedEffect.vaporEnthalpy - bleedEffect.condensateEnthalpy)
        : 0,
      temperature: spec.feedInTemperature,
    };
  }
  return result;
}

// ---------------------------------------------------------------------------------------------
// The solver
// ---------------------------------------------------------------------------------------------

/**
 * Solves a multiple-effect train: mode 'equal-area' (design for equal areas) or 'given-areas'
 * (rating). See the module comment for the model, the feed arrangements, the options and the
 * solver. Three steps: {@link prepareTrain} (validation, feed, preheat), {@link iterateTrain}
 * (from {@link initialGuess} to the converged temperatures and concentrations) and
 * {@link assembleResult} (checks, balances, warnings).
 *
 * @throws EngineRangeError / EngineInputError for invalid inputs, naming the field
 * @throws EngineNoSolutionError when no physical solution exists (e.g. the boiling-point rises
 *   use up the available temperature difference, an effect's ΔT falls below the minimum, a bleed
 *   takes more vapour than an effect makes, the areas would evaporate all the feed) or when the
 *   iteration does not converge; never returns NaN.
 */
export function solveMultipleEffect(input: MultipleEffectInput): MultipleEffectResult {
  const spec = prepareTrain(input);
  const state = newTrainState(spec);
  initialGuess(spec, state);
  const iterations = iterateTrain(spec, state);
  return assembleResult(spec, state, iterations);
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
