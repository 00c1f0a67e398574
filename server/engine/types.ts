/**
 * Types shared across the engine. Every number inside the engine is in SI base units:
 * Pa, K, J/kg, J/(kg·K), kg/s, W, m², W/(m²·K), kg/m³, and mass fractions 0–1.
 * Unit parsing and display units belong to the API layer (server/units), never here.
 */

/** A published source, cited wherever a method or correlation is used. */
export interface Citation {
  /** Short stable key, e.g. "olsson-1997". */
  key: string;
  /** Human-readable reference: authors, title, journal, volume, year. */
  reference: string;
}

/** A warning is data returned with a result (never only a log line). */
export interface EngineWarning {
  /** Stable machine code, kebab-case, e.g. "model-extrapolated", "small-temperature-difference". */
  code: string;
  message: string;
  /** The input or result the warning is about, when there is one. */
  field?: string;
  /** The published range that was exceeded, in SI units. */
  validRange?: { min: number; max: number; unit: string };
  /**
   * The message as data, for a caller to say in its own units: `{name}` stands for `values.name`
   * (an SI value of a kind), `{field}` for the field's name as the caller knows it. `message`
   * says the same in SI.
   */
  template?: string;
  values?: Record<string, EngineQuantity>;
  /** Where in a larger calculation the warning arose, unit-free ("effect 2"). */
  context?: string;
  /**
   * The liquor property whose source's data range was left ("viscosity", "thermal conductivity"),
   * when a model's properties come from sources with different ranges.
   */
  property?: string;
}

/** The kinds of quantity an engine message may carry (SI values; the same names as the API's kinds). */
export type EngineQuantityKind =
  | 'temperature'
  | 'temperatureDifference'
  | 'pressure'
  | 'massFraction'
  | 'massFlow'
  | 'specificEnthalpy'
  | 'specificHeatCapacity'
  | 'power'
  | 'area'
  | 'heatTransferCoefficient'
  | 'length'
  | 'density'
  | 'velocity'
  | 'wettingRate'
  | 'foulingResistance'
  | 'thermalConductivity'
  | 'viscosity'
  | 'heatFlux';

/** An SI value with its kind, for a message the caller formats. */
export interface EngineQuantity {
  value: number;
  kind: EngineQuantityKind;
}

/**
 * The `template` and `values` of a warning whose numbers are all of one kind (nothing when the
 * kind is unknown: the caller then says the SI message).
 */
export function templated(
  template: string,
  kind: EngineQuantityKind | undefined,
  values: Record<string, number>,
): Pick<EngineWarning, 'template' | 'values'> {
  if (!kind) return {};
  return {
    template,
    values: Object.fromEntries(Object.entries(values).map(([k, value]) => [k, { value, kind }])),
  };
}

/** The kind of an SI unit the engine names in ranges ("Pa" → pressure), if it is one. */
export function kindOfSiUnit(unit: string): EngineQuantityKind | undefined {
  return SI_UNIT_KINDS[unit];
}
const SI_UNIT_KINDS: Record<string, EngineQuantityKind> = {
  Pa: 'pressure',
  K: 'temperature',
  'kg/kg': 'massFraction',
  'kg/s': 'massFlow',
  'J/kg': 'specificEnthalpy',
  'J/(kg·K)': 'specificHeatCapacity',
  W: 'power',
  'm²': 'area',
  'W/(m²·K)': 'heatTransferCoefficient',
  m: 'length',
  'kg/m³': 'density',
  'm/s': 'velocity',
  'kg/(m·s)': 'wettingRate',
  'm²·K/W': 'foulingResistance',
  'W/(m·K)': 'thermalConductivity',
  'Pa·s': 'viscosity',
  'W/m²': 'heatFlux',
};

/** A safety caution shown with results that could hurt someone if misused. */
export interface EngineCaution {
  code: string;
  message: string;
}

/**
 * Collector passed down into models and solvers. Models push warnings into it; callers
 * de-duplicate with {@link addWarning}. Passing no sink (undefined) means "do not collect"
 * and is what solvers use inside their iterations to stay allocation-free.
 */
export type WarningSink = EngineWarning[] | undefined;

/** Adds a warning unless one with the same code and field is already present. */
export function addWarning(sink: WarningSink, warning: EngineWarning): void {
  if (!sink) return;
  if (
    sink.some((w) => w.code === warning.code && w.field === warning.field && w.property === warning.property)
  )
    return;
  sink.push(warning);
}

/** Standard gravity (CGPM 1901, exact), m/s². */
export const STANDARD_GRAVITY = 9.80665;
/** Standard atmosphere, Pa (exact). */
export const STANDARD_ATMOSPHERE = 101_325;
/** Offset between kelvin and degrees Celsius (exact). */
export const KELVIN_OFFSET = 273.15;
