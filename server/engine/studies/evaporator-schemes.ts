/**
 * Scheme study: one evaporation duty, several ways to meet it (multiple-effect trains of 1…N
 * effects, mechanical vapour recompression, a thermocompressor on a train), each costed as a
 * total annual cost, ranked, and tested for how the ranking moves when a price moves ±30 %.
 * Pure: SI numbers in and out; the calculations of the candidates are injected (`evaluators`), so
 * this module knows no evaporator model and the caller decides which ones this build can run.
 *
 * Cost model (a screening estimate, common practice in process design):
 * - annual energy cost  E = (S·3.6·c_steam + P_el/1000·c_el)·h, S in kg/s (S·3.6 in t/h), P_el in W
 *   (P_el/1000 in kW), c_steam per tonne, c_el per kWh, h operating hours per year;
 * - installed cost      I = n_b·C_b·(A/n_b / A_ref)^m_b + n_c·C_c·(P/n_c / P_ref)^m_c, the usual
 *   power-law ("six-tenths") scaling of a reference cost, per body of area A/n_b (equal bodies:
 *   the trains are designed for equal areas) and per compressor of shaft power P/n_c;
 * - capital charge      K = CRF·I with the capital-recovery factor
 *   CRF(i, y) = i(1+i)^y / ((1+i)^y − 1), and its limit 1/y at i = 0 ({@link capitalRecoveryFactor});
 * - total annual cost   TAC = E + K.
 * The cheapest feasible candidate has the lowest TAC (a tie goes to the one listed first: fewer
 * bodies before more, trains before the recompression schemes).
 *
 * Not costed: pumps, vacuum system, cooling water, condensers, piping and installation factors
 * beyond what the reference costs hold, taxes and escalation.
 */
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type { Citation, EngineWarning } from '../types.js';

export type SchemeKind = 'multiple-effect' | 'mechanical-vapor-recompression' | 'thermal-vapor-recompression';

/** What one candidate's calculation yields, SI. */
export interface CandidateFigures {
  /** Purchased steam, kg/s: live steam (train), motive steam (TVR) or make-up steam (MVR). */
  steamMassFlow: number;
  /** Electric power drawn, W (compressor drive; 0 for a plain train). */
  electricPower: number;
  /** Compressor shaft power, W (0 if there is none). */
  shaftPower: number;
  /** Heat-transfer area of all bodies, m². */
  totalArea: number;
  /** Number of evaporator bodies (each costed at totalArea/bodies). */
  bodies: number;
  /** Number of mechanical compressors (or stages costed as compressors); 0 if none. */
  compressors: number;
  /** Water evaporated, kg/s. */
  evaporation: number;
  warnings: EngineWarning[];
}

/** Evaluates one kind of candidate; may throw an engine error (the candidate is then infeasible). */
export interface SchemeEvaluators {
  train: (effects: number) => CandidateFigures;
  /** Absent: this build has no MVR model; a requested MVR candidate is listed as unavailable. */
  mvr?: () => CandidateFigures;
  /** Absent: this build has no thermocompressor model; requested TVR candidates are listed as unavailable. */
  tvr?: (effects: number) => CandidateFigures;
}

/** The duty's shape as far as the study needs it: which candidates to list. */
export interface SchemeStudyDuty {
  /** Trains (and TVR trains) of 1…maxEffects effects, 1 to 10. */
  maxEffects: number;
  /** List an MVR candidate. */
  mvr: boolean;
  /** List TVR candidates (a thermocompressor on trains of 1…maxEffects effects). */
  tvr: boolean;
}

/** A reference cost scaled by a power law: cost = reference·(size/referenceSize)^exponent. */
export interface ScaledCost {
  /** Money, in the account's currency. */
  reference: number;
  /** m² for bodies, W for compressors (> 0). */
  referenceSize: number;
  /** 0 to 1.5. */
  exponent: number;
}

export interface SchemePrices {
  /** Money per tonne of steam. */
  steamPrice: number;
  /** Money per kWh. */
  electricityPrice: number;
  /** Hours per year, 0 to 8784. */
  operatingHoursPerYear: number;
  bodyCost: ScaledCost;
  compressorCost: ScaledCost;
  /** Interest rate per year, 0 to 1. */
  interestRate: number;
  /** Years, 1 to 100. */
  lifeYears: number;
}

/** The prices the sensitivity moves. */
export type PriceName = 'steamPrice' | 'electricityPrice' | 'bodyCost.reference' | 'compressorCost.reference';
export const SENSITIVITY_PRICES: readonly PriceName[] = [
  'steamPrice',
  'electricityPrice',
  'bodyCost.reference',
  'compressorCost.reference',
];
export const SENSITIVITY_CHANGES = [-0.3, 0.3] as const;

/** The costs of a feasible candidate at a set of prices. */
export interface CandidateCosts {
  /** Money per year. */
  annualEnergyCost: number;
  /** Money. */
  installedCost: number;
  capitalRecoveryFactor: number;
  /** Money per year. */
  capitalCharge: number;
  /** Money per year. */
  totalAnnualCost: number;
}

export interface SchemeCandidate {
  scheme: SchemeKind;
  /** Effects of the train (1 for MVR). */
  effects: number;
  feasible: boolean;
  /** Infeasible: the engine error of its calculation. */
  error?: EngineRangeError | EngineInputError | EngineNoSolutionError;
  /** Infeasible because this build cannot calculate the scheme. */
  unavailable?: boolean;
  figures?: CandidateFigures;
  costs?: CandidateCosts;
  /** evaporation / purchased steam (Infinity is never returned: undefined without steam). */
  steamEconomy?: number;
}

export interface SensitivityRow {
  price: PriceName;
  change: (typeof SENSITIVITY_CHANGES)[number];
  /** Index of the cheapest candidate at the changed price (undefined if none is feasible). */
  cheapest: number | undefined;
  /** Its total annual cost at the changed price, money per year. */
  totalAnnualCost: number | undefined;
}

export interface SchemeStudyResult {
  candidates: SchemeCandidate[];
  cheapest: number | undefined;
  sensitivity: SensitivityRow[];
  sources: Citation[];
}

// Editions and chapters are cited from memory; the two formulas are the standard ones these texts state.
const SOURCES: Citation[] = [
  {
    key: 'sullivan-engineering-economy',
    reference:
      'W.G. Sullivan, E.M. Wicks, C.P. Koelling, Engineering Economy, 16th ed., Pearson (2015), chapter 4: the capital-recovery factor (A/P, i%, N) = i(1+i)^N/((1+i)^N − 1)',
  },
  {
    key: 'peters-timmerhaus-west-2003',
    reference:
      'M.S. Peters, K.D. Timmerhaus, R.E. West, Plant Design and Economics for Chemical Engineers, 5th ed., McGraw-Hill (2003), chapter 6: scaling equipment cost with capacity by a power law (the "six-tenths" rule)',
  },
];

/**
 * Capital-recovery factor: the uniform annual payment per unit of present capital that repays it
 * with interest over its life.
 *
 * CRF(i, y) = i(1+i)^y / ((1+i)^y − 1) = i / (1 − (1+i)^−y), and 1/y at i = 0 (the limit).
 * Evaluated as i / −expm1(−y·log1p(i)) so that a small i loses no digits to cancellation.
 *
 * Validity: 0 ≤ i ≤ 1 per year, 1 ≤ y ≤ 100 years (the study's ranges).
 * Source: W.G. Sullivan, E.M. Wicks, C.P. Koelling, Engineering Economy, 16th ed., Pearson (2015),
 * chapter 4, (A/P, i%, N); any engineering-economics text states it.
 * @param interestRate i, per year (fraction)
 * @param lifeYears y, years
 * @returns CRF, per year
 * @example capitalRecoveryFactor(0.08, 10) // ≈ 0.149029
 * @example capitalRecoveryFactor(0, 20) // → 0.05
 */
export function capitalRecoveryFactor(interestRate: number, lifeYears: number): number {
  if (!Number.isFinite(interestRate) || interestRate < 0 || interestRate > 1) {
    throw new EngineRangeError('prices.interestRate', interestRate, { min: 0, max: 1, unit: '1/year' });
  }
  if (!Number.isFinite(lifeYears) || lifeYears < 1 || lifeYears > 100) {
    throw new EngineRangeError('prices.lifeYears', lifeYears, { min: 1, max: 100, unit: 'year' });
  }
  if (interestRate === 0) return 1 / lifeYears;
  return interestRate / -Math.expm1(-lifeYears * Math.log1p(interestRate));
}

/** reference·(size/referenceSize)^exponent per unit, for `count` equal units sharing `total`. */
function scaledCost(cost: ScaledCost, total: number, count: number): number {
  if (count <= 0 || total <= 0) return 0;
  return count * cost.reference * Math.pow(total / count / cost.referenceSize, cost.exponent);
}

/**
 * The costs of one candidate's figures at a set of prices (see the module comment). For instance
 * 1 kg/s of steam (3.6 t/h) at 20 per tonne for 8000 h is 576 000 a year; one body of 100 m² at a
 * reference of 100 000 for 100 m², recovered over 10 years at i = 0, adds 10 000 a year.
 */
export function candidateCosts(figures: CandidateFigures, prices: SchemePrices): CandidateCosts {
  const steamTonnesPerHour = figures.steamMassFlow * 3.6;
  const electricKilowatts = figures.electricPower / 1000;
  const annualEnergyCost =
    (steamTonnesPerHour * prices.steamPrice + electricKilowatts * prices.electricityPrice) *
    prices.operatingHoursPerYear;
  const installedCost =
    scaledCost(prices.bodyCost, figures.totalArea, figures.bodies) +
    scaledCost(prices.compressorCost, figures.shaftPower, figures.compressors);
  const crf = capitalRecoveryFactor(prices.interestRate, prices.lifeYears);
  const capitalCharge = crf * installedCost;
  if (!Number.isFinite(annualEnergyCost + capitalCharge)) {
    // Only absurd scalings get here (a reference size of 1e-300 m² raised to 1.5): say so, never send ∞.
    throw new EngineNoSolutionError(
      'the costs exceed the largest number that can be stated: check the reference sizes and costs',
      { reason: 'cost-overflow' },
    );
  }
  return {
    annualEnergyCost,
    installedCost,
    capitalRecoveryFactor: crf,
    capitalCharge,
    totalAnnualCost: annualEnergyCost + capitalCharge,
  };
}

function isEngineError(err: unknown): err is EngineRangeError | EngineInputError | EngineNoSolutionError {
  return (
    err instanceof EngineRangeError || err instanceof EngineInputError || err instanceof EngineNoSolutionError
  );
}

function requireFigures(f: CandidateFigures): CandidateFigures {
  const fields: (keyof Omit<CandidateFigures, 'warnings'>)[] = [
    'steamMassFlow',
    'electricPower',
    'shaftPower',
    'totalArea',
    'bodies',
    'compressors',
    'evaporation',
  ];
  for (const k of fields) {
    const v = f[k];
    // An evaluator is our own code; a non-finite or negative figure is a defect, never a price.
    if (!Number.isFinite(v) || v < 0) {
      throw new EngineNoSolutionError(`the candidate's ${k} is not a finite non-negative number`, {
        reason: 'invalid-candidate-figures',
      });
    }
  }
  return f;
}

function evaluate(
  scheme: SchemeKind,
  effects: number,
  run: (() => CandidateFigures) | undefined,
): SchemeCandidate {
  if (!run) return { scheme, effects, feasible: false, unavailable: true };
  try {
    const figures = requireFigures(run());
    return {
      scheme,
      effects,
      feasible: true,
      figures,
      ...(figures.steamMassFlow > 0 ? { steamEconomy: figures.evaporation / figures.steamMassFlow } : {}),
    };
  } catch (err) {
    if (isEngineError(err)) return { scheme, effects, feasible: false, error: err };
    throw err;
  }
}

/** Index of the lowest total annual cost among `costs` (undefined entries are infeasible). */
function cheapestOf(totals: readonly (number | undefined)[]): number | undefined {
  let best: number | undefined;
  totals.forEach((t, i) => {
    if (t !== undefined && (best === undefined || t < totals[best]!)) best = i;
  });
  return best;
}

function withPrice(prices: SchemePrices, name: PriceName, factor: number): SchemePrices {
  switch (name) {
    case 'steamPrice':
      return { ...prices, steamPrice: prices.steamPrice * factor };
    case 'electricityPrice':
      return { ...prices, electricityPrice: prices.electricityPrice * factor };
    case 'bodyCost.reference':
      return { ...prices, bodyCost: { ...prices.bodyCost, reference: prices.bodyCost.reference * factor } };
    case 'compressorCost.reference':
      return {
        ...prices,
        compressorCost: { ...prices.compressorCost, reference: prices.compressorCost.reference * factor },
      };
  }
}

function validatePrices(p: SchemePrices): void {
  const check = (field: string, v: number, min: number, max: number, unit: string, exclusiveMin = false) => {
    if (!Number.isFinite(v) || v < min || (exclusiveMin && v === min) || v > max) {
      throw new EngineRangeError(field, v, { min, max, unit });
    }
  };
  check('prices.steamPrice', p.steamPrice, 0, Number.MAX_VALUE, 'money/t');
  check('prices.electricityPrice', p.electricityPrice, 0, Number.MAX_VALUE, 'money/kWh');
  check('prices.operatingHoursPerYear', p.operatingHoursPerYear, 0, 8784, 'h/year');
  check('prices.bodyCost.reference', p.bodyCost.reference, 0, Number.MAX_VALUE, 'money');
  check('prices.bodyCost.referenceArea', p.bodyCost.referenceSize, 0, Number.MAX_VALUE, 'm²', true);
  check('prices.bodyCost.exponent', p.bodyCost.exponent, 0, 1.5, '1');
  check('prices.compressorCost.reference', p.compressorCost.reference, 0, Number.MAX_VALUE, 'money');
  check(
    'prices.compressorCost.referenceShaftPower',
    p.compressorCost.referenceSize,
    0,
    Number.MAX_VALUE,
    'W',
    true,
  );
  check('prices.compressorCost.exponent', p.compressorCost.exponent, 0, 1.5, '1');
  capitalRecoveryFactor(p.interestRate, p.lifeYears);
}

/**
 * Runs the study: lists the candidates (trains of 1…maxEffects effects, then MVR, then TVR on
 * trains of 1…maxEffects effects, the last two when the duty asks for them), evaluates each (an
 * engine error makes it infeasible with that error; an absent evaluator makes it unavailable),
 * costs the feasible ones, picks the cheapest, and repeats the pick with each price of
 * {@link SENSITIVITY_PRICES} at −30 % and +30 %.
 * Refuses (rethrows the single-effect train's error) when no candidate is feasible: the duty
 * itself is then what fails, not a scheme.
 */
export function runSchemeStudy(
  duty: SchemeStudyDuty,
  prices: SchemePrices,
  evaluators: SchemeEvaluators,
): SchemeStudyResult {
  if (!Number.isInteger(duty.maxEffects) || duty.maxEffects < 1 || duty.maxEffects > 10) {
    throw new EngineRangeError('maxEffects', duty.maxEffects, { min: 1, max: 10, unit: 'effects' });
  }
  validatePrices(prices);
  const candidates: SchemeCandidate[] = [];
  const { train, mvr, tvr } = evaluators;
  for (let n = 1; n <= duty.maxEffects; n++) {
    candidates.push(evaluate('multiple-effect', n, () => train(n)));
  }
  if (duty.mvr) candidates.push(evaluate('mechanical-vapor-recompression', 1, mvr));
  if (duty.tvr) {
    for (let n = 1; n <= duty.maxEffects; n++) {
      candidates.push(evaluate('thermal-vapor-recompression', n, tvr ? () => tvr(n) : undefined));
    }
  }
  if (!candidates.some((c) => c.feasible)) {
    throw candidates[0]!.error ?? new EngineNoSolutionError('no candidate could be calculated');
  }
  const totalsAt = (p: SchemePrices) =>
    candidates.map((c) => (c.figures ? candidateCosts(c.figures, p).totalAnnualCost : undefined));
  for (const c of candidates) if (c.figures) c.costs = candidateCosts(c.figures, prices);
  const cheapest = cheapestOf(candidates.map((c) => c.costs?.totalAnnualCost));
  const sensitivity: SensitivityRow[] = [];
  for (const price of SENSITIVITY_PRICES) {
    for (const change of SENSITIVITY_CHANGES) {
      const totals = totalsAt(withPrice(prices, price, 1 + change));
      const best = cheapestOf(totals);
      sensitivity.push({
        price,
        change,
        cheapest: best,
        totalAnnualCost: best === undefined ? undefined : totals[best],
      });
    }
  }
  return { candidates, cheapest, sensitivity, sources: SOURCES };
}
