/**
 * Heat transfer: the estimate of the overall coefficient U of an evaporator tube (liquor inside,
 * steam condensing outside), referred to the outside area of the tubes. The liquor is resolved
 * like the evaporators' (built-in, stored or inline); the engine refuses a liquor whose model
 * lacks a property the estimate needs unless the request gives it in `liquorProperties`.
 */
import {
  OverallCoefficientRequestSchema,
  OverallCoefficientResponseSchema,
  type HeatTransferBreakdown,
  type WarningDto,
  type OverallCoefficientResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import {
  estimateOverallCoefficient,
  liquorBoilingState,
  overallCoefficientProvider,
  type EvaporatorType,
  type OverallCoefficientEstimateSpec,
  type OverallCoefficientProvider,
  type OverallCoefficientResult,
} from '../../../engine/heat-transfer/overall.js';
import type { LiquorModel } from '../../../engine/liquors/model.js';
import { saturationPressure, saturationTemperature } from '../../../engine/steam/if97.js';
import type { EngineWarning } from '../../../engine/types.js';
import type { CoefficientData } from '../../../workers/engine-tasks.js';
import { calculate, warningsOut, type FieldMap } from '../../engine-errors.js';
import { display, provenance, r } from '../../output.js';
import { declareOperation } from '../operation.js';
import { IF97_MODEL } from './steam.js';
import { bodyLiquor } from './common.js';

/** Drops the keys whose value is undefined (the engine's optional fields are absent, not undefined). */
function defined<T extends object>(o: T | undefined): { [K in keyof T]?: Exclude<T[K], undefined> } {
  return Object.fromEntries(Object.entries(o ?? {}).filter(([, v]) => v !== undefined)) as {
    [K in keyof T]?: Exclude<T[K], undefined>;
  };
}

/** The estimate's own inputs as the contract gives them in SI (the request's or an effect's `estimate`). */
export interface EstimateInput {
  evaporatorType: EvaporatorType;
  tube: {
    outsideDiameter: number;
    wallThickness: number;
    length: number;
    wallConductivity?: number | undefined;
    material?: string | undefined;
  };
  flow: Record<string, number | undefined>;
  fouling?: { inside?: number | undefined; outside?: number | undefined } | undefined;
  liquorProperties?: Record<string, number | undefined> | undefined;
}

/** The contract's estimate inputs (SI) → the engine's. */
export function estimateSpec(e: EstimateInput): OverallCoefficientEstimateSpec {
  return {
    evaporatorType: e.evaporatorType,
    tube: defined(e.tube) as OverallCoefficientEstimateSpec['tube'],
    flow: defined(e.flow),
    fouling: defined(e.fouling),
    liquorProperties: defined(e.liquorProperties),
  };
}

/**
 * U of an evaporator effect as the request gives it (SI): a number, or `{ estimate }` → a provider
 * that estimates U at the effect's state, its refusals and warnings named under `field` (the
 * request path of the coefficient) and led by `label` ("effect 3").
 */
export function coefficientInput(
  liquor: LiquorModel,
  given: number | string | { estimate: EstimateInput },
  field: string,
  label?: string,
): number | OverallCoefficientProvider {
  if (typeof given === 'number') return given;
  // Past the contract every quantity is an SI number; a string here is a bug, not input.
  if (typeof given === 'string') throw new TypeError(`${field} was not converted to SI`);
  return overallCoefficientProvider(liquor, estimateSpec(given.estimate), field, label);
}

/**
 * U of an evaporator effect as the request gives it (SI), as plain data for an engine task: a
 * number, or the estimate's inputs with the field and label of {@link coefficientInput}; the task
 * rebuilds the provider (server/workers/engine-tasks.ts), in a worker thread or inline.
 */
export function coefficientData(
  given: number | string | { estimate: EstimateInput },
  field: string,
  label?: string,
): CoefficientData {
  if (typeof given === 'number') return given;
  // Past the contract every quantity is an SI number; a string here is a bug, not input.
  if (typeof given === 'string') throw new TypeError(`${field} was not converted to SI`);
  return { estimate: estimateSpec(given.estimate), field, ...(label !== undefined ? { label } : {}) };
}

/** How many `{ estimate }` a raw body gives for U (read before parsing, for the units it costs). */
export function estimatesIn(value: unknown): number {
  const isEstimate = (v: unknown): boolean =>
    v !== null && typeof v === 'object' && !Array.isArray(v) && 'estimate' in v;
  if (Array.isArray(value)) return value.slice(0, 10).filter(isEstimate).length;
  return isEstimate(value) ? 1 : 0;
}

/** Units of the estimates a raw body gives (the overall-coefficient operation's units each). */
export function estimateUnits(value: unknown): number {
  return estimatesIn(value) * operationCatalogue.overallCoefficient.units;
}

/**
 * An estimate and its resistances in display units: the answer of the overall-coefficient
 * operation (without its provenance), also reported by each evaporator effect with an estimated U.
 */
export function breakdownOut(
  e: OverallCoefficientResult,
  state: { massFraction: number; boilingTemperature: number; bodyPressure: number },
  steam: { pressure: number; temperature: number },
  tube: { outsideDiameter: number; length: number },
  warnings: WarningDto[],
): HeatTransferBreakdown {
  const T = (v: number) => display(v, 'temperature');
  const flux = (v: number) => display(v, 'heatFlux');
  const R = (v: number) => display(v, 'foulingResistance');
  const hb = e.boilingSide;
  return {
    evaporatorType: e.evaporatorType,
    overallHeatTransferCoefficient: r(e.overallHeatTransferCoefficient),
    area: 'outside',
    temperatureDifference: r(e.temperatureDifference),
    heatFlux: flux(e.heatFlux),
    totalResistance: R(e.totalResistance),
    liquorState: {
      massFraction: r(state.massFraction),
      boilingTemperature: T(state.boilingTemperature),
      bodyPressure: display(state.bodyPressure, 'pressure'),
    },
    steam: { pressure: display(steam.pressure, 'pressure'), temperature: T(steam.temperature) },
    tube: {
      outsideDiameter: display(tube.outsideDiameter, 'length'),
      insideDiameter: display(e.insideDiameter, 'length'),
      length: display(tube.length, 'length'),
    },
    boilingSide: {
      model: hb.model,
      filmCoefficient: r(hb.filmCoefficient),
      resistance: R(hb.resistance),
      share: r(hb.share),
      reynolds: r(hb.reynolds),
      reynoldsDefinition: hb.reynoldsDefinition,
      prandtl: r(hb.prandtl),
      regime: hb.regime,
      heatFlux: flux(hb.heatFlux),
      surfaceTemperature: T(hb.surfaceTemperature),
      liquorTemperature: T(hb.liquorTemperature),
      ...(hb.wettingRate
        ? {
            wettingRate: {
              inlet: display(hb.wettingRate.inlet, 'wettingRate'),
              mean: display(hb.wettingRate.mean, 'wettingRate'),
              outlet: display(hb.wettingRate.outlet, 'wettingRate'),
            },
          }
        : {}),
      ...(hb.transitionReynolds !== undefined ? { transitionReynolds: r(hb.transitionReynolds) } : {}),
      ...(hb.velocity !== undefined ? { velocity: display(hb.velocity, 'velocity') } : {}),
      ...(hb.convectiveCoefficient !== undefined
        ? { convectiveCoefficient: r(hb.convectiveCoefficient) }
        : {}),
      ...(hb.nucleateBoilingCoefficient !== undefined
        ? { nucleateBoilingCoefficient: r(hb.nucleateBoilingCoefficient) }
        : {}),
      properties: {
        density: display(hb.properties.density, 'density'),
        viscosity: display(hb.properties.viscosity, 'viscosity'),
        thermalConductivity: display(hb.properties.thermalConductivity, 'thermalConductivity'),
        heatCapacity: display(hb.properties.heatCapacity, 'specificHeatCapacity'),
        source: hb.properties.source,
      },
    },
    wall: {
      conductivity: display(e.wall.conductivity, 'thermalConductivity'),
      ...(e.wall.material !== undefined ? { material: e.wall.material } : {}),
      resistance: R(e.wall.resistance),
      share: r(e.wall.share),
      heatFlux: flux(e.wall.heatFlux),
      outsideTemperature: T(e.wall.outsideTemperature),
      insideTemperature: T(e.wall.insideTemperature),
    },
    condensingSide: {
      model: e.condensingSide.model,
      filmCoefficient: r(e.condensingSide.filmCoefficient),
      resistance: R(e.condensingSide.resistance),
      share: r(e.condensingSide.share),
      reynolds: r(e.condensingSide.reynolds),
      prandtl: r(e.condensingSide.prandtl),
      regime: e.condensingSide.regime,
      heatFlux: flux(e.condensingSide.heatFlux),
      surfaceTemperature: T(e.condensingSide.surfaceTemperature),
      filmTemperature: T(e.condensingSide.filmTemperature),
      latentHeat: display(e.condensingSide.latentHeat, 'specificEnthalpy'),
    },
    fouling: {
      inside: {
        resistance: R(e.fouling.inside.resistance),
        referredResistance: R(e.fouling.inside.referredResistance),
        share: r(e.fouling.inside.share),
        defaulted: e.fouling.inside.defaulted,
        heatFlux: flux(e.fouling.inside.heatFlux),
      },
      outside: {
        resistance: R(e.fouling.outside.resistance),
        referredResistance: R(e.fouling.outside.referredResistance),
        share: r(e.fouling.outside.share),
        defaulted: e.fouling.outside.defaulted,
        heatFlux: flux(e.fouling.outside.heatFlux),
      },
    },
    assumptions: e.assumptions,
    warnings,
    cautions: e.cautions,
  };
}

/**
 * The breakdown of an evaporator effect's estimated U (SI result → display): the steam pressure is
 * the saturation pressure of the condensing temperature; warnings carry their request paths.
 */
export function effectBreakdownOut(
  e: OverallCoefficientResult,
  state: { massFraction: number; bodyPressure: number },
  tube: { outsideDiameter: number; length: number },
): HeatTransferBreakdown {
  const ts = e.condensingSide.steamTemperature;
  return breakdownOut(
    e,
    { ...state, boilingTemperature: e.boilingSide.liquorTemperature },
    { pressure: saturationPressure(ts), temperature: ts },
    tube,
    warningsOut(e.warnings),
  );
}

const EXAMPLE = {
  evaporatorType: 'falling-film',
  liquor: 'seawater',
  massFraction: 0.05,
  bodyPressure: 31,
  steam: { temperature: 80 },
  tube: { outsideDiameter: '50.8 mm', wallThickness: '1.6 mm', length: 8, material: 'titanium-grade-2' },
  flow: { wettingRate: 0.5, evaporatedFraction: 0.3 },
  liquorProperties: { viscosity: '0.45 mPa*s', thermalConductivity: 0.65 },
};

export const overallCoefficient = declareOperation({
  operation: operationCatalogue.overallCoefficient,
  method: 'post',
  path: '/v1/heat-transfer/overall-coefficient',
  openApiName: 'postOverallCoefficient',
  tag: 'Evaporators',
  summary:
    'Estimate U of an evaporator tube from its film coefficients, wall and fouling (outside-area basis)',
  description:
    'Falling film (Chun & Seban 1971, Re = 4Γ/μ with Γ per wetted perimeter), forced circulation without boiling in the tubes (Dittus–Boelter, Incropera & DeWitt 6th ed. eq. 8.60) or natural circulation (approximate), with Nusselt film condensation of the heating steam outside the tubes (Rohsenow’s latent heat), the cylindrical wall and fouling. ' +
    'U and every resistance are referred to the OUTSIDE area: 1/U_o = 1/h_o + R_fo + R_wall + R_fi·(D_o/D_i) + (D_o/D_i)/h_i; the wall temperatures are solved so that one heat flux passes every resistance. ' +
    'A liquor model that gives no viscosity, thermal conductivity, density or heat capacity needs the value in `liquorProperties`. ' +
    'Example: an invented seawater distiller at Skerry Point with measured brine viscosity and conductivity.',
  request: {
    body: OverallCoefficientRequestSchema,
    example: { summary: 'Skerry Point brine falling film (invented)', value: EXAMPLE },
  },
  response: { description: 'The estimate and its resistances', schema: OverallCoefficientResponseSchema },
  loadAfterBody: true,
  load: bodyLiquor,
  run: ({ body: b, loaded: liquor }, ctx): OverallCoefficientResponse => {
    const warnings: EngineWarning[] = [...liquor.definitionWarnings];
    const steamField = b.steam.pressure !== undefined ? 'steam.pressure' : 'steam.temperature';
    const stateField = b.bodyPressure !== undefined ? 'bodyPressure' : 'boilingTemperature';
    // What the engine and the liquor model call their inputs → where the request gave them.
    const fields: FieldMap = {
      pressure: { path: stateField, kind: b.bodyPressure !== undefined ? 'pressure' : 'temperature' },
      temperature: { path: stateField, kind: 'temperature' },
      boilingTemperature: { path: stateField, kind: 'temperature' },
      waterBoilingTemperature: { path: stateField, kind: 'temperature' },
      bodyPressure: 'bodyPressure',
      steamTemperature: { path: steamField, kind: 'temperature' },
      massFraction: 'massFraction',
    };
    const steam = calculate({ pressure: steamField, temperature: steamField }, () =>
      b.steam.pressure !== undefined
        ? { pressure: b.steam.pressure, temperature: saturationTemperature(b.steam.pressure) }
        : { pressure: saturationPressure(b.steam.temperature!), temperature: b.steam.temperature! },
    );
    const result = calculate(fields, () => {
      const state = liquorBoilingState(
        liquor.model,
        b.massFraction,
        b.bodyPressure !== undefined
          ? { bodyPressure: b.bodyPressure }
          : { boilingTemperature: b.boilingTemperature! },
        warnings,
      );
      return {
        state,
        estimate: estimateOverallCoefficient({
          liquor: liquor.model,
          massFraction: b.massFraction,
          boilingTemperature: state.boilingTemperature,
          bodyPressure: state.bodyPressure,
          steamTemperature: steam.temperature,
          ...estimateSpec(b),
        }),
      };
    });
    const e = result.estimate;
    return {
      ...breakdownOut(
        e,
        { ...result.state, massFraction: b.massFraction },
        steam,
        b.tube,
        warningsOut([...warnings, ...e.warnings], fields),
      ),
      provenance: provenance(ctx.engineVersion, [
        IF97_MODEL,
        ...liquor.models,
        ...e.sources.map((s) => ({ id: s.key, source: s.reference })),
      ]),
    };
  },
});
