/**
 * The workbench's form, built from an operation's request schema (JSON Schema generated on the
 * server from the API's zod contract): no form code per operation. A schema becomes a tree of
 * fields — quantities (a number in the default unit or text with a unit, as engineers type
 * "20 kPa" or "4.5 t/h"), numbers, text, choices (enums), switches, sections (nested objects) and,
 * for what a form cannot show well (lists, alternatives between objects), a JSON box. The body
 * itself is the one source of truth: fields read and write it at their dotted paths, the same
 * paths the API's problems name, so a refusal is shown beside its field.
 */

export type JsonSchema = Record<string, unknown>;

interface Base {
  /** Dotted path in the body, as the API names fields in problems: `feed.massFlow`, `effects[0]`. */
  path: string;
  /** The property's own name. */
  name: string;
  /** A readable label made from the name (`massFlow` → "Mass flow"). */
  label: string;
  description?: string;
  required: boolean;
  /** The schema's default, shown as the placeholder of an optional field. */
  defaultValue?: unknown;
}

export interface QuantityField extends Base {
  kind: 'quantity';
  /** The default unit of the number (`kPa`, `kg/s`, `1` for fractions). */
  unit: string;
  quantityKind: string;
  min?: number;
  max?: number;
  /** Also accepts an object (e.g. U as `{ estimate }`), edited in the JSON tab. */
  orObject?: boolean;
}
export interface NumberField extends Base {
  kind: 'number';
  integer: boolean;
  min?: number;
  max?: number;
}
export interface TextField extends Base {
  kind: 'text';
  /** Also accepts an object (e.g. an inline liquor definition), edited in the JSON tab. */
  orObject: boolean;
}
export interface ChoiceField extends Base {
  kind: 'choice';
  options: (string | number)[];
}
export interface SwitchField extends Base {
  kind: 'switch';
}
export interface JsonField extends Base {
  kind: 'json';
}
export interface SectionField extends Base {
  kind: 'section';
  fields: FormField[];
}
export type FormField =
  QuantityField | NumberField | TextField | ChoiceField | SwitchField | JsonField | SectionField;

/** `massFlow` → "Mass flow", `overallHeatTransferCoefficient` → "Overall heat transfer coefficient". */
export function labelOf(name: string): string {
  const words = name
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/[-_]+/g, ' ')
    .toLowerCase()
    .trim();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/** Follows `$ref: "#/$defs/X"` (and one level of `allOf` with a single entry) within `root`. */
export function resolve(schema: JsonSchema, root: JsonSchema): JsonSchema {
  let s = schema;
  for (let guard = 0; guard < 20; guard++) {
    const ref = s.$ref;
    if (typeof ref === 'string' && ref.startsWith('#/$defs/')) {
      const defs = (root.$defs ?? {}) as Record<string, JsonSchema>;
      const target = defs[ref.slice('#/$defs/'.length)];
      if (!target) return s;
      // The referring schema's own words (description, default) win over the definition's.
      const { $ref: _ref, ...own } = s;
      s = { ...target, ...own };
      continue;
    }
    const all = s.allOf;
    if (Array.isArray(all) && all.length === 1) {
      const { allOf: _all, ...own } = s;
      s = { ...(all[0] as JsonSchema), ...own };
      continue;
    }
    return s;
  }
  return s;
}

function typesOf(s: JsonSchema): string[] {
  const t = s.type;
  if (typeof t === 'string') return [t];
  if (Array.isArray(t)) return t.filter((x): x is string => typeof x === 'string');
  return [];
}

function numberBound(s: JsonSchema, key: 'minimum' | 'maximum' | 'exclusiveMinimum'): number | undefined {
  const v = s[key];
  return typeof v === 'number' ? v : undefined;
}

function quantityOf(s: JsonSchema, base: Base): QuantityField {
  const numberBranch = ((s.anyOf as JsonSchema[] | undefined) ?? []).find((b) => b.type === 'number') ?? s;
  const min = numberBound(numberBranch, 'minimum') ?? numberBound(numberBranch, 'exclusiveMinimum');
  const max = numberBound(numberBranch, 'maximum');
  return {
    ...base,
    kind: 'quantity',
    unit: typeof s['x-unit'] === 'string' ? s['x-unit'] : '',
    quantityKind: String(s['x-quantity-kind']),
    ...(min === undefined ? {} : { min }),
    ...(max === undefined ? {} : { max }),
  };
}

function fieldOf(
  schema: JsonSchema,
  root: JsonSchema,
  path: string,
  name: string,
  required: boolean,
): FormField {
  const s = resolve(schema, root);
  const base: Base = {
    path,
    name,
    label: labelOf(name),
    required,
    ...(typeof s.description === 'string' ? { description: s.description } : {}),
    ...('default' in s ? { defaultValue: s.default } : {}),
  };
  if (typeof s['x-quantity-kind'] === 'string') return quantityOf(s, base);
  if (Array.isArray(s.enum)) {
    return {
      ...base,
      kind: 'choice',
      options: s.enum.filter((v) => typeof v === 'string' || typeof v === 'number'),
    };
  }
  if ('const' in s && (typeof s.const === 'string' || typeof s.const === 'number')) {
    return { ...base, kind: 'choice', options: [s.const] };
  }
  const alternatives = (s.anyOf ?? s.oneOf) as JsonSchema[] | undefined;
  if (Array.isArray(alternatives)) {
    const branches = alternatives.map((b) => resolve(b, root));
    // Choices spread over branches (an enum here, a const there) are one choice.
    const choices = branches.flatMap((b) =>
      Array.isArray(b.enum) ? (b.enum as unknown[]) : 'const' in b ? [b.const] : [undefined],
    );
    if (choices.every((c) => typeof c === 'string' || typeof c === 'number')) {
      return { ...base, kind: 'choice', options: choices as (string | number)[] };
    }
    // A quantity or an object (U given, or estimated from `{ estimate }`): the quantity in the
    // form, the object in the JSON tab.
    const quantities = branches.filter((b) => typeof b['x-quantity-kind'] === 'string');
    if (
      quantities.length === 1 &&
      branches.every((b) => b === quantities[0] || typesOf(b).includes('object'))
    ) {
      return { ...quantityOf(quantities[0]!, base), orObject: true };
    }
    const simple = branches.filter((b) => typesOf(b).some((t) => t === 'string' || t === 'number'));
    const objects = branches.filter((b) => typesOf(b).includes('object'));
    if (simple.length === 1 && simple.length + objects.length === branches.length) {
      const only = simple[0]!;
      if (typesOf(only).includes('string')) return { ...base, kind: 'text', orObject: objects.length > 0 };
    }
    return { ...base, kind: 'json' };
  }
  const types = typesOf(s);
  if (types.includes('object') && s.properties && typeof s.properties === 'object') {
    const req = new Set(Array.isArray(s.required) ? (s.required as string[]) : []);
    const fields = Object.entries(s.properties as Record<string, JsonSchema>).map(([key, child]) =>
      fieldOf(child, root, path === '' ? key : `${path}.${key}`, key, req.has(key)),
    );
    return { ...base, kind: 'section', fields };
  }
  if (types.includes('boolean')) return { ...base, kind: 'switch' };
  if (types.includes('number') || types.includes('integer')) {
    const min = numberBound(s, 'minimum') ?? numberBound(s, 'exclusiveMinimum');
    const max = numberBound(s, 'maximum');
    return {
      ...base,
      kind: 'number',
      integer: types.includes('integer') && !types.includes('number'),
      ...(min === undefined ? {} : { min }),
      ...(max === undefined ? {} : { max }),
    };
  }
  if (types.includes('string')) return { ...base, kind: 'text', orObject: false };
  return { ...base, kind: 'json' };
}

/** The fields of a request schema (its top-level properties, nested sections within). */
export function formFields(schema: JsonSchema): FormField[] {
  const root = fieldOf(schema, schema, '', '', true);
  return root.kind === 'section' ? root.fields : [root];
}

/** Every field that holds one value (not sections), in form order. */
export function leafFields(fields: readonly FormField[]): Exclude<FormField, SectionField>[] {
  return fields.flatMap((f) => (f.kind === 'section' ? leafFields(f.fields) : [f]));
}

/** `feed.massFlow`, `effects[0].area` → ['feed', 'massFlow'], ['effects', 0, 'area']. */
export function pathSegments(path: string): (string | number)[] {
  return path
    .split(/\.|\[(\d+)\]/)
    .filter((k) => k !== undefined && k !== '')
    .map((k) => (/^\d+$/.test(k) ? Number(k) : k));
}

/** Names the form never writes: they would reach an object's prototype. */
const FORBIDDEN = new Set(['__proto__', 'constructor', 'prototype']);

/** The value at a dotted path (undefined when absent). */
export function getAt(body: unknown, path: string): unknown {
  let node: unknown = body;
  for (const key of pathSegments(path)) {
    if (node === null || typeof node !== 'object') return undefined;
    if (!Object.hasOwn(node, key)) return undefined;
    node = (node as Record<string | number, unknown>)[key];
  }
  return node;
}

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

/**
 * A copy of `body` with `value` at `path` (copied along the path only). `undefined` removes the
 * field, and a section left empty by that is removed too, so an optional part not filled in is
 * not sent at all.
 */
export function setAt(body: unknown, path: string, value: unknown): Record<string, unknown> {
  const keys = pathSegments(path);
  if (keys.some((k) => typeof k === 'string' && FORBIDDEN.has(k))) {
    throw new Error(`"${path}" is not a field name the workbench writes`);
  }
  const put = (node: unknown, i: number): unknown => {
    const key = keys[i]!;
    const last = i === keys.length - 1;
    if (typeof key === 'number') {
      const arr = Array.isArray(node) ? [...(node as unknown[])] : [];
      arr[key] = last ? value : put(arr[key], i + 1);
      return arr;
    }
    const obj: Record<string, unknown> = isPlainObject(node) ? { ...node } : {};
    const next = last ? value : put(Object.hasOwn(obj, key) ? obj[key] : undefined, i + 1);
    if (next === undefined || (isPlainObject(next) && Object.keys(next).length === 0 && !last))
      delete obj[key];
    else obj[key] = next;
    return obj;
  };
  return put(isPlainObject(body) ? body : {}, 0) as Record<string, unknown>;
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * What a typed entry sends: nothing for an empty box; a plain number as a number (in the
 * field's default unit); anything else as the text typed ("20 kPa", "3 barg"), which the API
 * converts or refuses naming the field.
 */
export function parseEntry(text: string): number | string | undefined {
  const t = text.trim();
  if (t === '') return undefined;
  if (NUMBER.test(t)) return Number(t);
  return t;
}

/** What a field's box shows for a body value. */
export function entryText(value: unknown): string {
  if (value === undefined || value === null) return '';
  if (typeof value === 'string') return value;
  if (typeof value === 'number' || typeof value === 'boolean') return String(value);
  return JSON.stringify(value);
}

/** The hint under a quantity field: its default unit and range, and that units may be typed. */
export function quantityHint(f: QuantityField): string {
  const unit = f.unit === '1' ? 'a fraction 0–1' : unitLabel(f.unit);
  const range =
    f.min !== undefined && f.max !== undefined
      ? `, ${f.min} to ${f.max}`
      : f.max !== undefined
        ? `, up to ${f.max}`
        : '';
  return `Number in ${unit}${range}, or with a unit`;
}

export interface FieldProblem {
  field: string;
  message: string;
}

/**
 * The problem's field messages by the form field they belong to: a message naming a path inside
 * a JSON box (`effects[1].area`) goes to that box; messages that name no field of the form are
 * returned apart, to be shown above the form.
 */
export function messagesByField(
  fields: readonly FormField[],
  errors: readonly FieldProblem[],
): { byField: Record<string, string[]>; other: FieldProblem[] } {
  const leaves = leafFields(fields);
  const byField: Record<string, string[]> = {};
  const other: FieldProblem[] = [];
  for (const e of errors) {
    const exact = leaves.find((f) => f.path === e.field);
    const within =
      exact ??
      leaves.find(
        (f) =>
          (f.kind === 'json' || f.kind === 'text') &&
          (e.field.startsWith(`${f.path}.`) || e.field.startsWith(`${f.path}[`)),
      );
    if (within)
      (byField[within.path] ??= []).push(e.field === within.path ? e.message : `${e.field}: ${e.message}`);
    else other.push(e);
  }
  return { byField, other };
}

/** Fields a sweep may vary: the quantities and plain numbers of the form. */
export function sweepableFields(fields: readonly FormField[]): (QuantityField | NumberField)[] {
  return leafFields(fields).filter(
    (f): f is QuantityField | NumberField => f.kind === 'quantity' || f.kind === 'number',
  );
}

/** A list of sweep values as typed: separated by commas or semicolons, each a number or a quantity. */
export function parseValueList(text: string): (number | string)[] {
  return text
    .split(/[;,\n]/)
    .map((v) => parseEntry(v))
    .filter((v): v is number | string => v !== undefined);
}

export type SweepSpec =
  | { field: string; values: (number | string)[] }
  | { field: string; from: number | string; to: number | string; steps: number; spacing?: 'log' };

/** The `vary` entry of a sweep from the form's choices. */
export function sweepVary(input: {
  field: string;
  mode: 'list' | 'range';
  list: string;
  from: string;
  to: string;
  steps: number;
  log: boolean;
}): SweepSpec {
  if (input.mode === 'list') return { field: input.field, values: parseValueList(input.list) };
  return {
    field: input.field,
    from: parseEntry(input.from) ?? '',
    to: parseEntry(input.to) ?? '',
    steps: input.steps,
    ...(input.log ? { spacing: 'log' as const } : {}),
  };
}

/**
 * The numbers of a result that can be charted, by dotted path (`area`, `steam.massFlow`,
 * `effects[0].temperature`): every finite number except those of `provenance`, `warnings` and
 * `cautions`.
 */
export function numericLeaves(result: unknown, prefix = '', out: string[] = []): string[] {
  if (Array.isArray(result)) {
    result.forEach((v, i) => numericLeaves(v, `${prefix}[${i}]`, out));
  } else if (isPlainObject(result)) {
    for (const [k, v] of Object.entries(result)) {
      if (prefix === '' && (k === 'provenance' || k === 'warnings' || k === 'cautions')) continue;
      numericLeaves(v, prefix === '' ? k : `${prefix}.${k}`, out);
    }
  } else if (typeof result === 'number' && Number.isFinite(result)) {
    out.push(prefix);
  }
  return out;
}

/**
 * The numbers worth plotting first: those that change from one succeeding row to the next (an
 * input echoed unchanged in every row draws a flat line), in result order.
 */
export function changingLeaves(rows: readonly SweepRow[]): string[] {
  const ok = rows.filter((r) => r.status === 'ok' && r.result);
  const first = ok[0]?.result;
  if (!first) return [];
  return numericLeaves(first).filter((path) => {
    const seen = new Set(ok.map((r) => getAt(r.result, path)));
    return seen.size > 1;
  });
}

/** The leading number of a swept value (`"20 kPa"` → 20), for the chart's axis. */
export function axisValue(v: unknown): number | null {
  if (typeof v === 'number') return Number.isFinite(v) ? v : null;
  if (typeof v !== 'string') return null;
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)/.exec(v);
  return m ? Number(m[1]) : null;
}

/** The unit typed after the number of a swept value (`"20 kPa"` → "kPa"), else undefined. */
export function typedUnit(v: unknown): string | undefined {
  if (typeof v !== 'string') return undefined;
  const unit = v.replace(/^\s*[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*/, '').trim();
  return unit === '' ? undefined : unit;
}

export interface SweepRow {
  values: Record<string, unknown>;
  status: 'ok' | 'error';
  result?: Record<string, unknown>;
}

/** One chart's points: the varied field's value against a result field, for the rows that succeeded. */
export function sweepSeries(
  rows: readonly SweepRow[],
  varied: string,
  resultField: string,
): { x: number; y: number }[] {
  const points: { x: number; y: number }[] = [];
  for (const row of rows) {
    if (row.status !== 'ok' || !row.result) continue;
    const x = axisValue(row.values[varied]);
    const y = getAt(row.result, resultField);
    if (x !== null && typeof y === 'number' && Number.isFinite(y)) points.push({ x, y });
  }
  return points;
}

/**
 * The unit (`x-unit`) of a number in an answer, found by its dotted path in the answer's schema
 * (through `$ref`s, object properties, array items and alternatives); undefined when not stated.
 */
export function unitAt(schema: JsonSchema | null, path: string): string | undefined {
  if (!schema) return undefined;
  const walk = (node: JsonSchema, keys: (string | number)[]): string | undefined => {
    const s = resolve(node, schema);
    const alternatives = (s.anyOf ?? s.oneOf) as JsonSchema[] | undefined;
    if (Array.isArray(alternatives)) {
      for (const b of alternatives) {
        const u = walk(b, keys);
        if (u !== undefined) return u;
      }
      return undefined;
    }
    if (keys.length === 0) return typeof s['x-unit'] === 'string' ? s['x-unit'] : undefined;
    const [key, ...rest] = keys;
    if (typeof key === 'number') return s.items ? walk(s.items as JsonSchema, rest) : undefined;
    const props = s.properties as Record<string, JsonSchema> | undefined;
    return props && Object.hasOwn(props, key!) ? walk(props[key!]!, rest) : undefined;
  };
  return walk(schema, pathSegments(path));
}

/** A unit symbol as people read it: `degC` → °C, `m2` → m², `1` (a ratio) → nothing. */
export function unitLabel(symbol: string | undefined): string {
  if (symbol === undefined || symbol === '1') return '';
  return symbol
    .replace(/degC/g, '°C')
    .replace(/degF/g, '°F')
    .replace(/([a-zA-Z])2\b/g, '$1²')
    .replace(/([a-zA-Z])3\b/g, '$1³')
    .replace(/\*/g, '·');
}

/** A result number for a table: at most 6 significant digits, no trailing noise. */
export function showNumber(v: number): string {
  if (v === 0) return '0';
  const abs = Math.abs(v);
  if (abs >= 1e6 || abs < 1e-4) return v.toPrecision(4);
  return String(Number(v.toPrecision(6)));
}

/** Every scalar of a result by dotted path, except provenance, warnings and cautions (shown apart). */
export function resultRows(result: unknown, prefix = '', out: { path: string; value: unknown }[] = []) {
  if (Array.isArray(result)) {
    result.forEach((v, i) => resultRows(v, `${prefix}[${i}]`, out));
  } else if (isPlainObject(result)) {
    for (const [k, v] of Object.entries(result)) {
      if (prefix === '' && (k === 'provenance' || k === 'warnings' || k === 'cautions')) continue;
      resultRows(v, prefix === '' ? k : `${prefix}.${k}`, out);
    }
  } else {
    out.push({ path: prefix, value: result });
  }
  return out;
}
