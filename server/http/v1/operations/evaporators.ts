/**
 * Evaporators: a single effect (design, or rating when body.area is given) and a multiple-effect
 * train (equal-area design, or rating with given areas). The contracts convert every quantity to
 * SI before `run`; engine fields are named like the request's (feed.massFraction,
 * steam.pressure, body.area, effects[2]…), so the field maps are mostly the identity.
 */
import {
  MultipleEffectRequestSchema,
  MultipleEffectResponseSchema,
  SingleEffectRequestSchema,
  SingleEffectResponseSchema,
  type MultipleEffectResponse,
  type SingleEffectResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import type { SteamSupplySpec } from '../../../engine/evaporators/common.js';
import type { FiguresOfMerit } from '../../../engine/evaporators/figures-of-merit.js';
import type {
  MultipleEffectResult,
  ThermocompressorSpec,
} from '../../../engine/evaporators/multiple-effect.js';
import type { SingleEffectResult } from '../../../engine/evaporators/single-effect.js';
import type { MultipleEffectTask, SingleEffectTask } from '../../../workers/engine-tasks.js';
import { warningsOut, type FieldMap } from '../../engine-errors.js';
import { display, provenance, r } from '../../output.js';
import { problem } from '../../problem.js';
import { declareOperation } from '../operation.js';
import { coefficientData, effectBreakdownOut, estimateUnits, type EstimateInput } from './heat-transfer.js';
import { IF97_MODEL } from './steam.js';
import { bodyLiquor, streamOut } from './common.js';

/** J/m³ → kWh/m³ (the figures of merit's energy per volume of distillate). */
const J_PER_KWH = 3.6e6;

/**
 * The figures of merit when asked for, or by default for the seawater liquor (desalination);
 * nothing otherwise, so other results keep their shape.
 */
export function figuresOut(fom: FiguresOfMerit, asked: boolean | undefined, liquorId: string) {
  if (!(asked ?? liquorId === 'seawater')) return {};
  const nullable = (v: number | null) => (v === null ? null : r(v));
  return {
    figuresOfMerit: {
      gainOutputRatio: nullable(fom.gainOutputRatio),
      performanceRatio: nullable(fom.performanceRatio),
      specificHeatTransferArea: nullable(fom.specificHeatTransferArea),
      specificThermalEnergy: nullable(
        fom.specificThermalEnergy === null ? null : fom.specificThermalEnergy / J_PER_KWH,
      ),
      specificElectricEnergy: nullable(
        fom.specificElectricEnergy === null ? null : fom.specificElectricEnergy / J_PER_KWH,
      ),
    },
  };
}

const SINGLE_EFFECT_FIELDS: FieldMap = {
  saturationTemperature: { path: 'steam.temperature', kind: 'temperature' },
  'steam.saturationTemperature': { path: 'steam.temperature', kind: 'temperature' },
  pressure: 'body.pressure',
  productMassFraction: 'product.massFraction',
  massFraction: 'product.massFraction',
};

// The engine names the last effect's pressure itself, and labels what a liquor model refuses
// inside effect i as effects[i].pressure / .boilingTemperature / .massFraction; a bare
// "pressure" is not the last effect's.
export const MULTIPLE_EFFECT_FIELDS: FieldMap = {
  ...SINGLE_EFFECT_FIELDS,
  pressure: 'pressure',
  massFraction: 'product.massFraction',
};

/** The heating steam in SI → the engine's supply spec (the request's `temperature` is the saturation temperature). */
function steamSpec(s: {
  pressure?: number;
  temperature?: number;
  superheat?: number;
  condensateSubcooling?: number;
}): SteamSupplySpec {
  return {
    ...(s.pressure !== undefined ? { pressure: s.pressure } : {}),
    ...(s.temperature !== undefined ? { saturationTemperature: s.temperature } : {}),
    ...(s.superheat !== undefined ? { superheat: s.superheat } : {}),
    ...(s.condensateSubcooling !== undefined ? { condensateSubcooling: s.condensateSubcooling } : {}),
  };
}

/** The tube of an `{ estimate }` coefficient (SI), for its breakdown. */
function estimateTube(given: unknown): { outsideDiameter: number; length: number } {
  return (given as { estimate: EstimateInput }).estimate.tube;
}

/** The body's `overallHeatTransferCoefficient` of a raw single-effect or MVR request. */
function bodyCoefficient(body: unknown): unknown {
  return (body as { body?: { overallHeatTransferCoefficient?: unknown } } | undefined)?.body
    ?.overallHeatTransferCoefficient;
}

/** Units beyond the base of a request whose body's U may be an estimate (the estimate's units). */
export function bodyEstimateUnits(body: unknown): number | undefined {
  return estimateUnits(bodyCoefficient(body)) || undefined;
}

/** Units of a single-effect or MVR batch case: base + the estimate's, if U is estimated. */
export function bodyEstimateCaseUnits(base: number): (c: Record<string, unknown>) => number {
  return (c) => base + estimateUnits(bodyCoefficient(c));
}

/** The liquor of an evaporator request (inline, built-in or stored), found once the body is valid. */

export const singleEffect = declareOperation({
  operation: operationCatalogue.singleEffect,
  method: 'post',
  path: '/v1/evaporators/single-effect',
  openApiName: 'postSingleEffect',
  tag: 'Evaporators',
  summary: 'Single-effect evaporator: design (area from product) or rating (product from area)',
  description:
    'Mass and energy balances with the boiling-point rise included in ΔT = T_steam − T_boiling. ' +
    '`body.overallHeatTransferCoefficient` is a number, or `{ "estimate": { evaporatorType, tube, flow, fouling?, liquorProperties? } }`: the inputs of POST /v1/heat-transfer/overall-coefficient without the liquor state, which comes from the solved effect (product mass fraction, mean boiling temperature and pressure, steam condensing temperature); in rating U is re-evaluated inside the root search. U and the area then refer to the OUTSIDE area of the tubes, and `heatTransfer` reports the estimate with its resistances. ' +
    `An estimate costs ${operationCatalogue.overallCoefficient.units} units on top of the ${operationCatalogue.singleEffect.units} of the calculation (in a batch too). ` +
    'Example: an invented caustic concentrator at Harrow Vale works taking 4.5 t/h of 10 % NaOH to 30 %.',
  request: {
    body: SingleEffectRequestSchema,
    example: {
      summary: 'Harrow Vale caustic concentrator (invented)',
      value: {
        liquor: 'sodium-hydroxide',
        feed: { massFlow: '4.5 t/h', massFraction: 0.1, temperature: 40 },
        product: { massFraction: 0.3 },
        steam: { pressure: '3 barg' },
        body: { pressure: 20, overallHeatTransferCoefficient: 1800 },
      },
    },
  },
  response: { description: 'The evaporator', schema: SingleEffectResponseSchema },
  loadAfterBody: true,
  load: bodyLiquor,
  engine: {
    task: operationCatalogue.singleEffect.id,
    fields: SINGLE_EFFECT_FIELDS,
    // Light: one effect (≈ 0.02 ms) answers far sooner here than through a worker (≈ 0.12 ms,
    // tests/bench/pool.ts); batches of single effects still go to the pool.
    offload: () => false,
    input: ({ body: b, loaded: liquor }): SingleEffectTask => {
      // The contract requires feed.massFlow in design and allows its absence only in rating with
      // product.massFraction, where the engine finds it; so it is never read and then dropped.
      const { massFlow: feedFlow, enthalpy: feedEnthalpy } = b.feed;
      const feed = {
        ...(feedFlow !== undefined ? { massFlow: feedFlow } : {}),
        massFraction: b.feed.massFraction,
        temperature: b.feed.temperature,
        ...(feedEnthalpy !== undefined ? { enthalpy: feedEnthalpy } : {}),
      };
      const { massFraction: productFraction, massFlow: productFlow, enthalpy: productEnthalpy } = b.product;
      const { liquidHeight, area } = b.body;
      const bodySpec = {
        pressure: b.body.pressure,
        // A number, or the estimate's inputs as data: the task rebuilds the provider beside the liquor.
        overallHeatTransferCoefficient: coefficientData(
          b.body.overallHeatTransferCoefficient,
          'body.overallHeatTransferCoefficient',
        ),
        ...(liquidHeight !== undefined ? { liquidHeight } : {}),
      };
      const common = {
        liquor: liquor.description,
        steam: steamSpec(b.steam),
        ...(b.heatLossFraction !== undefined ? { heatLossFraction: b.heatLossFraction } : {}),
      };
      if (area === undefined) {
        if (feedFlow === undefined) {
          // unreachable past the contract; kept so the engine never sees a missing flow
          throw problem('validation-failed', 'feed.massFlow is required in design mode', {
            errors: [{ field: 'feed.massFlow', message: 'is required in design mode (no body.area)' }],
          });
        }
        return {
          mode: 'design',
          spec: {
            ...common,
            feed: { ...feed, massFlow: feedFlow },
            body: bodySpec,
            product: {
              ...(productFraction !== undefined ? { massFraction: productFraction } : {}),
              ...(productFlow !== undefined ? { massFlow: productFlow } : {}),
              ...(productEnthalpy !== undefined ? { enthalpy: productEnthalpy } : {}),
            },
          },
        };
      }
      if (productFlow !== undefined) {
        throw problem(
          'validation-failed',
          'Rating (body.area given) finds the product; give product.massFraction or nothing',
          { errors: [{ field: 'product.massFlow', message: 'is not used in rating mode; omit it' }] },
        );
      }
      return {
        mode: 'rating',
        spec: {
          ...common,
          body: { ...bodySpec, area },
          ...(productFraction !== undefined
            ? {
                feed: {
                  massFraction: feed.massFraction,
                  temperature: feed.temperature,
                  ...(feedEnthalpy !== undefined ? { enthalpy: feedEnthalpy } : {}),
                },
                product: {
                  massFraction: productFraction,
                  ...(productEnthalpy !== undefined ? { enthalpy: productEnthalpy } : {}),
                },
              }
            : { feed }),
        },
      };
    },
    output: (result: SingleEffectResult, { body: b, loaded: liquor }, ctx): SingleEffectResponse => {
      return {
        mode: result.mode,
        feed: streamOut(result.feed),
        product: streamOut(result.product),
        vapor: {
          massFlow: r(result.vapor.massFlow),
          pressure: display(result.vapor.pressure, 'pressure'),
          temperature: display(result.vapor.temperature, 'temperature'),
          enthalpy: display(result.vapor.enthalpy, 'specificEnthalpy'),
        },
        steam: {
          massFlow: r(result.steam.massFlow),
          pressure: display(result.steam.pressure, 'pressure'),
          temperature: display(result.steam.temperature, 'temperature'),
          latentHeat: display(result.steam.enthalpyIn - result.steam.enthalpyOut, 'specificEnthalpy'),
        },
        boilingPointRise: r(result.boilingPointRise),
        duty: display(result.duty, 'power'),
        temperatureDifference: r(result.temperatureDifference),
        area: r(result.area),
        steamEconomy: r(result.steamEconomy),
        specificSteamConsumption: r(result.specificSteamConsumption),
        waterBoilingPoint: display(result.waterBoilingPoint, 'temperature'),
        heatLoss: display(result.heatLoss, 'power'),
        ...figuresOut(result.figuresOfMerit, b.figuresOfMerit, liquor.model.id),
        ...(result.heatTransfer
          ? {
              heatTransfer: effectBreakdownOut(
                result.heatTransfer,
                { massFraction: result.product.massFraction, bodyPressure: result.body.meanBoilingPressure },
                estimateTube(b.body.overallHeatTransferCoefficient),
              ),
            }
          : {}),
        warnings: warningsOut([...liquor.definitionWarnings, ...result.warnings], SINGLE_EFFECT_FIELDS),
        cautions: result.cautions,
        provenance: provenance(ctx.engineVersion, [IF97_MODEL, ...liquor.models, ...estimateSources(result)]),
      };
    },
  },
  extraUnits: bodyEstimateUnits,
  batch: { units: bodyEstimateCaseUnits(operationCatalogue.singleEffect.units) },
});

/**
 * A single multiple-effect call with at least this many effects runs in the calculation pool;
 * fewer run inline. The crossover measured by tests/bench/pool.ts (2 cores, Node 20): a round
 * trip through the pool adds about 0.1–0.15 ms to a call, and from 5 effects on (≈ 0.17 ms) a train
 * inline would hold the main thread longer than that, so every other request waits less when it
 * goes to the pool. A single effect (≈ 0.02 ms) always stays inline.
 */
export const POOLED_EFFECTS = 5;

/** The correlations behind the estimates of a result's effects, for `provenance`. */
export function estimateSources(
  ...results: ({ heatTransfer?: { sources: { key: string; reference: string }[] } } | undefined)[]
): { id: string; source: string }[] {
  const seen = new Map<string, string>();
  for (const r of results) {
    for (const s of r?.heatTransfer?.sources ?? []) if (s.key !== IF97_MODEL.id) seen.set(s.key, s.reference);
  }
  return [...seen].map(([id, source]) => ({ id, source }));
}

/** The request's thermocompressor in SI → the engine's spec (absent optional fields left out). */
function thermocompressorSpec(t: {
  motivePressure: number;
  motiveSuperheat?: number;
  entrainedFromEffect?: number;
}): ThermocompressorSpec {
  return {
    motivePressure: t.motivePressure,
    ...(t.motiveSuperheat !== undefined ? { motiveSuperheat: t.motiveSuperheat } : {}),
    ...(t.entrainedFromEffect !== undefined ? { entrainedFromEffect: t.entrainedFromEffect } : {}),
  };
}

function thermocompressorOut(t: NonNullable<MultipleEffectResult['thermocompressor']>) {
  return {
    motiveSteamFlow: r(t.motiveSteamFlow),
    entrainedVaporFlow: r(t.entrainedVaporFlow),
    entrainmentRatio: r(t.entrainmentRatio),
    motivePerEntrained: r(t.motivePerEntrained),
    compressionRatio: r(t.compressionRatio),
    expansionRatio: r(t.expansionRatio),
    entrainedFromEffect: t.entrainedFromEffect,
    suctionPressure: display(t.suctionPressure, 'pressure'),
    dischargeEnthalpy: display(t.dischargeEnthalpy, 'specificEnthalpy'),
    dischargeTemperature: display(t.dischargeTemperature, 'temperature'),
  };
}

/**
 * Units beyond the base of a multiple-effect request: `unitsPerEffect` × effects (1 to 10), plus
 * the overall-coefficient estimate's units for each effect whose U is `{ estimate }`.
 */
function perEffectUnits(body: unknown): number | undefined {
  const effects = (body as { effects?: unknown } | undefined)?.effects;
  return Number.isInteger(effects) && (effects as number) > 0 && (effects as number) <= 10
    ? operationCatalogue.multipleEffect.unitsPerEffect * (effects as number) +
        estimateUnits((body as { overallHeatTransferCoefficients?: unknown }).overallHeatTransferCoefficients)
    : undefined;
}

/** Units of a multiple-effect batch case: base + per effect, a case with no readable count as one effect. */
export function multipleEffectCaseUnits(c: Record<string, unknown>): number {
  return (
    operationCatalogue.multipleEffect.units +
    (perEffectUnits(c) ??
      operationCatalogue.multipleEffect.unitsPerEffect +
        estimateUnits((c as { overallHeatTransferCoefficients?: unknown }).overallHeatTransferCoefficients))
  );
}

export const multipleEffect = declareOperation({
  operation: operationCatalogue.multipleEffect,
  method: 'post',
  path: '/v1/evaporators/multiple-effect',
  openApiName: 'postMultipleEffect',
  tag: 'Evaporators',
  summary: 'Multiple-effect train (forward, backward, parallel or mixed feed), equal-area design or rating',
  description:
    'Each entry of `overallHeatTransferCoefficients` is a number, or `{ "estimate": { evaporatorType, tube, flow, fouling?, liquorProperties? } }`: the inputs of POST /v1/heat-transfer/overall-coefficient without the liquor state, which comes from that effect while the train is solved (its liquor’s mass fraction, boiling point and pressure, and the condensing temperature of its heating steam or vapour; re-evaluated every iteration). Each entry has its own tube and flow: a wetting rate or flow per tube is taken as given, the same in every effect that repeats it. An estimated effect’s U and area refer to the OUTSIDE area of its tubes, and `effects[i].heatTransfer` reports the estimate. ' +
    `Costs ${operationCatalogue.multipleEffect.units} units + ${operationCatalogue.multipleEffect.unitsPerEffect} per effect + ${operationCatalogue.overallCoefficient.units} per estimated effect (in a batch too).`,
  request: {
    body: MultipleEffectRequestSchema,
    example: {
      summary: 'Four-effect juice evaporator at the invented Corrin Flats sugar factory',
      value: {
        liquor: 'sucrose',
        effects: 4,
        feedArrangement: 'forward',
        feed: { massFlow: '40 t/h', massFraction: '15 Bx', temperature: 95 },
        product: { massFraction: '65 Bx' },
        steam: { pressure: '2 barg' },
        lastEffectPressure: 20,
        overallHeatTransferCoefficients: [2800, 2300, 1800, 1100],
      },
    },
  },
  response: { description: 'The train', schema: MultipleEffectResponseSchema },
  extraUnits: perEffectUnits,
  loadAfterBody: true,
  load: bodyLiquor,
  engine: {
    task: operationCatalogue.multipleEffect.id,
    fields: MULTIPLE_EFFECT_FIELDS,
    offload: (t: MultipleEffectTask) => t.spec.overallHeatTransferCoefficients.length >= POOLED_EFFECTS,
    input: ({ body: b, loaded: liquor }): MultipleEffectTask => {
      const F = b.feed.massFlow;
      const xF = b.feed.massFraction;
      const feed = { massFlow: F, massFraction: xF, temperature: b.feed.temperature };
      let productMassFraction = b.product.massFraction;
      const productFlow = b.product.massFlow;
      if (productFlow !== undefined) productMassFraction = (F * xF) / productFlow; // solute balance F·x_F = L·x_L
      const input = {
        liquor: liquor.description,
        feed,
        steam: steamSpec(b.steam),
        lastEffectPressure: b.lastEffectPressure,
        overallHeatTransferCoefficients: b.overallHeatTransferCoefficients.map((u, i) =>
          coefficientData(u, `overallHeatTransferCoefficients[${i}]`, `effect ${i + 1}`),
        ),
        feedArrangement: b.feedArrangement,
        ...(b.vaporBleeds ? { vaporBleeds: b.vaporBleeds } : {}),
        ...(productMassFraction !== undefined ? { productMassFraction } : {}),
        ...(b.feedPreheat ? { feedPreheat: b.feedPreheat } : {}),
        ...(b.condensateFlash !== undefined ? { condensateFlash: b.condensateFlash } : {}),
        ...(b.thermocompressor ? { thermocompressor: thermocompressorSpec(b.thermocompressor) } : {}),
      };
      if (b.areas) return { mode: 'rating', spec: { ...input, areas: b.areas } };
      return { mode: 'design', spec: input };
    },
    output: (result: MultipleEffectResult, { body: b, loaded: liquor }, ctx): MultipleEffectResponse => {
      return {
        effects: result.effects.map((e, i) => ({
          pressure: display(e.pressure, 'pressure'),
          vaporTemperature: display(e.vaporTemperature, 'temperature'),
          boilingPoint: display(e.boilingPoint, 'temperature'),
          boilingPointRise: r(e.boilingPointRise),
          temperatureDifference: r(e.temperatureDifference),
          liquorFlow: r(e.liquorOutFlow),
          massFraction: r(e.massFraction),
          vaporFlow: r(e.vaporFlow),
          duty: display(e.duty, 'power'),
          area: r(e.area),
          vaporBleed: r(e.vaporBleed),
          flashVapor: r(e.flashVapor),
          ...(e.heatTransfer
            ? {
                heatTransfer: effectBreakdownOut(
                  e.heatTransfer,
                  { massFraction: e.massFraction, bodyPressure: e.pressure },
                  estimateTube(b.overallHeatTransferCoefficients[i]),
                ),
              }
            : {}),
        })),
        steam: {
          massFlow: r(result.steam.massFlow),
          pressure: display(result.steam.pressure, 'pressure'),
          temperature: display(result.steam.temperature, 'temperature'),
          latentHeat: display(result.steam.heatPerKg, 'specificEnthalpy'),
        },
        product: streamOut(result.product),
        totalArea: r(result.totalArea),
        evaporation: r(result.evaporation),
        steamEconomy: r(result.steamEconomy),
        iterations: result.iterations,
        residual: result.residual,
        feedPreheatDuty: display(result.feedPreheat?.duty ?? 0, 'power'),
        ...(result.thermocompressor
          ? { thermocompressor: thermocompressorOut(result.thermocompressor) }
          : {}),
        ...figuresOut(result.figuresOfMerit, b.figuresOfMerit, liquor.model.id),
        warnings: warningsOut([...liquor.definitionWarnings, ...result.warnings], MULTIPLE_EFFECT_FIELDS),
        cautions: result.cautions,
        provenance: provenance(ctx.engineVersion, [
          IF97_MODEL,
          ...liquor.models,
          ...estimateSources(...result.effects),
        ]),
      };
    },
  },
  batch: { units: multipleEffectCaseUnits },
});
