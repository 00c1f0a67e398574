/**
 * Studies: the evaporator-scheme study. One duty (liquor, feed, product, lowest pressure, live
 * steam, one U), candidate schemes calculated by the same engine functions as the single calls,
 * costed and ranked by the pure study (server/engine/studies/evaporator-schemes.ts).
 *
 * Which schemes this build can calculate is said once, in {@link schemeWiring}: a multiple-effect
 * train through `designMultipleEffect`, MVR through `designMechanicalVaporRecompression`, TVR through `designMultipleEffect` with a
 * thermocompressor; a scheme
 * whose slot is empty is listed as "not available in this build" (and costs nothing).
 */
import {
  EvaporatorSchemeStudyRequestSchema,
  EvaporatorSchemeStudyResponseSchema,
  type EvaporatorSchemeStudyRequest,
  type EvaporatorSchemeStudyResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { designMechanicalVaporRecompression } from '../../../engine/evaporators/mechanical-vapor-recompression.js';
import { designMultipleEffect } from '../../../engine/evaporators/multiple-effect.js';
import type { LiquorModel } from '../../../engine/liquors/model.js';
import {
  runSchemeStudy,
  type CandidateFigures,
  type SchemeCandidate,
  type SchemeEvaluators,
} from '../../../engine/studies/evaporator-schemes.js';
import type { EngineCaution, EngineWarning } from '../../../engine/types.js';
import type { SI } from '../../quantities.js';
import { calculate, toProblem, warningsOut, type FieldMap } from '../../engine-errors.js';
import { display, provenance, r } from '../../output.js';
import { problem } from '../../problem.js';
import { declareOperation } from '../operation.js';
import { MULTIPLE_EFFECT_FIELDS, multipleEffect } from './evaporators.js';
import { IF97_MODEL } from './steam.js';
import { bodyLiquor } from './common.js';

type StudyBody = SI<EvaporatorSchemeStudyRequest>;

/** Engine fields of the train calculation → the study's request fields. */
const STUDY_FIELDS: FieldMap = {
  ...MULTIPLE_EFFECT_FIELDS,
  lastEffectPressure: 'lowestPressure',
  overallHeatTransferCoefficients: 'overallHeatTransferCoefficient',
  productMassFraction: 'product.massFraction',
  maxEffects: 'maxEffects',
};

/** What the study's duty gives every candidate, SI. */
interface Duty {
  liquor: LiquorModel;
  feed: { massFlow: number; massFraction: number; temperature: number };
  productMassFraction: number;
  steamPressure: number;
  lowestPressure: number;
  overallHeatTransferCoefficient: number;
  feedArrangement: 'forward' | 'backward' | 'parallel';
  body: StudyBody;
}

/** Cautions and warnings the candidates' own calculations give, gathered for the response. */
interface Gathered {
  cautions: EngineCaution[];
}

/**
 * One kind of scheme as this build wires it: the evaluator (absent: no engine function in this
 * build) and the units of one candidate (those of the single call it stands for).
 */
interface SchemeWiring<A extends unknown[]> {
  evaluator: ((duty: Duty, gathered: Gathered) => (...args: A) => CandidateFigures) | undefined;
  units: (...args: A) => number;
}

function gather(gathered: Gathered, cautions: readonly EngineCaution[]): void {
  for (const c of cautions) {
    if (!gathered.cautions.some((g) => g.code === c.code)) gathered.cautions.push(c);
  }
}

/** A multiple-effect call's units for n effects: base + per effect (the catalogue's own figures). */
function trainUnits(effects: number): number {
  return operationCatalogue.multipleEffect.units + operationCatalogue.multipleEffect.unitsPerEffect * effects;
}

/**
 * The train of n equal-area effects the single `POST /v1/evaporators/multiple-effect` call would
 * design; with `thermocompressor`, the same call with a steam-jet thermocompressor whose discharge
 * is the live-steam pressure and whose suction is the last effect's vapour (the TVR candidate).
 */
function trainFigures(duty: Duty, gathered: Gathered, effects: number, tvr: boolean): CandidateFigures {
  const result = designMultipleEffect({
    liquor: duty.liquor,
    feed: duty.feed,
    productMassFraction: duty.productMassFraction,
    steam: { pressure: duty.steamPressure },
    lastEffectPressure: duty.lowestPressure,
    overallHeatTransferCoefficients: Array.from(
      { length: effects },
      () => duty.overallHeatTransferCoefficient,
    ),
    feedArrangement: duty.feedArrangement,
    ...(tvr ? { thermocompressor: { motivePressure: duty.body.tvr!.motivePressure } } : {}),
  });
  gather(gathered, result.cautions);
  return {
    // The purchased steam: the live steam, or the thermocompressor's motive steam.
    steamMassFlow: result.thermocompressor?.motiveSteamFlow ?? result.steam.massFlow,
    // Pumps and the vacuum system are not costed (the same for every scheme to first order).
    electricPower: 0,
    shaftPower: 0,
    totalArea: result.totalArea,
    bodies: effects,
    compressors: 0,
    evaporation: result.evaporation,
    warnings: result.warnings,
  };
}

function trainEvaluator(duty: Duty, gathered: Gathered) {
  return (effects: number): CandidateFigures => trainFigures(duty, gathered, effects, false);
}

function tvrEvaluator(duty: Duty, gathered: Gathered) {
  return (effects: number): CandidateFigures => trainFigures(duty, gathered, effects, true);
}

/**
 * The MVR candidate the single `POST /v1/evaporators/mechanical-vapor-recompression` call would
 * design: one body at the lowest pressure, the study's ΔT and efficiencies, as many stages as the
 * default pressure ratio per stage needs, and any make-up steam drawn from the live steam.
 */
function mvrEvaluator(duty: Duty, gathered: Gathered) {
  return (): CandidateFigures => {
    const mvr = duty.body.mvr!;
    const result = designMechanicalVaporRecompression({
      liquor: duty.liquor,
      feed: duty.feed,
      product: { massFraction: duty.productMassFraction },
      body: {
        pressure: duty.lowestPressure,
        overallHeatTransferCoefficient: duty.overallHeatTransferCoefficient,
        temperatureDifference: mvr.temperatureDifference,
      },
      compressor: { isentropicEfficiency: mvr.isentropicEfficiency, driveEfficiency: mvr.driveEfficiency },
      makeUpSteam: { pressure: duty.steamPressure },
    });
    gather(gathered, result.cautions);
    return {
      steamMassFlow: result.makeUpSteam.massFlow,
      electricPower: result.compressor.electricPower,
      shaftPower: result.compressor.shaftPower,
      totalArea: result.area,
      bodies: 1,
      // Each stage is costed as a compressor sharing the shaft power.
      compressors: result.compressor.stages,
      evaporation: result.vapor.massFlow,
      warnings: result.warnings,
    };
  };
}

/** The schemes of this build: each kind's evaluator and the units of the single call it stands for. */
const schemeWiring: {
  train: SchemeWiring<[number]> & { evaluator: NonNullable<SchemeWiring<[number]>['evaluator']> };
  mvr: SchemeWiring<[]>;
  tvr: SchemeWiring<[number]>;
} = {
  train: { evaluator: trainEvaluator, units: trainUnits },
  mvr: { evaluator: mvrEvaluator, units: () => operationCatalogue.mechanicalVaporRecompression.units },
  tvr: { evaluator: tvrEvaluator, units: trainUnits },
};

/** The units of the candidates a raw body asks for (undefined when it cannot be read yet). */
function candidateUnits(body: unknown): number[] | undefined {
  const b = body as { maxEffects?: unknown; mvr?: unknown; tvr?: unknown } | undefined;
  const n = b?.maxEffects;
  if (!Number.isInteger(n) || (n as number) < 1 || (n as number) > 10) return undefined;
  const effects = Array.from({ length: n as number }, (_, i) => i + 1);
  const wanted = (part: unknown) => part !== undefined && part !== null;
  const priced = (w: SchemeWiring<never>, units: number) => (w.evaluator ? units : 0);
  return [
    ...effects.map((e) => schemeWiring.train.units(e)),
    ...(wanted(b?.mvr) ? [priced(schemeWiring.mvr as SchemeWiring<never>, schemeWiring.mvr.units())] : []),
    ...(wanted(b?.tvr)
      ? effects.map((e) => priced(schemeWiring.tvr as SchemeWiring<never>, schemeWiring.tvr.units(e)))
      : []),
  ];
}

/**
 * Units of a study read from the raw body before any work: the sum of the single calls its
 * candidates stand for (train of n effects: 5 + 5·n; MVR: an MVR call; TVR on n effects: 5 + 5·n;
 * a scheme this build cannot calculate: 0). 429 if the quota cannot cover it.
 */
export function studyUnits(body: unknown): number | undefined {
  return candidateUnits(body)?.reduce((sum, u) => sum + u, 0);
}

const ECONOMIC_CAUTIONS: EngineCaution[] = [
  {
    code: 'economic-screening',
    message:
      'This is an economic screening estimate from power-law scaled reference costs, not a quotation: pumps, vacuum system, cooling water, installation and taxes are not counted. Get vendor quotations and have the chosen scheme designed and checked by licensed engineers under local codes.',
  },
];

const ROTATING_MACHINERY: EngineCaution = {
  code: 'rotating-machinery',
  message:
    'A vapour compressor is rotating machinery: guarding, overspeed and surge protection, and vibration monitoring fall under local codes and the manufacturer.',
};

function candidateOut(
  c: SchemeCandidate,
  liquorWarnings: readonly EngineWarning[],
): EvaporatorSchemeStudyResponse['candidates'][number] {
  const f = c.figures;
  const k = c.costs;
  const reason = c.unavailable
    ? 'not available in this build'
    : c.error
      ? (toProblem(c.error, STUDY_FIELDS).detail ?? c.error.message)
      : undefined;
  return {
    scheme: c.scheme,
    effects: c.effects,
    feasible: c.feasible,
    ...(reason !== undefined ? { reason } : {}),
    steamMassFlow: f ? display(f.steamMassFlow, 'massFlow') : null,
    electricPower: f ? display(f.electricPower, 'power') : null,
    shaftPower: f ? display(f.shaftPower, 'power') : null,
    totalArea: f ? display(f.totalArea, 'area') : null,
    annualEnergyCost: k ? r(k.annualEnergyCost) : null,
    installedCost: k ? r(k.installedCost) : null,
    capitalRecoveryFactor: k ? r(k.capitalRecoveryFactor) : null,
    capitalCharge: k ? r(k.capitalCharge) : null,
    totalAnnualCost: k ? r(k.totalAnnualCost) : null,
    steamEconomy: c.steamEconomy !== undefined ? r(c.steamEconomy) : null,
    warnings: f ? warningsOut([...liquorWarnings, ...f.warnings], STUDY_FIELDS) : [],
  };
}

export const evaporatorSchemeStudy = declareOperation({
  operation: operationCatalogue.evaporatorSchemeStudy,
  method: 'post',
  path: '/v1/studies/evaporator-schemes',
  openApiName: 'postEvaporatorSchemeStudy',
  tag: 'Studies',
  summary: 'Rank evaporator schemes for one duty by total annual cost, with ±30 % price sensitivity',
  description:
    `Trains of 1…maxEffects equal-area effects (each the design \`POST ${multipleEffect.path}\` would give for one U in every body), and` +
    ' mechanical or thermal vapour recompression when asked and available in this build, are costed: annual energy cost = (steam t/h × steamPrice + electric kW × electricityPrice) × operatingHoursPerYear; installed cost = Σ bodies reference·(area/referenceArea)^exponent + compressors reference·(shaft power/referenceShaftPower)^exponent; capital charge = CRF × installed cost with CRF = i(1+i)^y/((1+i)^y − 1) (1/y at i = 0); total annual cost = energy + capital charge. ' +
    'A candidate that cannot be calculated is listed as infeasible with the reason; if none can, the study is refused (422) as the single-effect call would be. ' +
    'Sensitivity: steamPrice, electricityPrice, bodyCost.reference and compressorCost.reference each at −30 % and +30 %, and which candidate is then cheapest. ' +
    'Cost in units: the sum of the single calculations its candidates stand for — a train of n effects as a multiple-effect call (5 + 5·n), an MVR candidate as an MVR call, a TVR candidate on n effects as a multiple-effect call; a scheme this build cannot calculate costs nothing. The whole sum is reserved from the raw body before any work (429 when the quota cannot cover it), and the units of infeasible candidates are given back, so `unitsCharged` is what the feasible candidates would have cost as single calls. ' +
    'Money is in the account currency the prices are given in; results are an economic screening estimate, not a quotation.',
  request: {
    body: EvaporatorSchemeStudyRequestSchema,
    example: {
      summary: 'Caustic concentrator for the invented Pellworth chlor-alkali works',
      value: {
        liquor: 'sodium-hydroxide',
        feed: { massFlow: '12 t/h', massFraction: 0.1, temperature: 60 },
        product: { massFraction: 0.3 },
        lowestPressure: 15,
        steam: { pressure: '9 barg' },
        overallHeatTransferCoefficient: 2000,
        feedArrangement: 'backward',
        maxEffects: 4,
        prices: {
          steamPrice: 30,
          electricityPrice: 0.12,
          operatingHoursPerYear: 8000,
          bodyCost: { reference: 250_000, referenceArea: 100, exponent: 0.6 },
          compressorCost: { reference: 900_000, referenceShaftPower: 500, exponent: 0.7 },
          interestRate: 0.08,
          lifeYears: 15,
        },
      },
    },
  },
  response: {
    description: 'The candidates, the cheapest and the sensitivity',
    schema: EvaporatorSchemeStudyResponseSchema,
  },
  extraUnits: studyUnits,
  loadAfterBody: true,
  load: bodyLiquor,
  run: ({ body: b, loaded: liquor }, ctx): EvaporatorSchemeStudyResponse => {
    if (b.tvr && b.tvr.motivePressure <= b.steam.pressure) {
      const said = (v: number) => String(display(v, 'pressure'));
      throw problem(
        'validation-failed',
        `tvr.motivePressure must be above steam.pressure (the thermocompressor's discharge): ${said(b.tvr.motivePressure)} kPa ≤ ${said(b.steam.pressure)} kPa`,
        {
          errors: [
            {
              field: 'tvr.motivePressure',
              message: `must be above steam.pressure (${said(b.steam.pressure)} kPa)`,
            },
          ],
        },
      );
    }
    const F = b.feed.massFlow;
    const xF = b.feed.massFraction;
    const productMassFraction =
      b.product.massFlow !== undefined ? (F * xF) / b.product.massFlow : b.product.massFraction!; // solute balance F·x_F = L·x_L
    const duty: Duty = {
      liquor: liquor.model,
      feed: { massFlow: F, massFraction: xF, temperature: b.feed.temperature },
      productMassFraction,
      steamPressure: b.steam.pressure,
      lowestPressure: b.lowestPressure,
      overallHeatTransferCoefficient: b.overallHeatTransferCoefficient,
      feedArrangement: b.feedArrangement,
      body: b,
    };
    const gathered: Gathered = { cautions: [] };
    const evaluators: SchemeEvaluators = {
      train: schemeWiring.train.evaluator(duty, gathered),
      ...(schemeWiring.mvr.evaluator ? { mvr: schemeWiring.mvr.evaluator(duty, gathered) } : {}),
      ...(schemeWiring.tvr.evaluator ? { tvr: schemeWiring.tvr.evaluator(duty, gathered) } : {}),
    };
    const p = b.prices;
    const study = calculate(STUDY_FIELDS, () =>
      runSchemeStudy(
        { maxEffects: b.maxEffects, mvr: b.mvr !== undefined, tvr: b.tvr !== undefined },
        {
          steamPrice: p.steamPrice,
          electricityPrice: p.electricityPrice,
          operatingHoursPerYear: p.operatingHoursPerYear,
          bodyCost: {
            reference: p.bodyCost.reference,
            referenceSize: p.bodyCost.referenceArea,
            exponent: p.bodyCost.exponent,
          },
          compressorCost: {
            reference: p.compressorCost.reference,
            referenceSize: p.compressorCost.referenceShaftPower,
            exponent: p.compressorCost.exponent,
          },
          interestRate: p.interestRate,
          lifeYears: p.lifeYears,
        },
        evaluators,
      ),
    );
    // The engine refuses a study with no feasible candidate, so a cheapest always exists here.
    const cheapest = study.cheapest!;
    // Units: reserved for every candidate from the raw body; give back those of the infeasible.
    const units = candidateUnits(b) ?? [];
    const refund = study.candidates.reduce((sum, c, i) => sum + (c.feasible ? 0 : (units[i] ?? 0)), 0);
    if (refund > 0) ctx.releaseUnits?.(refund);
    const charged = units.reduce((sum, u) => sum + u, 0) - refund;
    const cautions = [
      ...ECONOMIC_CAUTIONS,
      // The MVR candidate's own rotating-machinery caution, or this one when it was infeasible.
      ...(b.mvr && !gathered.cautions.some((c) => c.code === ROTATING_MACHINERY.code)
        ? [ROTATING_MACHINERY]
        : []),
      ...gathered.cautions,
    ];
    return {
      candidates: study.candidates.map((c) => candidateOut(c, liquor.definitionWarnings)),
      cheapest,
      sensitivity: study.sensitivity.map((s) => ({
        price: s.price,
        change: s.change,
        cheapest: s.cheapest!,
        totalAnnualCost: r(s.totalAnnualCost!),
        changed: s.cheapest !== cheapest,
      })),
      unitsCharged: charged,
      provenance: provenance(ctx.engineVersion, [
        IF97_MODEL,
        ...liquor.models,
        ...study.sources.map((s) => ({ id: s.key, source: s.reference })),
      ]),
      cautions,
    };
  },
});
