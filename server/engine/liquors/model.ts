/**
 * The contract every liquor model fulfils, built-in or custom. All numbers SI:
 * x = mass fraction of solute (kg solute / kg solution, 0–1), T in K, p in Pa,
 * enthalpy in J/kg on the steam-table datum (liquid water at the triple point: u = s = 0,
 * as IAPWS-IF97), heat capacity J/(kg·K), density kg/m³.
 *
 * Validity: each model states the box where its source's data lie (`validity`). Inside it the
 * model is silent; between that box and its `limits` (where the equations still behave
 * physically) it pushes a "model-extrapolated" warning into the sink; beyond `limits` it throws
 * an EngineRangeError naming the input and the range. It never clamps silently.
 */
import { saturationTemperature } from '../steam/if97.js';
import type { Citation, EngineCaution, WarningSink } from '../types.js';

export interface Interval {
  min: number;
  max: number;
}

export interface ValidityBox {
  /** Mass fraction of solute, 0–1. */
  massFraction: Interval;
  /** K */
  temperature: Interval;
  /** Pa, where the model's boiling point depends on pressure. */
  pressure?: Interval;
  /** Plain-language notes on bounds that are not a box (e.g. x-limit that depends on T). */
  notes?: string[];
}

export type LiquorKind = 'built-in' | 'custom';

/** The transport properties a model may give (each optional). */
export type TransportProperty = 'viscosity' | 'thermalConductivity' | 'surfaceTension';

export interface LiquorModel {
  /** kebab-case, stable (e.g. "sodium-hydroxide"). */
  id: string;
  name: string;
  kind: LiquorKind;
  /** What x means for this liquor, e.g. "mass fraction of NaOH", "dry-solids mass fraction". */
  compositionVariable: string;
  /** Published data range: silent inside. */
  validity: ValidityBox;
  /** Hard limits: a range error beyond these; a warning between validity and limits. */
  limits: ValidityBox;
  sources: Citation[];
  /** Safety cautions that apply whenever this liquor is used (e.g. hot caustic). */
  cautions: EngineCaution[];

  /** Boiling point of the solution at pressure p, K. */
  boilingPoint(massFraction: number, pressure: number, warnings?: WarningSink): number;
  /** Boiling-point rise over pure water at the same pressure, K. */
  boilingPointRise(massFraction: number, pressure: number, warnings?: WarningSink): number;
  /** Specific enthalpy of the solution at (x, T), J/kg, steam-table datum. */
  enthalpy(massFraction: number, temperature: number, warnings?: WarningSink): number;
  /** Isobaric specific heat capacity, J/(kg·K). */
  heatCapacity?(massFraction: number, temperature: number, warnings?: WarningSink): number;
  /** Density, kg/m³. */
  density?(massFraction: number, temperature: number, warnings?: WarningSink): number;
  /**
   * Transport properties for film coefficients (heat-transfer estimate), where a published source
   * gives them. Each checks its own source's box (`transportValidity`) with the one warn-or-refuse
   * rule of validity.ts, so an extrapolated property is a warning, never a silent value.
   */
  /** Dynamic viscosity, Pa·s. */
  viscosity?(massFraction: number, temperature: number, warnings?: WarningSink): number;
  /** Thermal conductivity, W/(m·K). */
  thermalConductivity?(massFraction: number, temperature: number, warnings?: WarningSink): number;
  /** Surface tension against its vapour, N/m (film stability). */
  surfaceTension?(massFraction: number, temperature: number, warnings?: WarningSink): number;
  /** The box of each transport property's source, where it differs from `validity`. */
  transportValidity?: Partial<Record<TransportProperty | 'density', ValidityBox>>;
  /**
   * Highest mass fraction before a solid phase appears at T (solubility or crystallisation
   * limit), when the source gives one; used to warn that a product is near it.
   */
  solubilityLimit?(temperature: number): number;
}

/**
 * A model as written: `boilingPointRise` may be left out when it is the default,
 * boilingPoint(x, p) − T_sat,IF97(p).
 */
export type LiquorModelDefinition<M extends LiquorModel = LiquorModel> = Omit<M, 'boilingPointRise'> &
  Partial<Pick<LiquorModel, 'boilingPointRise'>>;

/**
 * Builds a liquor model from its definition, supplying the default boiling-point rise
 * BPR(x, p) = boilingPoint(x, p) − T_sat(p) (IF97 saturation temperature of pure water at p) when
 * the definition gives none. A model whose source gives the rise directly (not as a boiling point
 * less T_sat) keeps its own `boilingPointRise`.
 */
export function defineLiquorModel<M extends LiquorModel = LiquorModel>(
  definition: LiquorModelDefinition<M>,
): M {
  const boilingPointRise =
    definition.boilingPointRise ??
    ((massFraction: number, pressure: number, warnings?: WarningSink): number =>
      definition.boilingPoint(massFraction, pressure, warnings) - saturationTemperature(pressure));
  return { ...definition, boilingPointRise } as unknown as M;
}

/** Public description of a model (what the API lists). */
export interface LiquorDescription {
  id: string;
  name: string;
  kind: LiquorKind;
  compositionVariable: string;
  validity: ValidityBox;
  limits: ValidityBox;
  sources: Citation[];
  /** Which optional properties the model provides. */
  properties: {
    heatCapacity: boolean;
    density: boolean;
    solubilityLimit: boolean;
    viscosity: boolean;
    thermalConductivity: boolean;
    surfaceTension: boolean;
  };
  /** The source box of each provided property whose source differs from `validity`. */
  transportValidity: Partial<Record<TransportProperty | 'density', ValidityBox>>;
}

export function describeLiquor(model: LiquorModel): LiquorDescription {
  return {
    id: model.id,
    name: model.name,
    kind: model.kind,
    compositionVariable: model.compositionVariable,
    validity: model.validity,
    limits: model.limits,
    sources: model.sources,
    properties: {
      heatCapacity: typeof model.heatCapacity === 'function',
      density: typeof model.density === 'function',
      solubilityLimit: typeof model.solubilityLimit === 'function',
      viscosity: typeof model.viscosity === 'function',
      thermalConductivity: typeof model.thermalConductivity === 'function',
      surfaceTension: typeof model.surfaceTension === 'function',
    },
    transportValidity: { ...model.transportValidity },
  };
}
