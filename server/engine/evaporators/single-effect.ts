/**
 * Single-effect evaporator: design (the area a duty needs) and rating (what a given area does).
 *
 * Method (domain.md §1; C.J. Geankoplis, Transport Processes and Separation Process Principles,
 * 4th ed., Prentice Hall, 2003, section 8.4; W.L. McCabe, J.C. Smith, P. Harriott, Unit
 * Operations of Chemical Engineering, 7th ed., McGraw-Hill, 2005, chapter 16):
 *
 *   mass          F = L + V,   F·x_F = L·x_L                       (non-volatile solute)
 *   boiling point T = T_sat(p) + BPR(x_L, p)                        (at the product concentration)
 *   vapour        H_V = h_IF97(p, T)                                (superheated by the BPR)
 *   energy        S·(h_in − h_out)·(1 − f) = V·H_V + L·h_L − F·h_F
 *   duty          Q = S·(h_in − h_out)
 *   area          A = Q / (U·ΔT),  ΔT = T_s − T_boil                (T_boil INCLUDES the BPR)
 *   economy       V / S;   specific steam consumption S / V
 *
 * Heat loss (`heatLossFraction` f, 0 ≤ f < 1): the fraction of the steam's heat Q that is lost to
 * ambient from the body and liquor (shell, vapour head). All of Q crosses the heating surface, so
 * the area is sized on Q; Q·(1 − f) is what the liquor keeps; `heatLoss` = f·Q.
 *
 * Liquid head (`body.liquidHeight` H > 0): the mean boiling point, used for ΔT, is the liquor's
 * boiling point at the mid-depth pressure p + ρ·g·H/2 (ρ from the liquor model, or liquid water
 * with a warning). Vapour and product leave at the surface, at the boiling point at p: H_V, h_L
 * and the reported product temperature are taken there (McCabe et al. 7th ed., chapter 16, on
 * the effect of liquid head; recalled from memory).
 *
 * All numbers SI (Pa, K, J/kg, kg/s, W, m², W/(m²·K), mass fraction 0–1).
 */
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type {
  EffectHeatTransferState,
  OverallCoefficientProvider,
  OverallCoefficientResult,
} from '../heat-transfer/overall.js';
import type { LiquorModel } from '../liquors/model.js';
import { brentSolve } from '../numeric/roots.js';
import { IF97, saturationTemperature } from '../steam/if97.js';
import type { Citation, EngineCaution, EngineWarning, WarningSink } from '../types.js';
import {
  balanceResidual,
  collectSources,
  leavingVapor,
  liquidColumnPressure,
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
import { figuresOfMerit, type FiguresOfMerit } from './figures-of-merit.js';

// ---------------------------------------------------------------------------------------------
// Inputs and result
// ---------------------------------------------------------------------------------------------

export interface FeedSpec {
  /** F, kg/s (> 0). */
  massFlow: number;
  /** x_F, kg solute / kg solution, 0 ≤ x_F < 1. */
  massFraction: number;
  /** T_F, K. */
  temperature: number;
  /** Override of h_F, J/kg on the steam-table datum (otherwise from the liquor model at (x_F, T_F)). */
  enthalpy?: number;
}

/** Exactly one of massFraction, massFlow, evaporation; enthalpy optionally overrides h_L. */
export interface ProductSpec {
  /** x_L, kg/kg. */
  massFraction?: number;
  /** L, kg/s. */
  massFlow?: number;
  /** V = F − L, kg/s. */
  evaporation?: number;
  /** Override of h_L, J/kg (otherwise from the liquor model at (x_L, T)). */
  enthalpy?: number;
}

export interface BodySpec {
  /** Vapour-space pressure p, Pa absolute. */
  pressure: number;
  /**
   * U, W/(m²·K) (> 0), or a provider that estimates it at the effect's state (mass fraction of the
   * product, mean boiling temperature and pressure, steam condensing temperature): then U and the
   * area refer to the outside area of the tubes, and the result carries the estimate.
   */
  overallHeatTransferCoefficient: number | OverallCoefficientProvider;
  /** Height of the boiling liquid column above the heating surface's mid-point, m (default 0). */
  liquidHeight?: number;
}

export interface SingleEffectDesignInput {
  liquor: LiquorModel;
  feed: FeedSpec;
  product: ProductSpec;
  steam: SteamSupplySpec;
  body: BodySpec;
  /** Fraction of the steam's heat lost to ambient, 0 ≤ f < 1 (default 0); see the module doc. */
  heatLossFraction?: number;
}

export interface SingleEffectRatingInput {
  liquor: LiquorModel;
  /** (a) the feed rate fixed: give `feed.massFlow` and omit `product`. (b) a target product: give
   * `product.massFraction` and omit `feed.massFlow`, which is then found. */
  feed: Omit<FeedSpec, 'massFlow'> & { massFlow?: number };
  product?: { massFraction: number; enthalpy?: number };
  steam: SteamSupplySpec;
  body: BodySpec & { area: number };
  heatLossFraction?: number;
}

export interface StreamState {
  /** kg/s */
  massFlow: number;
  /** kg/kg */
  massFraction: number;
  /** K */
  temperature: number;
  /** J/kg */
  enthalpy: number;
}

export interface SingleEffectResult {
  mode: 'design' | 'rating';
  feed: StreamState;
  /** Leaves at the surface boiling point. */
  product: StreamState;
  vapor: { massFlow: number; pressure: number; temperature: number; enthalpy: number; superheat: number };
  steam: {
    massFlow: number;
    pressure: number;
    /** Condensing temperature T_s = T_sat(p_s), K. */
    temperature: number;
    inletTemperature: number;
    condensateTemperature: number;
    /** h_g − h_f at the steam pressure, J/kg. */
    latentHeat: number;
    enthalpyIn: number;
    enthalpyOut: number;
  };
  body: {
    pressure: number;
    /** U used for the area (the estimate's, at the converged state, when a provider was given). */
    overallHeatTransferCoefficient: number;
    liquidHeight: number;
    /** Pressure where the mean boiling point is taken (mid-depth; = pressure without head), Pa. */
    meanBoilingPressure: number;
    /** Boiling point used for ΔT, K (= product temperature without head). */
    meanBoilingTemperature: number;
  };
  /** BPR at the surface, T_product − T_sat(p), K. */
  boilingPointRise: number;
  /** T_sat(p), K. */
  waterBoilingPoint: number;
  /** Q = S·(h_in − h_out), W. */
  duty: number;
  /** f·Q, W. */
  heatLoss: number;
  heatLossFraction: number;
  /** T_s − T_boil (mean), K. */
  temperatureDifference: number;
  /** Q / (U·ΔT), m². In rating mode equals the given area to the solver tolerance. */
  area: number;
  /** Rating mode only: the area that was given, m². */
  specifiedArea?: number;
  /** V / S */
  steamEconomy: number;
  /** S / V */
  specificSteamConsumption: number;
  /**
   * Desalination figures of merit (./figures-of-merit.ts): distillate = the vapour, heating
   * steam = the steam, its heat per kg h_in − h_out.
   */
  figuresOfMerit: FiguresOfMerit;
  /** Relative residuals recomputed from the result's streams. */
  balances: { mass: number; solute: number; energy: number };
  /** The estimate of U at the converged state, when U was given as a provider. */
  heatTransfer?: OverallCoefficientResult;
  warnings: EngineWarning[];
  cautions: EngineCaution[];
  sources: Citation[];
}

// ---------------------------------------------------------------------------------------------
// Core (validated inputs, resolved steam)
// ---------------------------------------------------------------------------------------------

/**
 * The liquor side of an effect, validated: everything but the heating medium. Exported so that
 * other arrangements heated by something else (a vapour compressor) share the same checks and
 * balances.
 */
export interface LiquorSide {
  liquor: LiquorModel;
  pressure: number;
  waterBoilingPoint: number;
  /** U, W/(m²·K); NaN when `uProvider` gives it per state. */
  u: number;
  uProvider: OverallCoefficientProvider | undefined;
  liquidHeight: number;
  f: number;
  feedFraction: number;
  feedTemperature: number;
  feedEnthalpyOverride: number | undefined;
  productEnthalpyOverride: number | undefined;
}

interface Prepared extends LiquorSide {
  steam: SteamSupply;
}

/** The liquor-side balance of an effect at product fraction x_L and feed F (see {@link liquorBalance}). */
export interface LiquorBalance {
  F: number;
  L: number;
  V: number;
  xL: number;
  hF: number;
  hL: number;
  /** Surface boiling point, K. */
  T: number;
  /** Mean boiling point (mid-depth with a liquid head), K. */
  Tmean: number;
  pMean: number;
  /** Enthalpy of the vapour leaving at (p, T), J/kg. */
  HV: number;
  superheat: number;
  /** Heat the liquor takes: V·H_V + L·h_L − F·h_F, W. */
  need: number;
}

/** The liquor-side balance with the steam side: S (kg/s), Q (W) and ΔT (K). */
interface CoreState extends Omit<LiquorBalance, 'need'> {
  S: number;
  Q: number;
  dT: number;
}

/**
 * Liquor-side balances for product fraction x_L and feed F: L and V from the mass and solute
 * balances, the boiling points (surface and mean), the leaving vapour and the heat the liquor
 * takes, V·H_V + L·h_L − F·h_F. `warnings` undefined inside iterations.
 */
export function liquorBalance(
  pr: LiquorSide,
  F: number,
  xL: number,
  warnings: WarningSink,
  productFlow?: number,
): LiquorBalance {
  const { liquor, pressure } = pr;
  // A pure-water feed (x_F = 0) leaves x_L = 0 whatever L is: the solute balance cannot give L,
  // so the caller passes it (from product.massFlow or F − V).
  const L = productFlow ?? (xL > 0 ? (F * pr.feedFraction) / xL : F);
  const V = F - L;
  const T = liquor.boilingPoint(xL, pressure, warnings);
  let Tmean = T;
  let pMean = pressure;
  if (pr.liquidHeight > 0) {
    pMean = liquidColumnPressure(pressure, pr.liquidHeight, liquor, xL, T, warnings).pressure;
    Tmean = liquor.boilingPoint(xL, pMean, warnings);
  }
  const vap = leavingVapor(pressure, T, pr.waterBoilingPoint);
  const hF = pr.feedEnthalpyOverride ?? liquor.enthalpy(pr.feedFraction, pr.feedTemperature, warnings);
  const hL = pr.productEnthalpyOverride ?? liquor.enthalpy(xL, T, warnings);
  return {
    F,
    L,
    V,
    xL,
    hF,
    hL,
    T,
    Tmean,
    pMean,
    HV: vap.enthalpy,
    superheat: vap.superheat,
    need: V * vap.enthalpy + L * hL - F * hF,
  };
}

/**
 * Balances for product fraction x_L and feed F. May return S ≤ 0 (hot feed) or dT ≤ 0 (steam too
 * cold); the public functions decide what that means. `warnings` undefined inside iterations.
 */
function core(pr: Prepared, F: number, xL: number, warnings: WarningSink, productFlow?: number): CoreState {
  const b = liquorBalance(pr, F, xL, warnings, productFlow);
  const S = b.need / (pr.steam.heatPerKg * (1 - pr.f));
  const Q = S * pr.steam.heatPerKg;
  return {
    F: b.F,
    L: b.L,
    V: b.V,
    xL: b.xL,
    hF: b.hF,
    hL: b.hL,
    T: b.T,
    Tmean: b.Tmean,
    pMean: b.pMean,
    HV: b.HV,
    superheat: b.superheat,
    S,
    Q,
    dT: pr.steam.condensingTemperature - b.Tmean,
  };
}

function prepare(
  input: {
    liquor: LiquorModel;
    feed: { massFraction: number; temperature: number; enthalpy?: number };
    steam: SteamSupplySpec;
    body: BodySpec;
    heatLossFraction?: number;
  },
  productEnthalpy: number | undefined,
): Prepared {
  const side = prepareLiquorSide(input, productEnthalpy);
  return { ...side, steam: resolveSteamSupply(input.steam, 'steam') };
}

/**
 * Validates the liquor side of an effect (liquor, feed, body pressure, U, liquid height, heat-loss
 * fraction) and resolves T_sat(p).
 *
 * @throws EngineRangeError an input outside its range (field, value and range named)
 * @throws EngineInputError when `liquor` is not a liquor model
 */
export function prepareLiquorSide(
  input: {
    liquor: LiquorModel;
    feed: { massFraction: number; temperature: number; enthalpy?: number };
    body: BodySpec;
    heatLossFraction?: number;
  },
  productEnthalpy: number | undefined,
): LiquorSide {
  const { liquor, feed, body } = input;
  if (!liquor || typeof liquor.boilingPoint !== 'function') {
    throw new EngineInputError('liquor', 'liquor must be a liquor model');
  }
  requireMassFraction('feed.massFraction', feed.massFraction);
  requireInRange('feed.temperature', feed.temperature, IF97.minTemperature, IF97.region13Temperature, 'K');
  if (feed.enthalpy !== undefined) requireInRange('feed.enthalpy', feed.enthalpy, -1e7, 1e7, 'J/kg');
  if (productEnthalpy !== undefined) requireInRange('product.enthalpy', productEnthalpy, -1e7, 1e7, 'J/kg');
  requireInRange('body.pressure', body.pressure, IF97.minPressure, IF97.region13SaturationPressure, 'Pa');
  const givenU = body.overallHeatTransferCoefficient;
  const uProvider = typeof givenU === 'function' ? givenU : undefined;
  if (!uProvider) requirePositive('body.overallHeatTransferCoefficient', givenU as number, 'W/(m²·K)');
  const liquidHeight = body.liquidHeight ?? 0;
  requireInRange('body.liquidHeight', liquidHeight, 0, 100, 'm');
  const f = input.heatLossFraction ?? 0;
  if (!Number.isFinite(f) || f < 0 || f >= 1) {
    throw new EngineRangeError(
      'heatLossFraction',
      f,
      { min: 0, max: 1, unit: '1' },
      `heatLossFraction = ${f} must be from 0 up to (not including) 1`,
    );
  }
  return {
    liquor,
    pressure: body.pressure,
    waterBoilingPoint: saturationTemperature(body.pressure),
    u: uProvider ? Number.NaN : (givenU as number),
    uProvider,
    liquidHeight,
    f,
    feedFraction: feed.massFraction,
    feedTemperature: feed.temperature,
    feedEnthalpyOverride: feed.enthalpy,
    productEnthalpyOverride: productEnthalpy,
  };
}

/** U at an effect's state: the given number, or the provider's estimate there. */
export function coefficientAt(
  side: LiquorSide,
  state: EffectHeatTransferState,
): { u: number; estimate: OverallCoefficientResult | undefined } {
  if (!side.uProvider) return { u: side.u, estimate: undefined };
  const estimate = side.uProvider(state);
  return { u: estimate.overallHeatTransferCoefficient, estimate };
}

/** The state of the single effect's heating surface for the U estimate. */
function stateOf(pr: Prepared, c: CoreState): EffectHeatTransferState {
  return {
    massFraction: c.xL,
    boilingTemperature: c.Tmean,
    bodyPressure: c.pMean,
    condensingTemperature: pr.steam.condensingTemperature,
  };
}

function noSteamHotEnough(pr: Prepared, c: CoreState): EngineNoSolutionError {
  const ts = pr.steam.condensingTemperature;
  return new EngineNoSolutionError(
    `The steam is not hot enough to boil this liquor at this pressure: it condenses at ${ts.toFixed(2)} K but the liquor (x = ${c.xL.toFixed(4)}) boils at ${c.Tmean.toFixed(2)} K at ${c.pMean.toFixed(0)} Pa (ΔT = ${c.dT.toFixed(2)} K). Raise the steam pressure or lower the body pressure.`,
    {
      reason: 'non-positive-temperature-difference',
      residual: c.dT,
      template:
        'The steam is not hot enough to boil this liquor at this pressure: it condenses at {ts} but the liquor (x = {x}) boils at {tb} at {p} (ΔT = {dt}). Raise the steam pressure or lower the body pressure.',
      values: {
        ts: { value: ts, kind: 'temperature' },
        x: { value: c.xL, kind: 'massFraction' },
        tb: { value: c.Tmean, kind: 'temperature' },
        p: { value: c.pMean, kind: 'pressure' },
        dt: { value: c.dT, kind: 'temperatureDifference' },
      },
    },
  );
}

/** The liquor side's warnings: a feed that flashes on entry, a product near its solubility limit. */
export function liquorSideWarnings(
  pr: LiquorSide,
  c: { xL: number; T: number },
  warnings: EngineWarning[],
): void {
  if (pr.feedTemperature > pr.waterBoilingPoint) {
    // The BPR is ≥ 0, so a feed below T_sat(p) cannot flash: skip the model call then.
    warnFeedFlash(pr.feedTemperature, pr.liquor.boilingPoint(pr.feedFraction, pr.pressure), warnings);
  }
  warnSolubility(pr.liquor, c.xL, c.T, warnings);
}

/** Builds the public result from a converged core state, with warnings, cautions and balances. */
function assemble(
  pr: Prepared,
  c: CoreState,
  mode: 'design' | 'rating',
  warnings: EngineWarning[],
): SingleEffectResult {
  // U at the converged state (ΔT > 0 is checked by every caller before this).
  const { u, estimate } = coefficientAt(pr, stateOf(pr, c));
  const area = c.Q / (u * c.dT);
  if (estimate) warnings.push(...estimate.warnings);
  const heatLoss = pr.f * c.Q;
  if (![c.S, c.Q, area, c.HV, c.hF, c.hL, c.T].every(Number.isFinite)) {
    // Defensive: every input is range-checked, so this means a model returned a non-number.
    throw new EngineNoSolutionError('The balances gave a non-finite result for these inputs', {
      reason: 'non-finite',
    });
  }
  warnSmallTemperatureDifference(c.dT, warnings);
  warnLargeTemperatureDifference(c.dT, warnings);
  warnLargeSteamSuperheat(pr.steam.superheat, warnings);
  liquorSideWarnings(pr, c, warnings);
  const st = pr.steam;
  const result: SingleEffectResult = {
    mode,
    feed: { massFlow: c.F, massFraction: pr.feedFraction, temperature: pr.feedTemperature, enthalpy: c.hF },
    product: { massFlow: c.L, massFraction: c.xL, temperature: c.T, enthalpy: c.hL },
    vapor: {
      massFlow: c.V,
      pressure: pr.pressure,
      temperature: c.T,
      enthalpy: c.HV,
      superheat: c.superheat,
    },
    steam: {
      massFlow: c.S,
      pressure: st.pressure,
      temperature: st.condensingTemperature,
      inletTemperature: st.inletTemperature,
      condensateTemperature: st.condensateTemperature,
      latentHeat: st.latentHeat,
      enthalpyIn: st.enthalpyIn,
      enthalpyOut: st.enthalpyOut,
    },
    body: {
      pressure: pr.pressure,
      overallHeatTransferCoefficient: u,
      liquidHeight: pr.liquidHeight,
      meanBoilingPressure: c.pMean,
      meanBoilingTemperature: c.Tmean,
    },
    boilingPointRise: c.T - pr.waterBoilingPoint,
    waterBoilingPoint: pr.waterBoilingPoint,
    duty: c.Q,
    heatLoss,
    heatLossFraction: pr.f,
    temperatureDifference: c.dT,
    area,
    steamEconomy: c.V / c.S,
    specificSteamConsumption: c.S / c.V,
    figuresOfMerit: figuresOfMerit({
      distillateFlow: c.V,
      heatingSteamFlow: c.S,
      heatPerKgSteam: st.enthalpyIn - st.enthalpyOut,
      totalArea: area,
    }),
    balances: { mass: 0, solute: 0, energy: 0 },
    ...(estimate ? { heatTransfer: estimate } : {}),
    warnings,
    cautions: standardCautions({
      liquor: pr.liquor,
      steamPressures: [st.pressure],
      bodyPressures: [pr.pressure],
    }),
    sources: collectSources(pr.liquor),
  };
  result.balances = singleEffectBalances(result);
  return result;
}

/**
 * Relative residuals of the mass, solute and energy balances recomputed from a result's streams
 * (see {@link balanceResidual}): mass F vs L + V; solute F·x_F vs L·x_L; energy
 * S·h_in + F·h_F vs S·h_out + V·H_V + L·h_L + heat loss.
 */
export function singleEffectBalances(r: SingleEffectResult): {
  mass: number;
  solute: number;
  energy: number;
} {
  return {
    mass: balanceResidual([r.feed.massFlow], [r.product.massFlow, r.vapor.massFlow]),
    solute: balanceResidual(
      [r.feed.massFlow * r.feed.massFraction],
      [r.product.massFlow * r.product.massFraction],
    ),
    energy: balanceResidual(
      [r.steam.massFlow * r.steam.enthalpyIn, r.feed.massFlow * r.feed.enthalpy],
      [
        r.steam.massFlow * r.steam.enthalpyOut,
        r.vapor.massFlow * r.vapor.enthalpy,
        r.product.massFlow * r.product.enthalpy,
        r.heatLoss,
      ],
    ),
  };
}

// ---------------------------------------------------------------------------------------------
// Design
// ---------------------------------------------------------------------------------------------

/**
 * Product fraction x_L from whichever product quantity was given; typed errors for contradictions.
 * For a pure-water feed (x_F = 0) the product flow L is returned too: the solute balance is then
 * silent about it, and V = F − L.
 */
export function productTarget(F: number, xF: number, product: ProductSpec): { xL: number; L?: number } {
  const given = (['massFraction', 'massFlow', 'evaporation'] as const).filter(
    (k) => product[k] !== undefined,
  );
  if (given.length !== 1) {
    throw new EngineInputError(
      'product',
      `product: give exactly one of massFraction, massFlow or evaporation (got ${given.length === 0 ? 'none' : given.join(', ')})`,
    );
  }
  let xL: number;
  if (product.massFraction !== undefined) {
    const x = product.massFraction;
    if (!Number.isFinite(x) || x >= 1 || x < 0) {
      throw new EngineInputError(
        'product.massFraction',
        `product.massFraction = ${x} must be a mass fraction below 1 (a product cannot be pure solute)`,
      );
    }
    xL = x;
  } else if (product.massFlow !== undefined) {
    const L = product.massFlow;
    if (!Number.isFinite(L) || L <= 0 || L > F) {
      throw new EngineInputError(
        'product.massFlow',
        `product.massFlow = ${L} kg/s must be greater than 0 and at most the feed ${F} kg/s`,
      );
    }
    xL = (F * xF) / L;
    if (xL >= 1) {
      throw new EngineInputError(
        'product.massFlow',
        `product.massFlow = ${L} kg/s would leave a product of mass fraction ${xL} ≥ 1: it cannot be smaller than the solute in the feed, ${F * xF} kg/s`,
      );
    }
  } else {
    const V = product.evaporation as number;
    if (!Number.isFinite(V) || V < 0) {
      throw new EngineInputError(
        'product.evaporation',
        `product.evaporation = ${V} kg/s must not be negative`,
      );
    }
    if (V >= F) {
      throw new EngineInputError(
        'product.evaporation',
        `product.evaporation = ${V} kg/s must be less than the feed ${F} kg/s`,
      );
    }
    xL = (F * xF) / (F - V);
    if (xL >= 1) {
      throw new EngineInputError(
        'product.evaporation',
        `product.evaporation = ${V} kg/s would leave a product of mass fraction ${xL} ≥ 1`,
      );
    }
  }
  if (xL < xF) {
    throw new EngineInputError(
      'product.massFraction',
      `The product (x = ${xL}) is leaner than the feed (x = ${xF}): an evaporator only concentrates`,
    );
  }
  if (xF === 0 && product.massFraction !== undefined && xL > 0) {
    throw new EngineInputError(
      'product.massFraction',
      'A feed of pure water (x = 0) cannot be concentrated to a product with solute; give product.evaporation instead',
    );
  }
  if (xF > 0 && xL === xF) {
    throw new EngineInputError(
      'product.massFraction',
      `The product (x = ${xL}) is no richer than the feed: nothing is evaporated`,
    );
  }
  if (xF === 0) {
    const L = product.massFlow ?? F - (product.evaporation ?? 0);
    if (!(L < F)) {
      const field =
        product.massFlow !== undefined
          ? 'product.massFlow'
          : product.evaporation !== undefined
            ? 'product.evaporation'
            : 'product.massFraction';
      throw new EngineInputError(
        field,
        `${field}: with a feed of pure water give a product mass flow below the feed ${F} kg/s (or an evaporation above 0); otherwise nothing is evaporated`,
      );
    }
    return { xL, L };
  }
  return { xL };
}

/** x_L alone (the product flow follows from the solute balance when x_F > 0). */
function productFraction(F: number, xF: number, product: ProductSpec): number {
  return productTarget(F, xF, product).xL;
}

/**
 * Design a single-effect evaporator: from feed, product target, steam and body conditions, the
 * steam flow, duty and heating area (see the module doc for the equations and definitions).
 *
 * Product with x_F = 0 (pure water) is allowed only with `product.evaporation` (or massFlow):
 * then L carries no solute and x_L = 0.
 *
 * @throws EngineRangeError an input outside its range (field, value and range named)
 * @throws EngineInputError contradictory inputs (product leaner than feed, negative evaporation, x ≥ 1)
 * @throws EngineNoSolutionError ΔT ≤ 0 (steam too cold for this liquor at this pressure), or a
 *   feed so hot that it would flash beyond the specified product without steam
 */
export function designSingleEffect(input: SingleEffectDesignInput): SingleEffectResult {
  const pr = prepare(input, input.product?.enthalpy);
  requirePositive('feed.massFlow', input.feed.massFlow, 'kg/s');
  if (!input.product) throw new EngineInputError('product', 'product is required');
  const F = input.feed.massFlow;
  const { xL, L } = productTarget(F, pr.feedFraction, input.product);
  const warnings: EngineWarning[] = [];
  const c = core(pr, F, xL, warnings, L);
  if (!(c.dT > 0)) throw noSteamHotEnough(pr, c);
  if (!(c.S > 0)) {
    throw new EngineNoSolutionError(
      `The feed brings more heat than this evaporation needs (required steam ${c.S.toFixed(6)} kg/s ≤ 0): it would flash past the specified product without heating. Specify a higher product concentration or a colder feed.`,
      { reason: 'no-steam-needed', residual: c.S },
    );
  }
  return assemble(pr, c, 'design', warnings);
}

// ---------------------------------------------------------------------------------------------
// Rating
// ---------------------------------------------------------------------------------------------

/**
 * Rate a single-effect evaporator of given area A and U.
 *
 * (a) Feed rate fixed (`feed.massFlow` given, no `product`): finds x_L on [x_F, x_max] with
 *     Q(x_L) − U·A·ΔT(x_L) = 0 (Brent's bracketed root, ../numeric/roots.ts). The residual rises
 *     with x_L (more evaporation, higher BPR, smaller ΔT), so the root is unique. x_max is the
 *     liquor model's upper mass-fraction limit (reduced by halving toward x_F if the model refuses
 *     it at that pressure).
 * (b) Target product (`product.massFraction` given, no `feed.massFlow`): with x_L fixed every
 *     flow and the area are proportional to F (temperatures and enthalpies do not depend on F),
 *     so F = A / A(F = 1 kg/s) exactly, with no iteration.
 *
 * @throws EngineNoSolutionError when the area cannot even heat the feed to boiling, when the
 *   steam is too cold, or when the area would concentrate beyond the model's limit
 */
export function rateSingleEffect(input: SingleEffectRatingInput): SingleEffectResult {
  const pr = prepare(input, input.product?.enthalpy);
  const A = input.body.area;
  requirePositive('body.area', A, 'm²');
  const hasF = input.feed.massFlow !== undefined;
  const hasX = input.product?.massFraction !== undefined;
  if (hasF === hasX) {
    throw new EngineInputError(
      hasF ? 'product' : 'feed.massFlow',
      'Rating: give either feed.massFlow (to find the product reached) or product.massFraction (to find the feed the area allows), not both or neither',
    );
  }
  const xF = pr.feedFraction;
  let result: SingleEffectResult;
  if (hasF) {
    const F = input.feed.massFlow as number;
    requirePositive('feed.massFlow', F, 'kg/s');
    if (xF === 0) {
      throw new EngineInputError(
        'feed.massFraction',
        'Rating with a fixed feed needs a feed with solute (x_F > 0): the product concentration is what is found',
      );
    }
    // At x_F nothing is evaporated: a positive residual means the area cannot even heat the feed.
    const c0 = core(pr, F, xF, undefined);
    if (!(c0.dT > 0)) throw noSteamHotEnough(pr, c0);
    // A given U is a constant; an estimated U depends on x_L and the boiling point, so it is
    // evaluated inside the residual and Brent's root is the fixed point of both. Where ΔT ≤ 0
    // (beyond the bracket's useful end) the estimate has no meaning: the last U stands in there,
    // which keeps the residual's sign (Q − U·A·ΔT > 0).
    let lastU = coefficientAt(pr, stateOf(pr, c0)).u;
    const uAt = (c: CoreState): number => {
      if (!pr.uProvider || !(c.dT > 0)) return lastU;
      lastU = coefficientAt(pr, stateOf(pr, c)).u;
      return lastU;
    };
    const u0 = lastU;
    const residual = (x: number): number => {
      const c = core(pr, F, x, undefined);
      return c.Q - uAt(c) * A * c.dT;
    };
    const r0 = c0.Q - u0 * A * c0.dT;
    if (r0 > 0) {
      throw new EngineNoSolutionError(
        `The area ${A} m² is too small to bring the feed to its boiling point: heating it alone needs ${(c0.Q / (u0 * c0.dT)).toFixed(3)} m², and nothing would be evaporated`,
        { reason: 'area-too-small-to-boil', residual: r0 },
      );
    }
    let xHi = Math.min(pr.liquor.limits.massFraction.max, 1 - 1e-9);
    let rHi = NaN;
    for (let i = 0; i < 40; i++) {
      try {
        rHi = residual(xHi);
        break;
      } catch (err) {
        if (!(err instanceof EngineRangeError)) throw err;
        xHi = xF + 0.5 * (xHi - xF);
      }
    }
    if (!Number.isFinite(rHi)) {
      throw new EngineNoSolutionError('The liquor model refuses every product concentration above the feed', {
        reason: 'model-range',
      });
    }
    if (rHi < 0) {
      throw new EngineNoSolutionError(
        `The area ${A} m² would concentrate the liquor beyond x = ${xHi.toFixed(4)}, the highest concentration the ${pr.liquor.id} model covers at this pressure`,
        { reason: 'beyond-model-limit', residual: rHi },
      );
    }
    const root = brentSolve(residual, xF, xHi, { tol: 1e-13 });
    const warnings: EngineWarning[] = [];
    result = assemble(pr, core(pr, F, root.root, warnings), 'rating', warnings);
  } else {
    const xL = (input.product as { massFraction: number }).massFraction;
    const F1 = 1;
    productFraction(F1, xF, { massFraction: xL }); // same contradiction checks as design
    const c1 = core(pr, F1, xL, undefined);
    if (!(c1.dT > 0)) throw noSteamHotEnough(pr, c1);
    if (!(c1.S > 0)) {
      throw new EngineNoSolutionError(
        'The feed brings more heat than this concentration needs: it reaches the target without steam at any feed rate',
        { reason: 'no-steam-needed', residual: c1.S },
      );
    }
    // x_L fixed: the state, and so an estimated U, does not depend on F.
    const F = A / (c1.Q / (coefficientAt(pr, stateOf(pr, c1)).u * c1.dT));
    const warnings: EngineWarning[] = [];
    result = assemble(pr, core(pr, F, xL, warnings), 'rating', warnings);
  }
  result.specifiedArea = A;
  return result;
}
