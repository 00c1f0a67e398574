/**
 * The one place that maps failures to problems with request field paths:
 *
 * - EngineRangeError → 422 'out-of-range' with the engine's field mapped back to the request
 *   path (each operation declares which request field fed which engine input, a FieldMap), the
 *   value and range in display units;
 * - EngineInputError → 422 'validation-failed' naming the field; EngineNoSolutionError → 422
 *   'no-solution';
 * - UnitError (a string quantity in a unit we do not know, or of the wrong dimension) → 422
 *   'validation-failed' naming the field and the accepted units;
 * - engine warnings → API warnings with request field names and ranges in display units.
 *
 * Paths are relative to the request part the operation reads; a batch re-bases them onto its
 * case (`cases[3].`) with {@link rebaseProblem} and {@link rebaseWarnings}.
 */
import { physicalRanges, type QuantityKind, type WarningDto } from '../../shared/contracts/index.js';
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../engine/errors.js';
import { kindOfSiUnit, type EngineQuantity, type EngineWarning } from '../engine/types.js';
import { UnitError } from '../units/index.js';
import { displayNumber, displayRange, sayQuantity, sayValueAndRange } from './output.js';
import { problem, ProblemError } from './problem.js';
import { echo } from './validate.js';

/** Engine field → request field, plus the quantity kind to show its value and range in. */
export interface FieldMapping {
  path: string;
  kind?: QuantityKind;
}
export type FieldMap = Record<string, string | FieldMapping>;

/** ASCII spellings some engine messages use for units `kindOfSiUnit` knows in their printed form. */
const ASCII_SI_UNITS: Record<string, string> = { m2: 'm²', 'J/(kg*K)': 'J/(kg·K)', 'W/(m2*K)': 'W/(m²·K)' };

/** The quantity kind of an SI unit named by the engine (the engine's own table). */
function siKind(unit: string): QuantityKind | undefined {
  return kindOfSiUnit(ASCII_SI_UNITS[unit] ?? unit);
}

function mapField(map: FieldMap, engineField: string, siUnit: string): FieldMapping {
  const direct = map[engineField];
  const guessKind = (): QuantityKind | undefined => {
    const kind = siKind(siUnit);
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

/** The problem for an engine error (or undefined if `err` is not one). */
export function engineProblem(err: unknown, map: FieldMap = {}): ProblemError | undefined {
  if (err instanceof EngineRangeError) {
    const { path, kind } = mapField(map, err.field, err.validRange.unit);
    const range = displayRange(err.validRange, kind);
    const value = displayNumber(err.value, kind);
    // The context ("effect 2") leads, so a value from inside a train says where it arose. The
    // message is said from the error's data in display units, never from the engine's SI text.
    const where = err.context ? `${err.context}: ` : '';
    const why = err.reason ? `: ${err.reason}` : '';
    const message = `${where}${path} = ${sayRangeError(err, kind)}${why}`;
    return problem('out-of-range', message, {
      errors: [{ field: path, message, value: echo(value), validRange: range }],
    });
  }
  if (err instanceof EngineInputError) {
    const { path } = mapField(map, err.field, '');
    return problem('validation-failed', err.message, { errors: [{ field: path, message: err.message }] });
  }
  if (err instanceof EngineNoSolutionError) {
    const { template, values } = err.detail;
    const message =
      template !== undefined && values !== undefined ? sayTemplate(template, values, undefined) : err.message;
    return problem('no-solution', message);
  }
  return undefined;
}

/** "206.4 kPa is outside the valid range 0.6117 to 100 000 kPa" in display units (raw when the unit is no kind). */
function sayRangeError(err: EngineRangeError, kind: QuantityKind | undefined): string {
  const { min, max, unit } = err.validRange;
  if (!kind) {
    const v = Number.isFinite(err.value) ? err.value : String(err.value);
    return `${v} ${unit} is outside the valid range ${min} to ${max} ${unit}`;
  }
  const said = sayValueAndRange(err.value, { min, max }, kind);
  if (!Number.isFinite(err.value)) return `${said.value} is not a finite number`;
  if (!Number.isFinite(max)) return `${said.value} is outside the valid range: at least ${said.min}`;
  if (!Number.isFinite(min)) return `${said.value} is outside the valid range: at most ${said.max}`;
  return `${said.value} is outside the valid range ${said.min} to ${said.max}`;
}

/** Converts any known error to a ProblemError; rethrows the unknown (→ 500 from the app). */
export function toProblem(err: unknown, map: FieldMap = {}): ProblemError {
  if (err instanceof ProblemError) return err;
  const engine = engineProblem(err, map);
  if (engine) return engine;
  if (err instanceof UnitError) {
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

/** Engine warnings → API warnings: request field names, ranges in display units. */
export function warningsOut(warnings: readonly EngineWarning[], map: FieldMap = {}): WarningDto[] {
  return warnings.map((w) => {
    const mapped = w.field === undefined ? undefined : mapField(map, w.field, w.validRange?.unit ?? '');
    const out: WarningDto = { code: w.code, message: sayWarning(w, mapped?.path) };
    if (mapped) out.field = mapped.path;
    if (w.validRange) {
      const kind = mapped?.kind ?? siKind(w.validRange.unit);
      const r = displayRange(w.validRange, kind);
      // A range is stated within what the quantity can physically be (not "from −273.15 °C").
      const phys = kind ? physicalRanges[kind] : undefined;
      const min = phys ? Math.max(r.min, phys.min) : r.min;
      const max = phys ? Math.min(r.max, phys.max) : r.max;
      out.validRange = { min: finiteOrNull(min), max: finiteOrNull(max), unit: r.unit };
    }
    return out;
  });
}

/**
 * A warning's message in display units, from its data: the template with each value said in the
 * display unit of its kind and `{field}` the request path, led by where in a train it arose.
 * A warning without data keeps the engine's message.
 */
function sayWarning(w: EngineWarning, path: string | undefined): string {
  if (w.template === undefined || w.values === undefined) return w.message;
  const text = sayTemplate(w.template, w.values, path ?? w.field);
  return w.context ? `${w.context}: ${text}` : text;
}

/** A template with each `{name}` said in display units and `{field}` the request path. */
function sayTemplate(
  template: string,
  values: Record<string, EngineQuantity>,
  path: string | undefined,
): string {
  return template.replace(/\{(\w+)\}/g, (whole, name: string) => {
    if (name === 'field') return path ?? whole;
    const q = values[name];
    return q ? sayQuantity(q.value, q.kind) : whole;
  });
}

function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/** `text` with the path `from` replaced by `to` where a message names it ("f: …", "f = …"). */
function renamePath(text: string, from: string, to: string): string {
  if (text.startsWith(`${from}: `)) return to + text.slice(from.length);
  const at = text.indexOf(`${from} = `);
  if (at === -1 || (at > 0 && text[at - 1] !== ' ')) return text;
  return text.slice(0, at) + to + text.slice(at + from.length);
}

/** A field path moved under `base` ("cases[3]."); the request part itself is `base` alone. */
function rebasePath(field: string, base: string): string {
  return field === '(body)' ? base : base + field;
}

/**
 * The problem of a request part, re-based onto where that part sits in a larger request: a batch
 * runs each case as the operation's own request and moves the problem's paths under `cases[3].`
 * (in `errors[].field` and where the detail or a message names the path).
 */
export function rebaseProblem(p: ProblemError, base: string): ProblemError {
  if (!p.errors || p.errors.length === 0) return p;
  let detail = p.detail;
  let detailRenamed = false;
  const errors = p.errors.map((e) => {
    const field = rebasePath(e.field, base);
    if (detail !== undefined && !detailRenamed) {
      const renamed = renamePath(detail, e.field, field);
      detailRenamed = renamed !== detail;
      detail = renamed;
    }
    return { ...e, field, message: renamePath(e.message, e.field, field) };
  });
  return new ProblemError({
    status: p.status,
    type: p.type,
    title: p.title,
    detail,
    errors,
    headers: p.headers,
  });
}

/**
 * Warnings of a batch case's result re-based like {@link rebaseProblem}: those about a field of
 * the request (its first segment one of `requestKeys`); a warning about a result quantity
 * (`temperatureDifference`) names no request field and keeps its name.
 */
export function rebaseWarnings(result: unknown, base: string, requestKeys: ReadonlySet<string>): void {
  const warnings = (result as { warnings?: unknown } | null)?.warnings;
  if (!Array.isArray(warnings)) return;
  for (const w of warnings as WarningDto[]) {
    if (w.field !== undefined && requestKeys.has(/^[^.[]*/.exec(w.field)![0])) w.field = base + w.field;
  }
}
