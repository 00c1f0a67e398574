/**
 * The boundary between HTTP and the engine: validate a request against its zod contract, convert
 * quantity inputs to SI, and turn every kind of failure into an RFC 9457 problem:
 *
 * - zod failure → 422 'validation-failed', one `errors` entry per issue with the dotted request
 *   path (`feed.massFraction`, `overallHeatTransferCoefficients[2]`), the value and, where the
 *   contract has one, the valid range in display units;
 * - UnitError (a string quantity in a unit we do not know, or of the wrong dimension) → 422
 *   'validation-failed' naming the field and the accepted units;
 * - EngineRangeError → 422 'out-of-range' with the engine's field mapped back to the request
 *   path (the route knows which request field fed which engine input), the value and range in
 *   display units;
 * - EngineInputError → 422 'validation-failed' naming the field; EngineNoSolutionError → 422
 *   'no-solution'.
 *
 * A final guard ({@link sendCalculation}) refuses to send a 2xx body holding NaN or ±Infinity.
 */
import type { Response } from 'express';
import type { z } from 'zod';
import {
  defaultUnits,
  inRange,
  outOfRangeMessage,
  type QuantityInput,
  type QuantityKind,
  type QuantitySpec,
  type ValidRangeDto,
  type WarningDto,
} from '../../shared/contracts/index.js';
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../engine/errors.js';
import type { EngineWarning } from '../engine/types.js';
import {
  fromDefaultUnit,
  parseQuantity,
  toDefaultUnit,
  UnitError,
  type QuantityKind as UnitsKind,
} from '../units/index.js';
import { problem, ProblemError, type ProblemFieldError } from './problem.js';

/** Our quantity kinds → the kinds of server/units. */
const UNITS_KIND: Record<QuantityKind, UnitsKind> = {
  temperature: 'temperature',
  temperatureDifference: 'temperatureDifference',
  pressure: 'pressure',
  massFlow: 'massFlow',
  specificEnthalpy: 'specificEnthalpy',
  specificHeatCapacity: 'heatCapacity',
  specificEntropy: 'heatCapacity',
  power: 'power',
  area: 'area',
  heatTransferCoefficient: 'heatTransferCoefficient',
  massFraction: 'massFraction',
  length: 'length',
  fraction: 'massFraction',
};

function parseWithUnit(text: string, kind: QuantityKind, field: string): number {
  return parseQuantity(text, UNITS_KIND[kind], field);
}
function isUnitError(err: unknown): err is UnitError {
  return err instanceof UnitError;
}

/** SI value → display (default) unit of its kind (server/units holds the unit table). */
export function siToDisplay(valueSI: number, kind: QuantityKind): number {
  return toDefaultUnit(valueSI, UNITS_KIND[kind]);
}

/** Display (default) unit of its kind → SI. */
export function displayToSI(value: number, kind: QuantityKind): number {
  return fromDefaultUnit(value, UNITS_KIND[kind]);
}

/** Dotted request path of a zod issue path: ['effects', 2, 'area'] → "effects[2].area". */
export function fieldPath(path: readonly PropertyKey[], prefix = ''): string {
  let out = prefix;
  for (const key of path) {
    if (typeof key === 'number') out += `[${key}]`;
    else out += out === '' ? String(key) : `.${String(key)}`;
  }
  return out;
}

function valueAt(input: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = input;
  for (const key of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[key];
  }
  return v;
}

/** JSON-safe echo of a received value (long strings and big objects are shortened). */
function echo(value: unknown): unknown {
  if (value === undefined) return undefined;
  if (typeof value === 'string') return value.length > 80 ? `${value.slice(0, 80)}…` : value;
  if (typeof value === 'number') return Number.isFinite(value) ? value : String(value);
  if (typeof value === 'boolean' || value === null) return value;
  return Array.isArray(value) ? '(array)' : '(object)';
}

type Issue = z.core.$ZodIssue;

/** For a failed union, the issues of the branch that got furthest (deepest path, then fewest issues). */
function bestUnionBranch(branches: Issue[][]): Issue[] {
  let best: Issue[] | undefined;
  let bestScore = -Infinity;
  for (const issues of branches) {
    const typeOnlyAtRoot = issues.every((i) => i.code === 'invalid_type' && i.path.length === 0);
    const depth = Math.max(0, ...issues.map((i) => i.path.length));
    const score = (typeOnlyAtRoot ? -100 : 0) + depth * 10 - issues.length;
    if (score > bestScore) {
      bestScore = score;
      best = issues;
    }
  }
  return best ?? [];
}

function issueToErrors(
  issue: Issue,
  basePath: readonly PropertyKey[],
  input: unknown,
  prefix: string,
): ProblemFieldError[] {
  const path = [...basePath, ...issue.path];
  if (issue.code === 'invalid_union' && issue.errors.length > 0) {
    return bestUnionBranch(issue.errors).flatMap((i) => issueToErrors(i, path, input, prefix));
  }
  if (issue.code === 'unrecognized_keys') {
    return issue.keys.map((key) => ({
      field: fieldPath([...path, key], prefix),
      message: 'is not a field of this request',
    }));
  }
  const value = valueAt(input, path);
  const entry: ProblemFieldError = {
    field: fieldPath(path, prefix) || '(body)',
    message: issue.code === 'invalid_type' && value === undefined ? 'is required' : issue.message,
  };
  const shown = echo(value);
  if (shown !== undefined) entry.value = shown;
  const range = (issue as { params?: { validRange?: ValidRangeDto } }).params?.validRange;
  if (range) {
    entry.validRange = { min: range.min ?? -Infinity, max: range.max ?? Infinity, unit: range.unit };
  } else if (issue.code === 'too_small' && typeof issue.minimum === 'number' && issue.origin === 'number') {
    entry.validRange = { min: issue.minimum, max: Infinity, unit: '' };
  } else if (issue.code === 'too_big' && typeof issue.maximum === 'number' && issue.origin === 'number') {
    entry.validRange = { min: -Infinity, max: issue.maximum, unit: '' };
  }
  return [entry];
}

/** The problem for a failed zod parse. */
export function zodProblem(error: z.ZodError, input: unknown, prefix = ''): ProblemError {
  const errors = error.issues.flatMap((i) => issueToErrors(i, [], input, prefix)).slice(0, 50);
  const first = errors[0];
  return problem(
    'validation-failed',
    first
      ? `${first.field}: ${first.message}${errors.length > 1 ? ` (and ${errors.length - 1} more)` : ''}`
      : undefined,
    { errors },
  );
}

/** Parses `input` with `schema`, or throws a 422 'validation-failed' ProblemError. */
export function validate<S extends z.ZodType>(schema: S, input: unknown, prefix = ''): z.output<S> {
  const result = schema.safeParse(input);
  if (!result.success) throw zodProblem(result.error, input, prefix);
  return result.data;
}

/** Engine field → request field, plus the quantity kind to show its value and range in. */
export interface FieldMapping {
  path: string;
  kind?: QuantityKind;
}
export type FieldMap = Record<string, string | FieldMapping>;

const SI_KIND_BY_UNIT: Record<string, QuantityKind> = {
  Pa: 'pressure',
  K: 'temperature',
  'J/kg': 'specificEnthalpy',
  'J/(kg·K)': 'specificHeatCapacity',
  'J/(kg*K)': 'specificHeatCapacity',
  W: 'power',
  'kg/s': 'massFlow',
  'm²': 'area',
  m2: 'area',
  'W/(m²·K)': 'heatTransferCoefficient',
  'W/(m2*K)': 'heatTransferCoefficient',
  m: 'length',
  'kg/kg': 'massFraction',
};

function mapField(map: FieldMap, engineField: string, siUnit: string): FieldMapping {
  const direct = map[engineField];
  const guessKind = (): QuantityKind | undefined => {
    const kind = SI_KIND_BY_UNIT[siUnit];
    // Temperature differences (superheat, BPR, ΔT) are in K in both SI and display units.
    if (kind === 'temperature' && /superheat|subcool|difference|rise|delta/i.test(engineField)) {
      return 'temperatureDifference';
    }
    return kind;
  };
  if (typeof direct === 'string') return { path: direct, kind: guessKind() };
  if (direct) return { path: direct.path, kind: direct.kind ?? guessKind() };
  // Longest mapped prefix: "feed" → "feed", so "feed.massFraction" keeps its tail.
  const prefixes = Object.keys(map)
    .filter((k) => engineField.startsWith(`${k}.`) || engineField.startsWith(`${k}[`))
    .sort((a, b) => b.length - a.length);
  const prefix = prefixes[0];
  if (prefix !== undefined) {
    const m = map[prefix]!;
    const p = typeof m === 'string' ? m : m.path;
    return { path: p + engineField.slice(prefix.length), kind: guessKind() };
  }
  return { path: engineField, kind: guessKind() };
}

function displayNumber(valueSI: number, kind: QuantityKind | undefined): number {
  if (!kind || !Number.isFinite(valueSI)) return valueSI;
  return roundForDisplay(siToDisplay(valueSI, kind));
}

/** 10^0 … 10^22, each exactly representable as a double. */
const EXACT_POWERS_OF_TEN = Array.from({ length: 23 }, (_, i) => 10 ** i);

/**
 * 12 significant digits: hides binary noise like 0.30000000000000004 in results, messages and
 * ranges. Every output number passes here, and `Number(v.toPrecision(12))` (a string made and
 * parsed per number) showed in profiles of the calculation routes, so the usual magnitudes are
 * rounded arithmetically: |v|·10^d is rounded to an integer and divided by 10^d, an exact power
 * of ten, which gives the double nearest to the 12-digit decimal. It can differ from
 * toPrecision(12) only in the 12th digit of a value within an ulp of a rounding tie (tested
 * against toPrecision on random values). Other magnitudes, and non-finite values, go the old way.
 */
function roundForDisplay(v: number): number {
  const a = Math.abs(v);
  if (a >= 1e-10 && a < 1e11) {
    const d = 11 - Math.floor(Math.log10(a));
    const scale = EXACT_POWERS_OF_TEN[d];
    if (scale !== undefined) {
      const rounded = Math.round(a * scale) / scale;
      return v < 0 ? -rounded : rounded;
    }
  }
  return Number.isFinite(v) ? Number(v.toPrecision(12)) : v;
}

function displayRange(
  range: { min: number; max: number; unit: string },
  kind: QuantityKind | undefined,
): { min: number; max: number; unit: string } {
  if (!kind) return range;
  return {
    min: displayNumber(range.min, kind),
    max: displayNumber(range.max, kind),
    unit: defaultUnits[kind].symbol,
  };
}

/** The problem for an engine error (or undefined if `err` is not one). */
export function engineProblem(err: unknown, map: FieldMap = {}): ProblemError | undefined {
  if (err instanceof EngineRangeError) {
    const { path, kind } = mapField(map, err.field, err.validRange.unit);
    const range = displayRange(err.validRange, kind);
    const value = displayNumber(err.value, kind);
    const unit = kind ? defaultUnits[kind].symbol : err.validRange.unit;
    // The context ("effect 2") leads, so a value from inside a train says where it arose.
    const where = err.context ? `${err.context}: ` : '';
    const message = `${where}${path} = ${Number.isFinite(value) ? value : String(value)} ${unit} is outside the valid range ${range.min} to ${range.max} ${unit}`;
    // A labelled error (from inside a train) is fully said by the display-unit message; the
    // engine's own text would repeat it in SI units.
    return problem('out-of-range', err.context ? message : `${message}. ${err.message}`, {
      errors: [{ field: path, message, value: echo(value), validRange: range }],
    });
  }
  if (err instanceof EngineInputError) {
    const { path } = mapField(map, err.field, '');
    return problem('validation-failed', err.message, { errors: [{ field: path, message: err.message }] });
  }
  if (err instanceof EngineNoSolutionError) {
    return problem('no-solution', err.message);
  }
  return undefined;
}

/** Converts any known error to a ProblemError; rethrows the unknown (→ 500 from the app). */
export function toProblem(err: unknown, map: FieldMap = {}): ProblemError {
  if (err instanceof ProblemError) return err;
  const engine = engineProblem(err, map);
  if (engine) return engine;
  if (isUnitError(err)) {
    const accepted = `accepted units: ${err.acceptedUnits.join(', ')}`;
    return problem('validation-failed', err.message, {
      errors: [
        {
          field: err.field,
          message: err.message.includes('accepted units') ? err.message : `${err.message} (${accepted})`,
          value: echo(err.input),
        },
      ],
    });
  }
  throw err;
}

/** Runs an engine calculation, turning its typed errors into problems with request field names. */
export function calculate<T>(map: FieldMap, run: () => T): T {
  try {
    return run();
  } catch (err) {
    throw toProblem(err, map);
  }
}

/**
 * A quantity input → SI. Numbers are in the default unit of the kind (already range-checked by
 * the contract); strings carry a unit and are converted by server/units, then range-checked
 * against the same contract range (422 'validation-failed' with the range in display units).
 */
export function readQuantity(input: QuantityInput, spec: QuantitySpec, field: string): number {
  if (typeof input === 'number') return displayToSI(input, spec.kind);
  let si: number;
  try {
    // a bare number in a string is read in the default unit by server/units itself
    si = parseWithUnit(input, spec.kind, field);
  } catch (err) {
    throw toProblem(err);
  }
  const display = siToDisplay(si, spec.kind);
  if (!inRange(spec, display)) {
    const unit = defaultUnits[spec.kind].symbol;
    const message = outOfRangeMessage(spec, roundForDisplay(display));
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

/** Optional quantity → SI or undefined. */
export function readOptional(
  input: QuantityInput | undefined,
  spec: QuantitySpec,
  field: string,
): number | undefined {
  return input === undefined ? undefined : readQuantity(input, spec, field);
}

/** Engine warnings → API warnings: request field names, ranges in display units. */
export function warningsOut(warnings: readonly EngineWarning[], map: FieldMap = {}): WarningDto[] {
  return warnings.map((w) => {
    const mapped = w.field === undefined ? undefined : mapField(map, w.field, w.validRange?.unit ?? '');
    const out: WarningDto = { code: w.code, message: w.message };
    if (mapped) out.field = mapped.path;
    if (w.validRange) {
      const r = displayRange(w.validRange, mapped?.kind ?? SI_KIND_BY_UNIT[w.validRange.unit]);
      out.validRange = { min: finiteOrNull(r.min), max: finiteOrNull(r.max), unit: r.unit };
    }
    return out;
  });
}

function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/**
 * Path of the first non-finite number in a JSON-bound value ("effects[2].area", "(root)"), or
 * undefined if there is none. The walk builds no path strings on the way down: every calculation
 * answer and every batch row is checked, and nearly all of them are clean.
 */
export function findNonFinite(value: unknown): string | undefined {
  const segments = nonFiniteSegments(value);
  if (segments === undefined) return undefined;
  if (segments.length === 0) return '(root)';
  let path = '';
  for (const segment of segments) {
    path += typeof segment === 'number' ? `[${segment}]` : path ? `.${segment}` : segment;
  }
  return path;
}

/** The keys and indices down to the first non-finite number (innermost last), or undefined. */
function nonFiniteSegments(value: unknown): (string | number)[] | undefined {
  if (typeof value === 'number') return Number.isFinite(value) ? undefined : [];
  if (value === null || typeof value !== 'object') return undefined;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const hit = nonFiniteSegments(value[i]);
      if (hit) return (hit.unshift(i), hit);
    }
    return undefined;
  }
  const record = value as Record<string, unknown>;
  for (const k in record) {
    if (!Object.hasOwn(record, k)) continue;
    const hit = nonFiniteSegments(record[k]);
    if (hit) return (hit.unshift(k), hit);
  }
  return undefined;
}

/**
 * The last step of every calculation route: refuses (422 'no-solution') to send a body holding
 * NaN or ±Infinity, which JSON would silently turn into null. Then writes the JSON itself, with
 * the headers `res.json` would set: `res.json` → `res.send` also parses the Content-Type to add
 * the charset and copies the string into a Buffer, work that showed in profiles of the metered
 * route and that a calculation answer never needs.
 */
export function sendCalculation(res: Response, body: unknown, status = 200): void {
  const bad = findNonFinite(body);
  if (bad !== undefined) {
    throw problem(
      'no-solution',
      `The calculation produced a non-finite number (${bad}); no result is returned.`,
    );
  }
  const text = JSON.stringify(body);
  res.statusCode = status;
  res.setHeader('Content-Type', 'application/json; charset=utf-8');
  // Stated even for HEAD, which sends no body (RFC 9110 §9.3.2: the same fields as GET).
  res.setHeader('Content-Length', Buffer.byteLength(text));
  res.end(text);
}

/** Rounds to 12 significant digits for output (keeps JSON free of binary noise). */
export function r(value: number): number {
  return roundForDisplay(value);
}

export function display(valueSI: number, kind: QuantityKind): number {
  return roundForDisplay(siToDisplay(valueSI, kind));
}

/** One model used by a calculation, for `provenance`. */
export interface ModelRef {
  id: string;
  source: string;
}

/** `provenance` of a calculation response: engine version and every model used (deduplicated). */
export function provenance(engineVersion: string, models: readonly ModelRef[]) {
  const seen = new Set<string>();
  const unique = models.filter((m) => (seen.has(m.id) ? false : (seen.add(m.id), true)));
  return { engineVersion, models: unique };
}
