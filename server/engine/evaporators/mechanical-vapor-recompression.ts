/**
 * Mechanical vapour recompression (MVR): a single effect heated by its own vapour, compressed by
 * a fan or compressor to a pressure whose saturation temperature lies above the liquor's boiling
 * point. Design (the area a ΔT or a discharge pressure needs) and rating (the ΔT a given area
 * needs).
 *
 * Method (the chain of W.L. McCabe, J.C. Smith, P. Harriott, Unit Operations of Chemical
 * Engineering, 7th ed., McGraw-Hill, 2005, chapter 16, "vapor recompression"; H.T. El-Dessouky,
 * H.M. Ettouney, Fundamentals of Salt Water Desalination, Elsevier, 2002, chapter on single-effect
 * mechanical vapour compression; both recalled from memory), with every water property from
 * IAPWS-IF97:
 *
 *   liquor side   as the single effect (./single-effect.ts): F = L + V, F·x_F = L·x_L,
 *                 T_b = boiling point at p (mean T_b with a liquid head), H_V = h(p, T_b)
 *   duty          Q = (V·H_V + L·h_L − F·h_F) / (1 − f)        (f: heat-loss fraction)
 *   suction       p₁ = p − Δp_suction, h₁ = H_V (adiabatic throttling), s₁ = s(p₁, h₁)
 *   chest         T_c = T_b,mean + ΔT,  p₂ = p_sat(T_c)           (or p₂ given, ΔT = T_sat(p₂) − T_b)
 *   stages        n = ⌈ln(p₂/p₁) / ln r_max⌉ (or given), r = (p₂/p₁)^(1/n) per stage
 *   each stage    h_out,s = h(p_out, s_in),  h_out = h_in + (h_out,s − h_in)/η_s,
 *                 W = m·(h_out − h_in); then desuperheated to saturated vapour h_g(p_out) by
 *                 injecting saturated liquid h_f(p_out): m_w = m·(h_out − h_g)/(h_g − h_f);
 *                 the next stage compresses m + m_w
 *   power         shaft ΣW, electric ΣW / η_drive, specific energy electric / V
 *   heat offered  Q_c = m_c·(h_g − h_f)(p₂)   (m_c: vapour leaving the last desuperheater)
 *   Q_c < Q       make-up steam S = (Q − Q_c) / (h_S − h_f(p₂)), saturated at its pressure
 *   Q_c > Q       surplus vapour (Q_c − Q)/(h_g − h_f) to a trim condenser
 *   area          A = Q / (U·ΔT)
 *
 * The duty does not depend on ΔT (nothing on the liquor side does), so in rating ΔT = Q/(U·A)
 * holds exactly and needs no iteration.
 *
 * Only the suction-side pressure drop is modelled; the chest pressure is the discharge pressure.
 *
 * All numbers SI (Pa, K, J/kg, kg/s, W, m², W/(m²·K)).
 */
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type { LiquorModel } from '../liquors/model.js';
import {
  IF97,
  saturationEnthalpies,
  saturationPressure,
  saturationTemperature,
  enthalpyAtPS,
  stateAtPH,
} from '../steam/if97.js';
import {
  addWarning,
  templated,
  type Citation,
  type EngineCaution,
  type EngineWarning,
  type WarningSink,
} from '../types.js';
import { figuresOfMerit, type FiguresOfMerit } from './figures-of-merit.js';
import {
  balanceResidual,
  collectSources,
  requireInRange,
  requirePositive,
  standardCautions,
  warnLargeTemperatureDifference,
  warnSmallTemperatureDifference,
} from './common.js';
import type { OverallCoefficientProvider, OverallCoefficientResult } from '../heat-transfer/overall.js';
import { brentSolve } from '../numeric/roots.js';
import {
  coefficientAt,
  liquorBalance,
  liquorSideWarnings,
  prepareLiquorSide,
  productTarget,
  type FeedSpec,
  type LiquorBalance,
  type LiquorSide,
  type ProductSpec,
  type StreamState,
} from './single-effect.js';

// ---------------------------------------------------------------------------------------------
// Constants (common practice)
// ---------------------------------------------------------------------------------------------

/** Default isentropic efficiency of a vapour fan or compressor (common practice: 0.70–0.80). */
export const DEFAULT_ISENTROPIC_EFFICIENCY = 0.75;
/** Default efficiency of motor and drive together (common practice: 0.93–0.97). */
export const DEFAULT_DRIVE_EFFICIENCY = 0.95;
/** Default pressure ratio one fan stage gives (common practice for single-stage MVR fans: 1.3–1.5). */
export const DEFAULT_MAX_PRESSURE_RATIO_PER_STAGE = 1.4;
/** Isentropic efficiencies outside this band are unusual for vapour compressors (common practice). */
export const USUAL_ISENTROPIC_EFFICIENCY = { min: 0.5, max: 0.9 } as const;
/**
 * BPR above this share of the saturation-temperature lift flags MVR as uneconomic: the compressor
 * then spends most of its lift on the boiling-point rise instead of the ΔT across the surface
 * (common practice: MVR suits liquors with a small BPR).
 */
export const UNECONOMIC_BPR_SHARE_OF_LIFT = 0.5;
/** Most stages the model accepts (a train of more fans than this is not built). */
export const MAX_STAGES = 10;
/** Highest pressure ratio per stage accepted (beyond what any single compressor stage gives on steam). */
export const MAX_STAGE_PRESSURE_RATIO = 10;

// ---------------------------------------------------------------------------------------------
// Inputs and result
// ---------------------------------------------------------------------------------------------

export interface MvrBodySpec {
  /** Vapour-space pressure p, Pa absolute. */
  pressure: number;
  /**
   * U, W/(m²·K), or a provider that estimates it at the body's state (product mass fraction, mean
   * boiling temperature and pressure, the chest's condensing temperature T_sat(p₂)): U and the
   * area then refer to the outside area of the tubes, and the result carries the estimate.
   */
  overallHeatTransferCoefficient: number | OverallCoefficientProvider;
  /** Design: T_sat(p₂) − T_boil, K. Exactly one of this, `area`, `compressor.dischargePressure`. */
  temperatureDifference?: number;
  /** Rating: heat-transfer area, m². */
  area?: number;
  /** Liquid column above the heating surface's mid-point, m (default 0). */
  liquidHeight?: number;
}

export interface CompressorSpec {
  /** η_s per stage, 0 < η_s ≤ 1 (default 0.75). */
  isentropicEfficiency?: number;
  /** Motor and drive, 0 < η ≤ 1 (default 0.95). */
  driveEfficiency?: number;
  /** p₂, Pa absolute, instead of body.temperatureDifference. */
  dischargePressure?: number;
  /** Number of stages (default: as many as maxPressureRatioPerStage needs). */
  stages?: number;
  /** Pressure ratio one stage gives, > 1 (default 1.4). */
  maxPressureRatioPerStage?: number;
}

export interface MechanicalVaporRecompressionInput {
  liquor: LiquorModel;
  feed: FeedSpec;
  product: ProductSpec;
  body: MvrBodySpec;
  compressor?: CompressorSpec;
  /** Fraction of the duty lost to ambient, 0 ≤ f < 1 (default 0). */
  heatLossFraction?: number;
  /** Make-up steam, saturated at this pressure, Pa (default: saturated at the discharge pressure). */
  makeUpSteam?: { pressure?: number };
  /** Pressure lost between the vapour space and the compressor inlet, Pa (default 0). */
  suctionPressureDrop?: number;
}

/** One compression stage, SI. */
export interface CompressorStage {
  inletPressure: number;
  outletPressure: number;
  /** Vapour flow through the stage, kg/s. */
  massFlow: number;
  inletEnthalpy: number;
  /** h(p_out, s_in), J/kg. */
  isentropicEnthalpy: number;
  /** Actual outlet enthalpy before desuperheating, J/kg. */
  outletEnthalpy: number;
  /** Before desuperheating, K. */
  outletTemperature: number;
  shaftPower: number;
  /** Saturated liquid injected after the stage, kg/s. */
  desuperheatingWater: number;
  /** h_f(p_out), J/kg. */
  desuperheatingWaterEnthalpy: number;
  /** Enthalpy of the vapour after desuperheating (h_g(p_out)), J/kg. */
  deliveredEnthalpy: number;
}

/** The figures of one compression from (p_in, h_in) to p_out (see {@link compressorStage}). */
export interface StageFigures {
  /** s(p_in, h_in), J/(kg·K). */
  inletEntropy: number;
  /** h(p_out, s_in), J/kg. */
  isentropicEnthalpy: number;
  /** h_in + (h_out,s − h_in)/η, J/kg. */
  outletEnthalpy: number;
  /** T(p_out, h_out), K. */
  outletTemperature: number;
  /** T_sat(p_out), K. */
  saturationTemperature: number;
  /** h_f(p_out), J/kg. */
  saturatedLiquidEnthalpy: number;
  /** h_g(p_out), J/kg. */
  saturatedVaporEnthalpy: number;
  /** Saturated liquid injected per kg of vapour to bring it to saturated vapour, kg/kg (≥ 0). */
  desuperheatingWaterPerKg: number;
}

export interface MechanicalVaporRecompressionResult {
  mode: 'design' | 'rating';
  feed: StreamState;
  product: StreamState;
  /** The evaporated water leaving the body (the compressor's suction flow). */
  vapor: { massFlow: number; pressure: number; temperature: number; enthalpy: number; superheat: number };
  body: {
    pressure: number;
    overallHeatTransferCoefficient: number;
    liquidHeight: number;
    meanBoilingPressure: number;
    meanBoilingTemperature: number;
  };
  boilingPointRise: number;
  waterBoilingPoint: number;
  compressor: {
    suctionPressure: number;
    suctionTemperature: number;
    suctionEnthalpy: number;
    dischargePressure: number;
    pressureRatio: number;
    stagePressureRatio: number;
    /** T_sat(p₂) − T_sat(p₁), K. */
    saturationTemperatureLift: number;
    /** Last stage, before desuperheating, K. */
    dischargeTemperature: number;
    stages: number;
    /** Stages maxPressureRatioPerStage needs (= stages unless stages was given lower). */
    stagesNeeded: number;
    isentropicEfficiency: number;
    driveEfficiency: number;
    shaftPower: number;
    electricPower: number;
    /** Σ over the stages, kg/s. */
    desuperheatingWater: number;
    /** Vapour delivered to the chest side after the last desuperheater, kg/s. */
    deliveredMassFlow: number;
    stageDetails: CompressorStage[];
  };
  /** T_sat(p₂): where the compressed vapour condenses, K. */
  condensingTemperature: number;
  /** h_g − h_f at p₂, J/kg. */
  latentHeat: number;
  /** Heat the delivered vapour would give condensing to saturated liquid at p₂, W. */
  compressedVaporHeat: number;
  duty: number;
  heatLoss: number;
  heatLossFraction: number;
  temperatureDifference: number;
  area: number;
  specifiedArea?: number;
  /** Electric energy per kg evaporated, J/kg. */
  specificEnergy: number;
  makeUpSteam: { massFlow: number; pressure: number; enthalpy: number };
  surplusVapor: { massFlow: number; enthalpy: number };
  /** Condensate leaving the chest (saturated liquid at p₂), including the injected water. */
  condensate: { massFlow: number; enthalpy: number };
  balances: { mass: number; solute: number; energy: number };
  /** The estimate of U at the solved state, when U was given as a provider. */
  heatTransfer?: OverallCoefficientResult;
  warnings: EngineWarning[];
  cautions: EngineCaution[];
  sources: Citation[];
}

// ---------------------------------------------------------------------------------------------
// One stage
// ---------------------------------------------------------------------------------------------

/**
 * One compression of water vapour from (p_in, h_in) to p_out with isentropic efficiency η, and the
 * saturated liquid that brings the discharge back to saturated vapour at p_out.
 *
 *   s_in = s(p_in, h_in),  h_out,s = h(p_out, s_in),  h_out = h_in + (h_out,s − h_in)/η,
 *   m_w/m = (h_out − h_g)/(h_g − h_f) at p_out (0 when the discharge is not superheated)
 *
 * Validity: p from 611.213 Pa to 16.529 MPa (IF97 regions 1, 2 and 4 through ../steam/if97.ts).
 * Source: definition of the isentropic efficiency of a compressor (e.g. Y.A. Çengel, M.A. Boles,
 * Thermodynamics: An Engineering Approach, chapter 7, from memory); properties IAPWS R7-97(2012).
 *
 * @param inletPressure p_in, Pa
 * @param inletEnthalpy h_in, J/kg
 * @param outletPressure p_out, Pa (> p_in)
 * @param isentropicEfficiency η_s, 0 < η ≤ 1
 * @returns the stage's enthalpies, temperature and desuperheating water, SI
 * @example compressorStage(30000, 2625000, 42000, 0.75).outletEnthalpy // ≈ 2698376.2 J/kg (python3-iapws, tests/fixtures/recompression/mvr-iapws.json: stage_example)
 */
export function compressorStage(
  inletPressure: number,
  inletEnthalpy: number,
  outletPressure: number,
  isentropicEfficiency: number,
): StageFigures {
  const inletEntropy = stateAtPH(inletPressure, inletEnthalpy, { transport: false }).entropy;
  const isentropicEnthalpy = enthalpyAtPS(outletPressure, inletEntropy);
  const outletEnthalpy = inletEnthalpy + (isentropicEnthalpy - inletEnthalpy) / isentropicEfficiency;
  const sat = saturationEnthalpies(outletPressure);
  const superheated = outletEnthalpy > sat.vapor;
  const outletTemperature = superheated
    ? stateAtPH(outletPressure, outletEnthalpy, { transport: false }).temperature
    : sat.temperature;
  return {
    inletEntropy,
    isentropicEnthalpy,
    outletEnthalpy,
    outletTemperature,
    saturationTemperature: sat.temperature,
    saturatedLiquidEnthalpy: sat.liquid,
    saturatedVaporEnthalpy: sat.vapor,
    desuperheatingWaterPerKg: superheated ? (outletEnthalpy - sat.vapor) / (sat.vapor - sat.liquid) : 0,
  };
}

// ---------------------------------------------------------------------------------------------
// Input checks
// ---------------------------------------------------------------------------------------------

function requireEfficiency(field: string, value: number): void {
  if (!Number.isFinite(value) || value <= 0 || value > 1) {
    throw new EngineRangeError(
      field,
      value,
      { min: 0, max: 1, unit: '1' },
      `${field} = ${value} must be above 0 and at most 1`,
      undefined,
      'an efficiency lies above 0 and at most 1',
    );
  }
}

interface Machine {
  eta: number;
  etaDrive: number;
  rMax: number;
  stages: number | undefined;
}

function machine(c: CompressorSpec | undefined): Machine {
  const eta = c?.isentropicEfficiency ?? DEFAULT_ISENTROPIC_EFFICIENCY;
  requireEfficiency('compressor.isentropicEfficiency', eta);
  const etaDrive = c?.driveEfficiency ?? DEFAULT_DRIVE_EFFICIENCY;
  requireEfficiency('compressor.driveEfficiency', etaDrive);
  const rMax = c?.maxPressureRatioPerStage ?? DEFAULT_MAX_PRESSURE_RATIO_PER_STAGE;
  if (!Number.isFinite(rMax) || rMax <= 1 || rMax > MAX_STAGE_PRESSURE_RATIO) {
    throw new EngineRangeError(
      'compressor.maxPressureRatioPerStage',
      rMax,
      { min: 1, max: MAX_STAGE_PRESSURE_RATIO, unit: '1' },
      `compressor.maxPressureRatioPerStage = ${rMax} must be above 1 and at most ${MAX_STAGE_PRESSURE_RATIO}`,
      undefined,
      'a stage must raise the pressure',
    );
  }
  const stages = c?.stages;
  if (stages !== undefined && (!Number.isInteger(stages) || stages < 1 || stages > MAX_STAGES)) {
    throw new EngineRangeError(
      'compressor.stages',
      stages,
      { min: 1, max: MAX_STAGES, unit: '1' },
      `compressor.stages = ${stages} must be a whole number from 1 to ${MAX_STAGES}`,
      undefined,
      'a whole number of stages',
    );
  }
  return { eta, etaDrive, rMax, stages };
}

/**
 * Stages a pressure ratio needs at r_max per stage, n = ⌈ln r / ln r_max⌉ (a ratio at a power of
 * r_max, to round-off, needs no extra stage), each then giving r^(1/n).
 *
 * Validity: r ≥ 1, r_max > 1. Source: equal pressure ratio per stage, the usual split of a
 * multi-stage compression (common practice).
 *
 * @param pressureRatio p₂/p₁
 * @param maxRatioPerStage r_max
 * @returns n, at least 1
 * @example stagesNeeded(2.5, 1.4) // → 3
 */
export function stagesNeeded(pressureRatio: number, maxRatioPerStage: number): number {
  return Math.max(1, Math.ceil(Math.log(pressureRatio) / Math.log(maxRatioPerStage) - 1e-9));
}

// ---------------------------------------------------------------------------------------------
// Solve
// ---------------------------------------------------------------------------------------------

function noLift(tc: number, c: LiquorBalance): EngineNoSolutionError {
  return new EngineNoSolutionError(
    `The compressed vapour would condense at ${tc.toFixed(2)} K, not above the liquor's boiling point ${c.Tmean.toFixed(2)} K: raise the discharge pressure`,
    {
      reason: 'non-positive-temperature-difference',
      residual: tc - c.Tmean,
      template:
        "The compressed vapour would condense at {tc}, not above the liquor's boiling point {tb}: raise the discharge pressure",
      values: {
        tc: { value: tc, kind: 'temperature' },
        tb: { value: c.Tmean, kind: 'temperature' },
      },
    },
  );
}

/**
 * Design (body.temperatureDifference or compressor.dischargePressure given) or rating (body.area
 * given) of a mechanical-vapour-recompression evaporator; see the module doc for the equations.
 *
 * @throws EngineRangeError an input outside its range (field, value and range named)
 * @throws EngineInputError none or more than one of body.temperatureDifference, body.area and
 *   compressor.dischargePressure; contradictory product targets
 * @throws EngineNoSolutionError the compressed vapour would not condense above the boiling point;
 *   a feed hot enough to need no heat
 */
export function mechanicalVaporRecompression(
  input: MechanicalVaporRecompressionInput,
): MechanicalVaporRecompressionResult {
  const given = (
    [
      ['body.temperatureDifference', input.body?.temperatureDifference],
      ['body.area', input.body?.area],
      ['compressor.dischargePressure', input.compressor?.dischargePressure],
    ] as const
  ).filter(([, v]) => v !== undefined);
  if (given.length !== 1) {
    throw new EngineInputError(
      given[1]?.[0] ?? 'body.temperatureDifference',
      given.length === 0
        ? 'give one of body.temperatureDifference, body.area or compressor.dischargePressure'
        : `give only one of body.temperatureDifference, body.area or compressor.dischargePressure (got ${given.map(([k]) => k).join(' and ')})`,
    );
  }
  const side = prepareLiquorSide(input, input.product?.enthalpy);
  requirePositive('feed.massFlow', input.feed.massFlow, 'kg/s');
  if (!input.product) throw new EngineInputError('product', 'product is required');
  const m = machine(input.compressor);
  const dpSuction = input.suctionPressureDrop ?? 0;
  requireInRange('suctionPressureDrop', dpSuction, 0, side.pressure - IF97.minPressure, 'Pa');
  const F = input.feed.massFlow;
  const { xL, L } = productTarget(F, side.feedFraction, input.product);
  const warnings: EngineWarning[] = [];
  const c = liquorBalance(side, F, xL, warnings, L);
  if (!(c.need > 0)) {
    throw new EngineNoSolutionError(
      'The feed brings more heat than this evaporation needs: it would flash past the specified product without heating. Specify a higher product concentration or a colder feed.',
      { reason: 'no-heat-needed', residual: c.need },
    );
  }
  const f = side.f;
  const Q = c.need / (1 - f);
  const suctionPressure = side.pressure - dpSuction;

  // The chest: condensing temperature and discharge pressure.
  let tc: number;
  let p2: number;
  const tcMax = IF97.region13Temperature;
  if (input.body.temperatureDifference !== undefined) {
    const dT = input.body.temperatureDifference;
    requirePositive('body.temperatureDifference', dT, 'K');
    requireInRange('body.temperatureDifference', dT, 0, tcMax - c.Tmean, 'K');
    tc = c.Tmean + dT;
    p2 = saturationPressure(tc);
  } else if (input.body.area !== undefined) {
    requirePositive('body.area', input.body.area, 'm²');
    tc = condensingTemperatureForArea(side, c, Q, input.body.area, tcMax);
    if (!(tc <= tcMax)) {
      throw new EngineNoSolutionError(
        `The area ${input.body.area} m² is so small that the vapour would have to condense at ${tc.toFixed(2)} K, beyond ${tcMax} K`,
        {
          reason: 'area-too-small',
          template:
            'The area is so small that the vapour would have to condense at {tc}, beyond {max}: give a larger area',
          values: { tc: { value: tc, kind: 'temperature' }, max: { value: tcMax, kind: 'temperature' } },
        },
      );
    }
    p2 = saturationPressure(tc);
  } else {
    p2 = input.compressor?.dischargePressure as number;
    requireInRange(
      'compressor.dischargePressure',
      p2,
      IF97.minPressure,
      IF97.region13SaturationPressure,
      'Pa',
    );
    if (!(p2 > suctionPressure)) {
      throw new EngineRangeError(
        'compressor.dischargePressure',
        p2,
        { min: suctionPressure, max: IF97.region13SaturationPressure, unit: 'Pa' },
        `compressor.dischargePressure = ${p2} Pa must be above the suction pressure ${suctionPressure} Pa`,
        undefined,
        'the discharge must be above the suction pressure',
      );
    }
    tc = saturationTemperature(p2);
    if (!(tc > c.Tmean)) throw noLift(tc, c);
  }
  const dT = tc - c.Tmean;

  // The compressor, stage by stage.
  const h1 = c.HV;
  const suction = stateAtPH(suctionPressure, h1, { transport: false });
  const ratio = p2 / suctionPressure;
  const needed = stagesNeeded(ratio, m.rMax);
  const n = m.stages ?? needed;
  const rStage = ratio ** (1 / n);
  const stageDetails: CompressorStage[] = [];
  let mFlow = c.V;
  let pIn = suctionPressure;
  let hIn = h1;
  let shaft = 0;
  let water = 0;
  let dischargeTemperature = suction.temperature;
  for (let i = 1; i <= n; i++) {
    const pOut = i === n ? p2 : suctionPressure * rStage ** i;
    const s = compressorStage(pIn, hIn, pOut, m.eta);
    const w = mFlow * (s.outletEnthalpy - hIn);
    const mw = mFlow * s.desuperheatingWaterPerKg;
    const delivered = s.desuperheatingWaterPerKg > 0 ? s.saturatedVaporEnthalpy : s.outletEnthalpy;
    stageDetails.push({
      inletPressure: pIn,
      outletPressure: pOut,
      massFlow: mFlow,
      inletEnthalpy: hIn,
      isentropicEnthalpy: s.isentropicEnthalpy,
      outletEnthalpy: s.outletEnthalpy,
      outletTemperature: s.outletTemperature,
      shaftPower: w,
      desuperheatingWater: mw,
      desuperheatingWaterEnthalpy: s.saturatedLiquidEnthalpy,
      deliveredEnthalpy: delivered,
    });
    shaft += w;
    water += mw;
    mFlow += mw;
    pIn = pOut;
    hIn = delivered;
    dischargeTemperature = s.outletTemperature;
  }
  const chest = saturationEnthalpies(p2);
  const latentHeat = chest.vapor - chest.liquid;
  const delivered = hIn;
  const qc = mFlow * (delivered - chest.liquid);

  // Make-up steam or surplus vapour. A given make-up pressure is reported even when no make-up
  // is needed; it must reach the chest (at least p₂) only when steam is actually drawn.
  let makeUpPressure = p2;
  let makeUpEnthalpy = chest.vapor;
  const givenMakeUp = input.makeUpSteam?.pressure;
  if (givenMakeUp !== undefined) {
    requireInRange(
      'makeUpSteam.pressure',
      givenMakeUp,
      IF97.minPressure,
      IF97.region13SaturationPressure,
      'Pa',
    );
    makeUpPressure = givenMakeUp;
    makeUpEnthalpy = saturationEnthalpies(givenMakeUp).vapor;
  }
  let makeUp = 0;
  let surplus = 0;
  if (qc < Q) {
    if (givenMakeUp !== undefined && givenMakeUp < p2) {
      throw new EngineRangeError(
        'makeUpSteam.pressure',
        givenMakeUp,
        { min: p2, max: IF97.region13SaturationPressure, unit: 'Pa' },
        `makeUpSteam.pressure = ${givenMakeUp} Pa is below the chest (discharge) pressure ${p2} Pa: the make-up steam could not flow into the chest`,
        undefined,
        'make-up steam must be at least at the discharge pressure to flow into the chest',
      );
    }
    makeUp = (Q - qc) / (makeUpEnthalpy - chest.liquid);
  } else {
    surplus = (qc - Q) / (delivered - chest.liquid);
  }

  // U at the solved state (a given number, or the estimate at T_b, x_L and the chest's T_sat(p₂)).
  const { u, estimate } = coefficientAt(side, {
    massFraction: c.xL,
    boilingTemperature: c.Tmean,
    bodyPressure: c.pMean,
    condensingTemperature: tc,
  });
  const area = Q / (u * dT);
  if (estimate) warnings.push(...estimate.warnings);
  const electric = shaft / m.etaDrive;
  const satSuction = saturationTemperature(suctionPressure);
  const lift = tc - satSuction;
  if (![Q, area, shaft, electric, makeUp, surplus, dischargeTemperature].every(Number.isFinite)) {
    throw new EngineNoSolutionError('The balances gave a non-finite result for these inputs', {
      reason: 'non-finite',
    });
  }

  // Warnings.
  warnSmallTemperatureDifference(dT, warnings);
  warnLargeTemperatureDifference(dT, warnings);
  liquorSideWarnings(side, c, warnings);
  if (m.stages !== undefined && needed > m.stages) {
    addWarning(warnings, {
      code: 'stage-pressure-ratio-above-limit',
      field: 'compressor.stages',
      message: `The pressure ratio per stage is ${rStage.toFixed(3)}, above the ${m.rMax} one stage gives: this lift needs ${needed} stages, not ${m.stages}`,
      validRange: { min: 1, max: m.rMax, unit: '1' },
    });
  }
  if (m.eta < USUAL_ISENTROPIC_EFFICIENCY.min || m.eta > USUAL_ISENTROPIC_EFFICIENCY.max) {
    addWarning(warnings, {
      code: 'unusual-isentropic-efficiency',
      field: 'compressor.isentropicEfficiency',
      message: `An isentropic efficiency of ${m.eta} lies outside the ${USUAL_ISENTROPIC_EFFICIENCY.min}–${USUAL_ISENTROPIC_EFFICIENCY.max} usual for vapour fans and compressors: check it with the machine's supplier`,
      validRange: { ...USUAL_ISENTROPIC_EFFICIENCY, unit: '1' },
    });
  }
  const bpr = c.T - side.waterBoilingPoint;
  if (bpr > UNECONOMIC_BPR_SHARE_OF_LIFT * lift) {
    addWarning(warnings, {
      code: 'boiling-point-rise-large-for-recompression',
      field: 'boilingPointRise',
      message: `The boiling-point rise ${bpr.toFixed(2)} K is more than ${UNECONOMIC_BPR_SHARE_OF_LIFT * 100} % of the compressor's saturation-temperature lift ${lift.toFixed(2)} K: most of the compression only overcomes the BPR, and vapour recompression is likely uneconomic for this liquor`,
      ...templated(
        `The boiling-point rise {bpr} is more than ${UNECONOMIC_BPR_SHARE_OF_LIFT * 100} % of the compressor's saturation-temperature lift {lift}: most of the compression only overcomes the BPR, and vapour recompression is likely uneconomic for this liquor`,
        'temperatureDifference',
        { bpr, lift },
      ),
      validRange: { min: 0, max: UNECONOMIC_BPR_SHARE_OF_LIFT * lift, unit: 'K' },
    });
  }

  const cautions = standardCautions({
    liquor: side.liquor,
    steamPressures: makeUp > 0 ? [p2, makeUpPressure] : [p2],
    bodyPressures: [side.pressure],
  });
  cautions.push(
    {
      code: 'rotating-machinery',
      message:
        'A vapour compressor or fan is rotating machinery: overspeed, surge, vibration and unguarded shafts can injure. Its selection, protection (overspeed trip, anti-surge control, guards) and operation must follow the machine supplier, local codes and a licensed engineer.',
    },
    {
      code: 'hot-compressor-discharge',
      message:
        'The vapour leaves the compressor superheated (see compressor.dischargeTemperature) before desuperheating: discharge piping and casings are hot enough to burn, and a failed desuperheating-water supply raises the temperature further.',
    },
  );

  const result: MechanicalVaporRecompressionResult = {
    mode: input.body.area !== undefined ? 'rating' : 'design',
    feed: { massFlow: F, massFraction: side.feedFraction, temperature: side.feedTemperature, enthalpy: c.hF },
    product: { massFlow: c.L, massFraction: c.xL, temperature: c.T, enthalpy: c.hL },
    vapor: {
      massFlow: c.V,
      pressure: side.pressure,
      temperature: c.T,
      enthalpy: c.HV,
      superheat: c.superheat,
    },
    body: {
      pressure: side.pressure,
      overallHeatTransferCoefficient: u,
      liquidHeight: side.liquidHeight,
      meanBoilingPressure: c.pMean,
      meanBoilingTemperature: c.Tmean,
    },
    boilingPointRise: bpr,
    waterBoilingPoint: side.waterBoilingPoint,
    compressor: {
      suctionPressure,
      suctionTemperature: suction.temperature,
      suctionEnthalpy: h1,
      dischargePressure: p2,
      pressureRatio: ratio,
      stagePressureRatio: rStage,
      saturationTemperatureLift: lift,
      dischargeTemperature,
      stages: n,
      stagesNeeded: needed,
      isentropicEfficiency: m.eta,
      driveEfficiency: m.etaDrive,
      shaftPower: shaft,
      electricPower: electric,
      desuperheatingWater: water,
      deliveredMassFlow: mFlow,
      stageDetails,
    },
    condensingTemperature: tc,
    latentHeat,
    compressedVaporHeat: qc,
    duty: Q,
    heatLoss: f * Q,
    heatLossFraction: f,
    temperatureDifference: dT,
    area,
    specificEnergy: electric / c.V,
    makeUpSteam: { massFlow: makeUp, pressure: makeUpPressure, enthalpy: makeUpEnthalpy },
    surplusVapor: { massFlow: surplus, enthalpy: delivered },
    condensate: { massFlow: mFlow - surplus + makeUp, enthalpy: chest.liquid },
    balances: { mass: 0, solute: 0, energy: 0 },
    ...(estimate ? { heatTransfer: estimate } : {}),
    warnings,
    cautions,
    sources: collectSources(side.liquor),
  };
  if (input.body.area !== undefined) result.specifiedArea = input.body.area;
  result.balances = mechanicalVaporRecompressionBalances(result);
  return result;
}

/**
 * Rating: the chest's condensing temperature T_c at which the given area passes Q,
 * T_c = T_b + Q/(U·A). With a given U that is explicit. With an estimated U (which depends on T_c
 * through the condensing film and the heat flux) it is the root of g(T_c) = T_c − T_b − Q/(U(T_c)·A),
 * found by Brent on (T_b + 0.001 K, T_max]: g < 0 at the lower end (the driving ΔT of the area
 * cannot be below 0.001 K) and, where g(T_max) < 0, no temperature within the steam tables will do,
 * which the caller reports as an area too small (T_c returned above T_max).
 */
function condensingTemperatureForArea(
  side: LiquorSide,
  c: LiquorBalance,
  Q: number,
  A: number,
  tcMax: number,
): number {
  if (!side.uProvider) return c.Tmean + Q / (side.u * A);
  const state = (tc: number) => ({
    massFraction: c.xL,
    boilingTemperature: c.Tmean,
    bodyPressure: c.pMean,
    condensingTemperature: tc,
  });
  const g = (tc: number): number => tc - c.Tmean - Q / (coefficientAt(side, state(tc)).u * A);
  const lo = c.Tmean + MIN_RATING_TEMPERATURE_DIFFERENCE;
  if (!(lo < tcMax)) return Number.POSITIVE_INFINITY;
  const gHi = g(tcMax);
  if (gHi < 0) return tcMax + -gHi;
  const gLo = g(lo);
  if (gLo > 0) {
    throw new EngineNoSolutionError(
      `The area ${A} m² is so large that the estimated U would need a temperature difference below ${MIN_RATING_TEMPERATURE_DIFFERENCE} K`,
      {
        reason: 'area-too-large',
        template: 'The area is so large that the estimated U would need a temperature difference below {dt}',
        values: { dt: { value: MIN_RATING_TEMPERATURE_DIFFERENCE, kind: 'temperatureDifference' } },
      },
    );
  }
  return brentSolve(g, lo, tcMax, { tol: 1e-10 }).root;
}

/** Smallest ΔT a rating with an estimated U searches down to, K. */
const MIN_RATING_TEMPERATURE_DIFFERENCE = 1e-3;

/**
 * Design: `body.temperatureDifference` or `compressor.dischargePressure` given (see
 * {@link mechanicalVaporRecompression}).
 */
export function designMechanicalVaporRecompression(
  input: MechanicalVaporRecompressionInput,
): MechanicalVaporRecompressionResult {
  if (input.body?.area !== undefined) {
    throw new EngineInputError('body.area', 'design finds the area: omit body.area (or rate the evaporator)');
  }
  return mechanicalVaporRecompression(input);
}

/** Rating: `body.area` given, ΔT = Q/(U·A) found (see {@link mechanicalVaporRecompression}). */
export function rateMechanicalVaporRecompression(
  input: MechanicalVaporRecompressionInput & { body: MvrBodySpec & { area: number } },
): MechanicalVaporRecompressionResult {
  if (input.body?.area === undefined) {
    throw new EngineInputError('body.area', 'rating needs body.area');
  }
  return mechanicalVaporRecompression(input);
}

/**
 * Relative residuals recomputed from a result's streams (see {@link balanceResidual}). The
 * boundary holds the body, the compressor with its desuperheaters and the chest:
 *   mass     F + Σm_w + S = L + condensate + surplus
 *   solute   F·x_F = L·x_L
 *   energy   F·h_F + W_shaft + Σ m_w·h_f,i + S·h_S = L·h_L + condensate·h_f(p₂) + surplus·h + f·Q
 */
export function mechanicalVaporRecompressionBalances(r: MechanicalVaporRecompressionResult): {
  mass: number;
  solute: number;
  energy: number;
} {
  const injected = r.compressor.stageDetails.map((s) => s.desuperheatingWater);
  const injectedHeat = r.compressor.stageDetails.map(
    (s) => s.desuperheatingWater * s.desuperheatingWaterEnthalpy,
  );
  return {
    mass: balanceResidual(
      [r.feed.massFlow, ...injected, r.makeUpSteam.massFlow],
      [r.product.massFlow, r.condensate.massFlow, r.surplusVapor.massFlow],
    ),
    solute: balanceResidual(
      [r.feed.massFlow * r.feed.massFraction],
      [r.product.massFlow * r.product.massFraction],
    ),
    energy: balanceResidual(
      [
        r.feed.massFlow * r.feed.enthalpy,
        r.compressor.shaftPower,
        ...injectedHeat,
        r.makeUpSteam.massFlow * r.makeUpSteam.enthalpy,
      ],
      [
        r.product.massFlow * r.product.enthalpy,
        r.condensate.massFlow * r.condensate.enthalpy,
        r.surplusVapor.massFlow * r.surplusVapor.enthalpy,
        r.heatLoss,
      ],
    ),
  };
}

/**
 * The desalination figures of merit of an MVR result: distillate M_d = the vapour evaporated,
 * heating steam = the make-up steam (heat released down to the chest condensate), electric power =
 * the compressor drive's. Without make-up steam GOR and PR are null and a warning says why.
 *
 * @param result an MVR result (SI)
 * @param warnings sink for the no-heating-steam warning
 * @returns the figures of merit, SI (J/m³ for the energies)
 */
export function mechanicalVaporRecompressionFiguresOfMerit(
  result: MechanicalVaporRecompressionResult,
  warnings?: WarningSink,
): FiguresOfMerit {
  return figuresOfMerit(
    {
      distillateFlow: result.vapor.massFlow,
      heatingSteamFlow: result.makeUpSteam.massFlow,
      heatPerKgSteam: result.makeUpSteam.enthalpy - result.condensate.enthalpy,
      electricPower: result.compressor.electricPower,
      totalArea: result.area,
    },
    warnings,
  );
}
