/**
 * Unit conversion at the edge: quantity inputs (a number in the default unit of its kind, or a
 * string with a unit) → SI, driven by the contracts. Each `quantity(spec, …)` schema in
 * shared/contracts carries its spec (kind and range); {@link siPlan} walks a request schema once,
 * at start-up, and lists where its quantities are, and {@link toSI} converts a parsed request in
 * place along that list. Handlers receive SI numbers.
 */
import {
  defaultUnits,
  inRange,
  outOfRangeMessage,
  quantitySpecOf,
  type QuantityInput,
  type QuantityKind,
  type QuantitySpec,
} from '../../shared/contracts/index.js';
import { fromDefaultUnit, parseQuantity, type ParseContext } from '../units/index.js';
import { toProblem } from './engine-errors.js';
import { messageNumber, roundForDisplay, siToDisplay } from './output.js';
import { problem } from './problem.js';

/** Display (default) unit of its kind → SI. */
export function displayToSI(value: number, kind: QuantityKind): number {
  return fromDefaultUnit(value, kind);
}

/**
 * A quantity input → SI. Numbers are in the default unit of the kind (already range-checked by
 * the contract); strings carry a unit and are converted by server/units, then range-checked
 * against the same contract range (422 'validation-failed' with the range in display units).
 */
export function readQuantity(
  input: QuantityInput,
  spec: QuantitySpec,
  field: string,
  context?: ParseContext,
): number {
  if (typeof input === 'number') return displayToSI(input, spec.kind);
  let si: number;
  try {
    // a bare number in a string is read in the default unit by server/units itself
    si = parseQuantity(input, spec.kind, field, spec.difference ? { ...context, difference: true } : context);
  } catch (err) {
    throw toProblem(err);
  }
  const display = siToDisplay(si, spec.kind);
  if (!inRange(spec, display)) {
    const unit = defaultUnits[spec.kind].symbol;
    // Rounded for reading, with the digits it takes not to look equal to the bound it crossed.
    const shown =
      [4, 6, 8, 12]
        .map((d) => messageNumber(display, spec.kind, d))
        .find((v) => v !== spec.min && v !== spec.max) ?? roundForDisplay(display);
    const message = outOfRangeMessage(spec, shown);
    throw problem('validation-failed', `${field}: "${input}" = ${message}`, {
      errors: [
        {
          field,
          message: `"${input}" = ${message}`,
          value: input,
          validRange: { min: spec.min ?? -Infinity, max: spec.max ?? Infinity, unit },
        },
      ],
    });
  }
  return si;
}

/**
 * Where the quantities of a request schema are: a tree that mirrors the schema's objects and
 * arrays down to each `quantity(…)` field, with the field's dotted path ("feed.massFlow",
 * "vaporBleeds[#].massFlow", `#` standing for an array index). Built once per schema.
 */
type SiNode =
  | { readonly spec: QuantitySpec; readonly path: string }
  | { readonly fields: readonly (readonly [string, SiNode])[] }
  | { readonly items: SiNode }
  /** A union of a quantity and an object (U or `{ estimate }`): chosen by the value's shape. */
  | { readonly scalar: SiNode | undefined; readonly object: SiNode | undefined };

interface ZodInternals {
  _zod: {
    def: {
      type: string;
      innerType?: object;
      shape?: Record<string, object>;
      element?: object;
      options?: readonly object[];
    };
  };
}

function compile(schema: object, path: string): SiNode | undefined {
  const spec = quantitySpecOf(schema);
  if (spec) return { spec, path };
  const def = (schema as ZodInternals)._zod.def;
  switch (def.type) {
    case 'optional':
    case 'nullable':
    case 'default':
    case 'readonly':
      return def.innerType ? compile(def.innerType, path) : undefined;
    case 'object': {
      const fields: [string, SiNode][] = [];
      for (const [key, child] of Object.entries(def.shape ?? {})) {
        const node = compile(child, path ? `${path}.${key}` : key);
        if (node) fields.push([key, node]);
      }
      return fields.length > 0 ? { fields } : undefined;
    }
    case 'array': {
      const items = def.element ? compile(def.element, `${path}[#]`) : undefined;
      return items ? { items } : undefined;
    }
    case 'union': {
      // A quantity or an object (U as a number or `{ estimate: … }`): one branch of each kind at
      // most; other unions hold no quantity.
      let scalar: SiNode | undefined;
      let object: SiNode | undefined;
      for (const option of def.options ?? []) {
        const node = compile(option, path);
        if (!node) continue;
        if ('spec' in node) scalar = node;
        else object = node;
      }
      return scalar || object ? { scalar, object } : undefined;
    }
    default:
      // Records and the rest hold no quantity of the v1 contracts (a liquor definition is in
      // display units and converted by the liquor service).
      return undefined;
  }
}

/** The conversion plan of a request schema (undefined: it has no quantity fields). */
export type SiPlan = SiNode | undefined;

/** Walks a request schema once (at start-up) for the quantities {@link toSI} converts. */
export function siPlan(schema: object): SiPlan {
  return compile(schema, '');
}

/** A parsed request with every quantity (number | string) turned into an SI number. */
export type SI<T> = [NonNullable<T>] extends [QuantityInput]
  ? [QuantityInput] extends [NonNullable<T>]
    ? number | Extract<T, undefined>
    : T
  : T extends readonly (infer U)[]
    ? SI<U>[]
    : T extends object
      ? { [K in keyof T]: SI<T[K]> }
      : T;

/** The indices of the arrays being walked, innermost last (paths are built only for strings). */
const indexStack: number[] = [];

/**
 * The request's atmosphere and liquor while {@link toSI} walks it (synchronous, so one at a time):
 * gauge and vacuum readings of every field refer to the request's `atmosphericPressure`.
 */
let current: ParseContext | undefined;

function concretePath(template: string): string {
  if (indexStack.length === 0) return template;
  let i = 0;
  return template.replace(/#/g, () => String(indexStack[i++]));
}

function convert(node: SiNode, value: unknown): unknown {
  if ('spec' in node) {
    if (typeof value === 'number') return displayToSI(value, node.spec.kind);
    return readQuantity(value as QuantityInput, node.spec, concretePath(node.path), current);
  }
  if ('scalar' in node) {
    const isObject = value !== null && typeof value === 'object' && !Array.isArray(value);
    const branch = isObject ? node.object : node.scalar;
    return branch ? convert(branch, value) : value;
  }
  if (value === null || typeof value !== 'object') return value;
  if ('items' in node) {
    const list = value as unknown[];
    const depth = indexStack.length;
    try {
      for (let i = 0; i < list.length; i++) {
        indexStack[depth] = i;
        list[i] = convert(node.items, list[i]);
      }
    } finally {
      indexStack.length = depth;
    }
    return list;
  }
  const record = value as Record<string, unknown>;
  for (const [key, child] of node.fields) {
    const v = record[key];
    if (v !== undefined) record[key] = convert(child, v);
  }
  return record;
}

/**
 * Converts, in place, every quantity of a request parsed by its contract to SI: plain numbers
 * from the kind's default unit, strings through server/units and then checked against the
 * field's range (422 'validation-failed' naming the field, the range in display units).
 */
export function toSI<T>(plan: SiPlan, parsed: T, context: { liquor?: string } = {}): SI<T> {
  if (!plan) return parsed as SI<T>;
  current = { ...context };
  try {
    // The atmosphere first (itself absolute), so that every gauge reading can refer to it.
    const fields = 'fields' in plan ? plan.fields : undefined;
    const atmosphere = fields?.find(([, n]) => 'spec' in n && n.spec.atmosphere);
    const record = parsed as Record<string, unknown> | null;
    if (atmosphere && record && typeof record === 'object' && record[atmosphere[0]] !== undefined) {
      const node = atmosphere[1] as { spec: QuantitySpec; path: string };
      const value = record[atmosphere[0]] as QuantityInput;
      const si =
        typeof value === 'number'
          ? displayToSI(value, node.spec.kind)
          : readQuantity(value, node.spec, node.path, { absoluteOnly: true });
      record[atmosphere[0]] = si;
      current.atmosphere = si;
      const rest = { fields: fields!.filter((f) => f !== atmosphere) };
      return convert(rest, parsed) as SI<T>;
    }
    return convert(plan, parsed) as SI<T>;
  } finally {
    current = undefined;
  }
}
