/**
 * Building blocks shared by every v1 contract: quantity inputs (a number in the default unit
 * or a string with a unit), output numbers that state their unit, warnings, cautions,
 * provenance and the RFC 9457 problem-details shape.
 *
 * This folder is shared by the server and the console: it imports zod only (no server code,
 * no OpenAPI library). OpenAPI metadata is attached with zod 4's own `.meta()`, which
 * @asteasolutions/zod-to-openapi reads; `x-unit` names the unit of each number.
 */
import { z } from 'zod';

export { defaultUnits, quantityKinds, type QuantityKind } from '../quantities.js';
import { defaultUnits, type QuantityKind } from '../quantities.js';

/** Range of a quantity in its default unit. */
export interface QuantityRange {
  min?: number;
  max?: number;
  /** true: the minimum itself is refused (e.g. a flow must be > 0). */
  minExclusive?: boolean;
}

export interface QuantitySpec extends QuantityRange {
  kind: QuantityKind;
  /** The request's atmosphere: gauge and vacuum readings of its other fields refer to it. */
  atmosphere?: true;
  /** A pressure difference (a drop): a gauge or vacuum reading would be misread, so it is refused. */
  difference?: true;
}

/**
 * The physically plausible range of every quantity kind, in its default unit: what an input of
 * that kind may be at all. Anything outside is a typing slip or a probe, never a plant, and is
 * refused (422 naming the field and this range) before any calculation. The models refuse or
 * warn further inside these bounds where their own data end.
 */
export const physicalRanges: Record<QuantityKind, Required<Pick<QuantityRange, 'min' | 'max'>>> = {
  // IAPWS-IF97 reaches 2000 °C (region 5); −50 °C covers cold feeds and brines below 0 °C.
  temperature: { min: -50, max: 2000 },
  // Superheat, subcooling, BPR: IF97's 2000 °C ceiling less a saturation temperature above 0 °C.
  temperatureDifference: { min: 0, max: 2000 },
  // 0.1 kPa (deep vacuum, below the triple point of water) to 100 MPa, IF97's upper pressure.
  pressure: { min: 0.1, max: 100_000 },
  // 10 000 kg/s (36 000 t/h) is above the largest evaporator trains and boilers in service.
  massFlow: { min: 0, max: 10_000 },
  // IF97 reaches ≈ 7 400 kJ/kg at 2000 °C; liquor enthalpies on the steam-table datum can be
  // negative (heats of solution), so ±10 000 kJ/kg bounds every state either side.
  specificEnthalpy: { min: -10_000, max: 10_000 },
  // Water ≈ 4.2, steam near the critical point up to a few hundred: 0 to 1000 kJ/(kg·K).
  specificHeatCapacity: { min: 0, max: 1000 },
  // IF97 entropies lie between 0 and ≈ 12 kJ/(kg·K); 100 leaves room for any liquor datum.
  specificEntropy: { min: -100, max: 100 },
  // 10 GW: a steam duty of 10 000 kg/s × ≈ 2 000 kJ/kg is 20 GW; 1e8 kW bounds it generously.
  power: { min: 0, max: 1e8 },
  // 1e6 m² is larger than any heat-transfer surface built; a body is tens to a few thousand m².
  area: { min: 0, max: 1e6 },
  // U of evaporators is 100–7 000 W/(m²·K) (common practice); 1 to 20 000 spans fouled gas-side
  // exchangers to dropwise condensation.
  heatTransferCoefficient: { min: 1, max: 20_000 },
  massFraction: { min: 0, max: 1 },
  // A liquid column or tube: up to 1 km bounds any vessel (evaporator heads are 0–30 m).
  length: { min: 0, max: 1000 },
  fraction: { min: 0, max: 1 },
  // Water ≈ 1000, the densest liquors a few thousand; 30 000 kg/m³ is above any substance at
  // ordinary pressure (osmium ≈ 22 600, common practice).
  density: { min: 0, max: 30_000 },
  // Evaporating water by electric heating alone takes ≈ 700 kWh/t; 100 000 kWh/t bounds any
  // machine's consumption per tonne.
  specificEnergy: { min: 0, max: 100_000 },
  // Liquor in evaporator tubes moves at 0.3–3 m/s (common practice); 50 m/s bounds any liquid flow.
  velocity: { min: 0, max: 50 },
  // Falling films are fed at ≈ 0.05–3 kg/(m·s) (common practice); 100 is far beyond any film.
  wettingRate: { min: 0, max: 100 },
  // TEMA's typical values are 1e-5 to 1e-3 m²·K/W; 0.1 (U below 10 W/(m²·K)) is no evaporator.
  foulingResistance: { min: 0, max: 0.1 },
  // Plastics ≈ 0.2, copper ≈ 400, diamond ≈ 2000 W/(m·K) (common practice): 0.01 to 5000.
  thermalConductivity: { min: 0, max: 5000 },
  // Water ≈ 0.3–1.8 mPa·s, molasses and black liquor up to ≈ 10⁵ mPa·s (common practice).
  viscosity: { min: 0, max: 1e6 },
  // Evaporator heating surfaces carry 5–100 kW/m² (common practice); 10 000 kW/m² is beyond boiling crisis.
  heatFlux: { min: 0, max: 10_000 },
};

/** A kind's physical range, tightened by a field's own bounds where it has them. */
function within(kind: QuantityKind, own: QuantityRange = {}): QuantitySpec {
  const phys = physicalRanges[kind];
  return {
    kind,
    min: Math.max(own.min ?? phys.min, phys.min),
    max: Math.min(own.max ?? phys.max, phys.max),
    ...(own.minExclusive ? { minExclusive: true } : {}),
  };
}

/**
 * The input quantities of the v1 API with their ranges in default units: each kind's physical
 * range ({@link physicalRanges}), narrowed where a field needs it (a flow must be > 0). The
 * contracts use them to check plain numbers; the server uses the same specs to check strings
 * after unit conversion.
 */
export const specs = {
  pressure: within('pressure'),
  temperature: within('temperature'),
  massFraction: within('massFraction'),
  massFlow: within('massFlow', { min: 0, minExclusive: true }),
  bleedFlow: within('massFlow'),
  enthalpy: within('specificEnthalpy'),
  superheat: within('temperatureDifference'),
  heatTransferCoefficient: within('heatTransferCoefficient'),
  area: within('area', { min: 0, minExclusive: true }),
  liquidHeight: within('length', { max: 30 }),
  heatLossFraction: within('fraction', { max: 0.5 }),
  // Evaporator tubes are 20–80 mm across (common practice); 0.5 m and 50 mm of wall bound any tube.
  tubeDiameter: within('length', { min: 0, minExclusive: true, max: 0.5 }),
  wallThickness: within('length', { min: 0, minExclusive: true, max: 0.05 }),
  // Evaporator tubes are 1–16 m long (common practice); 30 m bounds them.
  tubeLength: within('length', { min: 0, minExclusive: true, max: 30 }),
  wallConductivity: within('thermalConductivity', { min: 0, minExclusive: true }),
  wettingRate: within('wettingRate', { min: 0, minExclusive: true }),
  flowPerTube: within('massFlow', { min: 0, minExclusive: true, max: 100 }),
  // A tube that evaporates all its feed runs dry: 0.95 is the most a film may lose.
  evaporatedFraction: within('fraction', { max: 0.95 }),
  tubeVelocity: within('velocity', { min: 0, minExclusive: true, max: 10 }),
  foulingResistance: within('foulingResistance'),
  viscosity: within('viscosity', { min: 0, minExclusive: true }),
  thermalConductivity: within('thermalConductivity', { min: 0, minExclusive: true }),
  density: within('density', { min: 0, minExclusive: true }),
  heatCapacity: within('specificHeatCapacity', { min: 0, minExclusive: true }),
  // The summit of Everest is ≈ 34 kPa, a deep mine ≈ 110 kPa (common practice): a local
  // barometric pressure outside 30–110 kPa is a typing slip.
  atmosphericPressure: { ...within('pressure', { min: 30, max: 110 }), atmosphere: true as const },
} satisfies Record<string, QuantitySpec>;

/**
 * Thresholds on the heating side above which a result carries a warning (data in `warnings`, not
 * a log line): the case still computes but is unusual for an evaporator.
 */
export const heatingWarningThresholds = {
  /** Steam superheat above 50 K: the chest works partly as a gas cooler and U falls (common practice). */
  steamSuperheat: 50,
  /** ΔT across a heating surface above 60 K: film boiling and fouling risk (common practice). */
  temperatureDifference: 60,
} as const;

/** A number for a message: grouped thousands ("10 000"), plain otherwise. */
function plain(v: number): string {
  return Math.abs(v) >= 10_000 && Number.isInteger(v) && Math.abs(v) < 1e15
    ? v.toLocaleString('en-US').replace(/,/g, ' ')
    : String(v);
}

/** The unit words after a range: a fraction's label already states 0–1, so it is named, not repeated. */
function rangeUnit(kind: QuantitySpec['kind']): string {
  if (kind === 'massFraction') return '(mass fraction)';
  if (kind === 'fraction') return '(fraction)';
  return defaultUnits[kind].label;
}

/** Human-readable range in default units, e.g. "0 to 1 (mass fraction)", "above 0 to 10 000 kg/s". */
export function describeRange(spec: QuantitySpec): string {
  const unit = rangeUnit(spec.kind);
  if (spec.min !== undefined && spec.max !== undefined) {
    return `${spec.minExclusive ? 'above ' : ''}${plain(spec.min)} to ${plain(spec.max)} ${unit}`;
  }
  const lo = spec.min === undefined ? undefined : `${spec.minExclusive ? '>' : '≥'} ${plain(spec.min)}`;
  const hi = spec.max === undefined ? undefined : `≤ ${plain(spec.max)}`;
  return [lo, hi].filter(Boolean).join(' and ') + ` ${unit}`;
}

/** True if a value in default units lies in the spec's range. */
export function inRange(spec: QuantityRange, value: number): boolean {
  if (!Number.isFinite(value)) return false;
  if (spec.min !== undefined && (spec.minExclusive ? value <= spec.min : value < spec.min)) return false;
  if (spec.max !== undefined && value > spec.max) return false;
  return true;
}

/** "1.2e+29 kg/s lies outside the accepted range above 0 to 10 000 kg/s" (value in the default unit). */
export function outOfRangeMessage(spec: QuantitySpec, value: number): string {
  // A plain 60 for a fraction is almost always a percent.
  if ((spec.kind === 'massFraction' || spec.kind === 'fraction') && value > 1 && value <= 100) {
    const percent = Number((value / 100).toPrecision(12));
    const fits = inRange(spec, percent) ? `; did you mean "${value} %" (${percent})?` : '';
    return `${value} lies outside the accepted range ${describeRange(spec)}${fits}`;
  }
  return `${value} ${defaultUnits[spec.kind].label} lies outside the accepted range ${describeRange(spec)}`;
}

/**
 * The one grammar of units, stated once in the API's description (each quantity field points at
 * it). server/units implements it (server/units/grammar.ts).
 */
export const UNIT_GRAMMAR = [
  '## Quantities and units',
  '',
  'Every quantity input is a number in the default unit of its kind (°C, kPa absolute, kg/s, kJ/kg, kJ/(kg·K), kW, m², W/(m²·K), mass fraction 0–1, m, kg/m³, m/s, kg/(m·s), m²·K/W, W/(m·K), mPa·s, kW/m², kWh/t) or a string "number unit". Results are in the default units; so are the values and ranges in warnings and problems.',
  '',
  'Compound units follow one grammar:',
  '- products: a space, `.`, `*`, `·` or `-` (`kJ/kg-K`, `W/(m2.K)`);',
  '- exponents: `^2`, a trailing digit or a superscript (`m^2`, `m2`, `m²`);',
  '- division: `/` or `per`; everything after the first `/` is the denominator, so `W/m2-K`, `W/m^2 K`, `W/(m2*K)` and `W/m2/K` all mean W/(m²·K);',
  '- unit names ignore case where that is unambiguous (`BTU/(h ft2 F)`, `btu/hr-ft2-F`); one-letter units and a leading m/M prefix keep their case (`MW` is not `mW`);',
  '- inside a compound, K, °C (C, degC) and °F (F, degF) are temperature differences.',
  '',
  'Examples: `1.2 kW/(m^2 K)`, `1200 W/m2-K`, `250 BTU/(h ft2 F)`, `4.5 t/h`, `12 kg/min`, `300 t/d`, `20 klb/h`, `9000 lb/h`, `420 kJ/kg`, `3.9 kJ/kg-K`, `2.5 MW`, `1300 ft2`.',
  '',
  'Special spellings:',
  '- pressures are absolute unless marked: `bar`, `bara`, `bar(a)`, `kPa(a)`, `psia`, `mbar`, `mmHg`, `inHg(a)`; gauge: `barg`, `bar(g)`, `kPag`, `psig`, `mbarg`; vacuum below the atmosphere: `inHg vac`, `mmHg vac`. A bare `inHg` is refused as ambiguous (in plants it usually reads a vacuum). Gauge and vacuum readings refer to 101.325 kPa unless the request states its own `atmosphericPressure` (at the top level of any request that takes a pressure; itself an absolute pressure);',
  '- `t`, `T` and `tonne` are metric tonnes; a US short ton only when spelled out (`short ton/h`); a bare `ton` is refused;',
  '- temperatures: `°C`, `degC`, `C`, `K`, `°F`, `degF`, `F`;',
  '- mass fractions: `0.45`, `45 %`, `45 wt%`, `45 wt.%`, `35 g/kg` or `35 ppt` (salinity, parts per thousand), `ppm`; `°Bx`/`Bx` (degrees Brix) only for the sucrose liquor. A plain number above 1 is refused with a hint (`60` → did you mean `60 %`?).',
].join('\n');

/** Longest unit string accepted ("1.4 bar", "38 degC"): anything longer is not a quantity. */
export const MAX_QUANTITY_STRING = 64;

/**
 * A quantity input: a number in the default unit or a string with a unit. A plain number is
 * range-checked here; a string is converted and range-checked by the server (server/units),
 * against the same range. A failed range check carries `params.validRange` for the problem's
 * `errors` list.
 */
/**
 * A quantity input. `example` is what the documentation pre-fills; leave it undefined for a field
 * that is an alternative to another one (pre-filling both would send a request that is refused).
 */
export function quantity(spec: QuantitySpec, description: string, example: number | string | undefined) {
  const unit = defaultUnits[spec.kind];
  // The bounds of the number branch, as JSON Schema keywords, so OpenAPI shows them; zod itself
  // checks them in the refinement below (one message form for numbers and converted strings).
  const bounds = {
    ...(spec.min === undefined
      ? {}
      : spec.minExclusive
        ? { exclusiveMinimum: spec.min }
        : { minimum: spec.min }),
    ...(spec.max === undefined ? {} : { maximum: spec.max }),
  };
  const schema = z
    .union([z.number().meta(bounds), z.string().trim().min(1).max(MAX_QUANTITY_STRING)])
    .superRefine((value, ctx) => {
      if (typeof value === 'number' && !inRange(spec, value)) {
        ctx.addIssue({
          code: 'custom',
          message: outOfRangeMessage(spec, value),
          params: { validRange: { min: spec.min ?? null, max: spec.max ?? null, unit: unit.symbol } },
        });
      }
    })
    .meta({
      description:
        `${description}. A number in ${unit.label}, or a string with a unit ` +
        `(e.g. ${unit.examples.map((e) => `"${e}"`).join(', ')}; grammar: see "Quantities and units" in the API description). ` +
        `Accepted range: ${describeRange(spec)}, checked after conversion.`,
      ...(example === undefined ? {} : { example }),
      'x-unit': unit.symbol,
      'x-quantity-kind': spec.kind,
    });
  quantitySpecs.set(schema, spec);
  return schema;
}

/** The spec of each schema made by {@link quantity}: what the server converts to SI, and how. */
const quantitySpecs = new WeakMap<object, QuantitySpec>();

/** The spec (kind and range) of a quantity schema, or undefined for any other schema. */
export function quantitySpecOf(schema: object): QuantitySpec | undefined {
  return quantitySpecs.get(schema);
}

export type QuantityInput = number | string;

/**
 * The request's own atmosphere, at the top level of every request that takes a pressure: gauge
 * and vacuum readings of that request (barg, psig, inHg vac) refer to it instead of 101.325 kPa.
 */
export function atmosphericPressureField() {
  return quantity(
    specs.atmosphericPressure,
    'The local atmospheric (barometric) pressure that gauge and vacuum readings of this request refer to (default 101.325 kPa, one standard atmosphere)',
    undefined,
  ).optional();
}

/** An output number in the default unit of its kind (or an explicit unit). */
export function out(kind: QuantityKind | { symbol: string; label: string }, description: string) {
  const unit = typeof kind === 'string' ? defaultUnits[kind] : kind;
  return z.number().meta({ description: `${description}, ${unit.label}`, 'x-unit': unit.symbol });
}

export const RangeSchema = z
  .object({
    min: z.number().nullable().meta({ description: 'Lower bound, in `unit` (null: unbounded)' }),
    max: z.number().nullable().meta({ description: 'Upper bound, in `unit` (null: unbounded)' }),
    unit: z.string().meta({ description: 'Unit of min and max (display units)', example: 'kPa' }),
  })
  .meta({ id: 'ValidRange', description: 'A range in display units.' });
export type ValidRangeDto = z.infer<typeof RangeSchema>;

export const WarningSchema = z
  .object({
    code: z.string().meta({ description: 'Stable kebab-case code', example: 'model-extrapolated' }),
    message: z.string(),
    field: z.string().optional().meta({
      description: 'Request field the warning is about (dotted path)',
      example: 'product.massFraction',
    }),
    validRange: RangeSchema.optional(),
  })
  .meta({
    id: 'Warning',
    description: 'A calculation warning: the result is returned but deserves attention.',
  });
export type WarningDto = z.infer<typeof WarningSchema>;

export const CautionSchema = z
  .object({
    code: z.string().meta({ example: 'hot-caustic' }),
    message: z.string(),
  })
  .meta({ id: 'Caution', description: 'A safety caution that applies to this calculation.' });
export type CautionDto = z.infer<typeof CautionSchema>;

export const ProvenanceSchema = z
  .object({
    engineVersion: z.string().meta({ description: 'Version of the calculation engine', example: '0.1.0' }),
    models: z
      .array(
        z.object({
          id: z.string().meta({ example: 'iapws-if97' }),
          source: z.string().meta({ description: 'Published source of the model' }),
          version: z.int().min(1).optional().meta({
            description: 'For a stored liquor (id custom:<liquorId>): the version of its definition used',
          }),
        }),
      )
      .meta({ description: 'Every property model used (IF97 and each liquor model)' }),
  })
  .meta({
    id: 'Provenance',
    description: 'What produced this result, so a logged result can be traced and reproduced.',
  });
export type ProvenanceDto = z.infer<typeof ProvenanceSchema>;

export const ProblemFieldErrorSchema = z
  .object({
    field: z.string().meta({ description: 'Dotted path of the request field', example: 'feed.massFraction' }),
    message: z.string(),
    value: z.unknown().optional().meta({ description: 'The value received' }),
    validRange: RangeSchema.optional(),
    acceptedUnits: z.array(z.string()).optional().meta({ description: 'Units accepted for this field' }),
  })
  .meta({ id: 'ProblemFieldError' });

export const ProblemSchema = z
  .object({
    type: z.string().meta({
      description: 'URI identifying the problem type',
      example: 'https://ebullio.example/problems/validation-failed',
    }),
    title: z.string().meta({ example: 'The request is not valid' }),
    status: z.int().meta({ example: 422 }),
    detail: z.string().optional(),
    instance: z.string().optional(),
    errors: z.array(ProblemFieldErrorSchema).optional(),
  })
  .meta({
    id: 'Problem',
    description:
      'RFC 9457 problem details (application/problem+json). Types used by the calculation API: ' +
      'validation-failed, unit-not-recognised, out-of-range, no-solution, inconsistent-input (422); ' +
      'bad-request, malformed-json (400); unauthorized (401); forbidden (403); not-found (404); ' +
      'payload-too-large (413); quota-exceeded, rate-limited (429).',
  });
export type ProblemDto = z.infer<typeof ProblemSchema>;

/** A kebab-case identifier (liquor ids). */
export const IdSchema = z
  .string()
  .min(1)
  .max(64)
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, {
    error: 'must be kebab-case: lower-case letters, digits and single hyphens',
  });

/**
 * Property names that would reach an object's prototype: refused as a request body's keys
 * (server/http/middleware/body.ts) and as segments of a field path (sweeps).
 */
export const PROTOTYPE_KEYS: readonly string[] = ['__proto__', 'constructor', 'prototype'];
