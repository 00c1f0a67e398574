/**
 * A sweep: one request of a calculation operation repeated while one or two of its body's fields
 * run through lists or ranges. The operations a sweep can run are the declarations with a catalogue
 * `batchName` (as for a batch), so a new calculation is sweepable without code here.
 *
 * Each point is the base body with the varied values put in at their dotted paths, then parsed by
 * the operation's own contract and run by the batch's machinery (./batch.ts `runCases`: parsing a
 * slice per turn of the event loop, the engine tasks in the worker pool), so a point's result and
 * problem are exactly those of the single call (field paths relative to the operation's body).
 *
 * Metering, as the batch: the sweep is metered as `sweeps.run` under the `batch` scope, and each
 * point costs what its single call costs. The points' costs are reserved in order before they run,
 * as far as the quota reaches, and the costs of the points that fail are given back (and may pay
 * for the next points); the points the quota cannot cover are refused with the quota problem (a
 * sweep of which not even the first point fits is refused with 429). So units charged = the sum
 * of the succeeding points' costs, and a sweep never overshoots the quota.
 *
 * Cautions and provenance, the same for every point, are lifted out of the rows and given once.
 * `Accept: text/csv` gives a flat table: the varied fields, `status`, the result columns (`columns=`
 * or every scalar of the result) and `error`.
 *
 * A sweep may run as a job (its declaration's `jobs` part; server/http/jobs/): `sweepWork` is the
 * points, their costs, running a range of them and the answer over all rows, for the synchronous
 * answer and the job's chunks and result alike, so a job's result is the synchronous answer.
 */
import {
  MAX_SWEEP_POINTS,
  SweepCsvQuerySchema,
  SweepListFieldSchema,
  SweepRangeFieldSchema,
  SweepRequestSchema,
  SweepResponseSchema,
  type SweepField,
  type SweepRequest,
  type SweepResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { z } from 'zod';
import { toCsv } from '../../csv.js';
import { chargeUnits, releaseUnits } from '../../middleware/operation.js';
import { problem, ProblemError } from '../../problem.js';
import { findNonFinite } from '../../send.js';
import { validate } from '../../validate.js';
import {
  compileOperation,
  declareOperation,
  poolProblem,
  type AnyOperation,
  type CompiledOperation,
  type OperationContext,
  type ProblemBody,
} from '../operation.js';
import {
  caseProblem,
  CASES_PER_TURN,
  errorCell,
  flatten,
  nextTurn,
  problemBody,
  runCases,
  sendJsonInSlices,
} from './batch.js';

type Value = number | string | boolean;
type Row = SweepResponse['rows'][number];

/** Most columns a CSV answer may name. */
const MAX_COLUMNS = 200;

/** `a.b[2].c` → ['a', 'b', 2, 'c']. */
function segments(path: string): (string | number)[] {
  return path
    .split(/\.|\[(\d+)\]/)
    .filter((k) => k !== undefined && k !== '')
    .map((k) => (/^\d+$/.test(k) ? Number(k) : k));
}

interface ZodDef {
  type: string;
  innerType?: object;
  in?: object;
  shape?: Record<string, object>;
  element?: object;
  options?: readonly object[];
}
const defOf = (schema: object) => (schema as { _zod: { def: ZodDef } })._zod.def;

/**
 * Whether `path` names a value of the schema: each key a field of an object (own, declared), each
 * index an entry of an array, ending on something that is not only an object (a quantity, a
 * number, a string, a choice). Unions are searched in every branch.
 */
function schemaHasPath(schema: object, path: readonly (string | number)[]): boolean {
  const def = defOf(schema);
  switch (def.type) {
    case 'optional':
    case 'nullable':
    case 'default':
    case 'readonly':
    case 'prefault':
      return def.innerType ? schemaHasPath(def.innerType, path) : false;
    case 'pipe':
      return def.in ? schemaHasPath(def.in, path) : false;
    case 'union':
      return (def.options ?? []).some((o) => schemaHasPath(o, path));
    case 'object': {
      if (path.length === 0) return false;
      const [key, ...rest] = path;
      if (typeof key !== 'string' || !Object.hasOwn(def.shape ?? {}, key)) return false;
      return schemaHasPath(def.shape![key]!, rest);
    }
    case 'array': {
      if (path.length === 0) return false;
      const [key, ...rest] = path;
      return typeof key === 'number' && def.element ? schemaHasPath(def.element, rest) : false;
    }
    default:
      return path.length === 0;
  }
}

/** The base with `value` at `path`: a copy along the path only (the base itself is not changed). */
function withValue(node: unknown, path: readonly (string | number)[], value: unknown): unknown {
  if (path.length === 0) return value;
  const key = path[0]!;
  const rest = path.slice(1);
  if (typeof key === 'number') {
    const arr = Array.isArray(node) ? [...(node as unknown[])] : [];
    arr[key] = withValue(arr[key], rest, value);
    // An index past the end leaves holes: JSON would send null there, so does the copy.
    for (let i = 0; i < arr.length; i++) if (!(i in arr)) arr[i] = null;
    return arr;
  }
  const obj =
    node !== null && typeof node === 'object' && !Array.isArray(node)
      ? { ...(node as Record<string, unknown>) }
      : {};
  const child = Object.hasOwn(obj, key) ? obj[key] : undefined;
  // Defined as an own data property, so no key can reach a prototype.
  Object.defineProperty(obj, key, {
    value: withValue(child, rest, value),
    enumerable: true,
    writable: true,
    configurable: true,
  });
  return obj;
}

/** The values of a varied field, in order: the list, or the range's points with both ends exact. */
export function sweepValues(f: SweepField): Value[] {
  if ('values' in f) return f.values;
  const n = f.steps;
  return Array.from({ length: n }, (_, i) => {
    if (i === 0) return f.from;
    if (i === n - 1) return f.to;
    const t = i / (n - 1);
    return f.spacing === 'log'
      ? Math.exp(Math.log(f.from) + t * (Math.log(f.to) - Math.log(f.from)))
      : // Weighted, not from + t·(to − from): the difference of two huge bounds would overflow.
        f.from * (1 - t) + f.to * t;
  });
}

/** Field errors of the varied fields that the operation's body does not have. */
function checkFields(op: CompiledOperation, vary: readonly SweepField[], operation: string): void {
  const schema = op.body?.schema;
  const errors = vary.flatMap((f, i) =>
    schema && schemaHasPath(schema, segments(f.field))
      ? []
      : [
          {
            field: `vary[${i}].field`,
            message: `"${f.field}" is not a value field of the ${operation} request body`,
          },
        ],
  );
  if (errors.length > 0)
    throw problem('validation-failed', `${errors[0]!.field}: ${errors[0]!.message}.`, { errors });
}

/** Two plain JSON values are equal (early exit; cheaper than comparing their JSON texts). */
function same(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (let i = 0; i < ka.length; i++) {
    const k = ka[i]!;
    if (k !== kb[i] || !same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]))
      return false;
  }
  return true;
}

/** What a sweep job stores: the checked request (without its callback) and the CSV columns asked for. */
interface SweepInput {
  sweep: Omit<SweepRequest, 'callbackUrl'>;
  columns?: string[];
}

type Point = { values: Record<string, Value>; body: Record<string, unknown> };

/** The points of a sweep, the first field varying slowest (422 naming the range whose points are not finite). */
function sweepPoints(sweep: SweepInput['sweep']): Point[] {
  const lists = sweep.vary.map(sweepValues);
  lists.forEach((list, i) => {
    if (list.some((v) => typeof v === 'number' && !Number.isFinite(v))) {
      throw problem('validation-failed', `vary[${i}]: the range's points are not finite numbers.`, {
        errors: [
          { field: `vary[${i}]`, message: 'gives points beyond the finite numbers; narrow from and to' },
        ],
      });
    }
  });
  const paths = sweep.vary.map((f) => segments(f.field));
  const points: Point[] = [];
  const [outer, inner] = [lists[0]!, lists[1] ?? [undefined]];
  for (const a of outer) {
    for (const b of inner) {
      let body = withValue(sweep.base, paths[0]!, a) as Record<string, unknown>;
      const values: Record<string, Value> = { [sweep.vary[0]!.field]: a };
      if (b !== undefined) {
        body = withValue(body, paths[1]!, b) as Record<string, unknown>;
        values[sweep.vary[1]!.field] = b;
      }
      points.push({ values, body });
    }
  }
  return points;
}

/**
 * Refuses result columns the table always has: the CSV's own columns and the varied fields head
 * their columns already, and a result column of the same name would write two under one header.
 */
function checkColumns(columns: readonly string[] | undefined, vary: readonly SweepField[]): void {
  if (columns && columns.length > MAX_COLUMNS) {
    throw problem('validation-failed', `columns: at most ${MAX_COLUMNS} columns may be named.`, {
      errors: [{ field: 'columns', message: `names ${columns.length} columns; at most ${MAX_COLUMNS}` }],
    });
  }
  const taken = new Set(['status', 'warnings', 'error', ...vary.map((v) => v.field)]);
  const clash = columns?.find((c) => taken.has(c));
  if (clash !== undefined) {
    throw problem('validation-failed', `columns: "${clash}" is a column of every sweep table already.`, {
      errors: [
        {
          field: 'columns',
          message: `names "${clash}", which the table always has; name result columns only`,
        },
      ],
    });
  }
}

/** `columns=` as a list (undefined when not given). */
function columnList(text: unknown): string[] | undefined {
  if (typeof text !== 'string') return undefined;
  return text
    .split(',')
    .map((c) => c.trim())
    .filter((c) => c !== '');
}

/** A sweep's points as work: run a range of points, answer with all rows (synchronously or as a job). */
function sweepWork(byName: ReadonlyMap<string, CompiledOperation>, { sweep, columns }: SweepInput) {
  const op = byName.get(sweep.operation)!;
  const points = sweepPoints(sweep);
  const caseUnits = op.decl.batch?.units;
  const costs = points.map((p) => (caseUnits ? caseUnits(p.body) : op.decl.operation.units));
  /** The answer: cautions and provenance lifted to the top when every succeeding point has the same. */
  const answer = (all: unknown[], unitsCharged: number): SweepResponse => {
    const rows = (all as Row[]).map((r) => ({ ...r }));
    // The rows get copies without them (rest spread rather than `delete`, which would leave slow
    // dictionary objects for the JSON writer).
    const ok = rows.filter((r) => r.status === 'ok').map((r) => r.result!);
    const first = ok[0];
    const lifted: Pick<SweepResponse, 'cautions' | 'provenance'> = {};
    const liftable = (key: 'cautions' | 'provenance') =>
      first !== undefined && key in first && ok.every((r) => key in r && same(r[key], first[key]));
    const liftCautions = liftable('cautions');
    const liftProvenance = liftable('provenance');
    if (liftCautions) lifted.cautions = first!.cautions as unknown[];
    if (liftProvenance) lifted.provenance = first!.provenance as Record<string, unknown>;
    if (liftCautions || liftProvenance) {
      for (const row of rows) {
        if (!row.result) continue;
        const { cautions, provenance, ...rest } = row.result;
        row.result = {
          ...rest,
          ...(liftCautions ? {} : { cautions }),
          ...(liftProvenance ? {} : { provenance }),
        };
      }
    }
    return {
      operation: sweep.operation,
      count: rows.length,
      succeeded: ok.length,
      failed: rows.length - ok.length,
      unitsCharged,
      ...lifted,
      rows,
    };
  };
  const csvOf = (rows: unknown[], chosenColumns: string[] | undefined): string => {
    // The rows as the JSON answer has them (cautions and provenance lifted out).
    const all = answer(rows, 0).rows;
    const fields = sweep.vary.map((f) => f.field);
    const flat = all.map((r) => {
      const line: Record<string, unknown> = { ...r.values, status: r.status };
      if (r.result) {
        const out: Record<string, unknown> = {};
        flatten(r.result, '', out);
        for (const [k, v] of Object.entries(out)) {
          // Warnings are text per row: joined into one column rather than one per entry.
          if (!k.startsWith('warnings[')) line[`result:${k}`] = v;
        }
        const warnings = (r.result.warnings as { message?: string }[] | undefined) ?? [];
        if (warnings.length > 0) line.warnings = warnings.map((w) => w.message ?? '').join('; ');
      }
      if (r.problem) line.error = errorCell(r.problem);
      return line;
    });
    const available = [
      ...new Set(flat.flatMap((l) => Object.keys(l).filter((k) => k.startsWith('result:')))),
    ].map((k) => k.slice('result:'.length));
    if (chosenColumns && all.some((r) => r.status === 'ok')) {
      const unknown = chosenColumns.filter((c) => !available.includes(c));
      if (unknown.length > 0) {
        throw problem('validation-failed', `columns: "${unknown[0]}" is not a column of the result.`, {
          errors: [
            {
              field: 'columns',
              message: `names ${unknown.map((c) => `"${c}"`).join(', ')}, not columns of the result (e.g. ${available.slice(0, 8).join(', ')})`,
            },
          ],
        });
      }
    }
    const chosen = chosenColumns ?? available;
    const table = flat.map((l) => {
      const out: Record<string, unknown> = {};
      for (const f of fields) out[f] = l[f];
      out.status = l.status;
      for (const c of chosen) out[c] = l[`result:${c}`];
      out.warnings = l.warnings;
      out.error = l.error;
      return out;
    });
    return toCsv([...fields, 'status', ...chosen, 'warnings', 'error'], table);
  };
  return {
    total: points.length,
    points,
    costs,
    columns,
    rowsKey: 'rows',
    cost: (index: number) => costs[index]!,
    /** Points [start, end), run by the batch's machinery, a slice per turn. */
    async run(start: number, end: number, ctx: OperationContext): Promise<{ rows: Row[]; ok: boolean[] }> {
      const settle = await runCases(
        op,
        points.slice(start, end).map((p) => p.body),
        {},
        ctx,
        // Light points (a single effect, ≈ 0.02 ms) run inline, a slice per turn, as their
        // single calls do: the pool's round trip would cost more than it frees; heavy points
        // (long trains) go to the pool.
        'declared',
      );
      const rows: Row[] = [];
      for (let index = start; index < end; index++) {
        if (index > start && (index - start) % CASES_PER_TURN === 0) await nextTurn();
        const point = points[index]!;
        try {
          const result = settle(index - start);
          const bad = findNonFinite(result);
          if (bad) throw problem('no-solution', `The calculation produced a non-finite number (${bad}).`);
          rows.push({ values: point.values, status: 'ok', result: result as Record<string, unknown> });
        } catch (err) {
          rows.push({ values: point.values, status: 'error', problem: caseProblem(err, '') });
        }
      }
      return { rows, ok: rows.map((r) => r.status === 'ok') };
    },
    refused: (index: number, p: ProblemBody): Row => ({
      values: points[index]!.values,
      status: 'error',
      problem: p as Row['problem'] & object,
    }),
    answer,
    csvOf,
    csv: (rows: unknown[], query: Record<string, unknown>) => {
      const asked = columnList(query.columns);
      checkColumns(asked, sweep.vary);
      return csvOf(rows, asked ?? columns);
    },
  };
}

/**
 * What a sweep's points are charged against: the /v1 request's meter (`chargeUnits`), or the
 * console workbench's own count for a key. `charge` throws the quota problem when the units do
 * not fit; `release` gives back units charged before.
 */
export interface SweepMeter {
  charge(units: number): void;
  release(units: number): void;
  /** The account's monthly quota, for the message of the points refused for quota. */
  quota?: number;
  /** Some points were refused for want of quota. */
  cutByQuota?(): void;
}

type SweepWork = ReturnType<typeof sweepWork>;

/** A sweep request checked and laid out in points, ready to run. */
export interface ParsedSweep {
  sweep: SweepRequest;
  work: SweepWork;
}

/**
 * Runs a sweep's points in rounds: reserve, in order, as many points' costs as the quota covers
 * (all of them unless it runs short), run them, give back the costs of those that failed; while
 * points remain and the units given back cover the next, go on. The points no round could reserve
 * are refused with the quota problem.
 */
async function runSweep(
  work: SweepWork,
  ctx: OperationContext,
  meter: SweepMeter,
  requestId: unknown,
): Promise<SweepResponse> {
  const { points, costs } = work;
  const rows: Row[] = [];
  let reserved = 0;
  let refunded = 0;
  let quotaRefusal: ProblemError | undefined;
  while (rows.length < points.length) {
    const start = rows.length;
    let end = points.length;
    try {
      meter.charge(costs.slice(start).reduce((s, u) => s + u, 0));
    } catch (err) {
      if (!(err instanceof ProblemError) || err.type !== 'quota-exceeded') throw err;
      quotaRefusal = err;
      end = start;
      while (end < points.length) {
        try {
          meter.charge(costs[end]!);
        } catch {
          break;
        }
        end += 1;
      }
    }
    if (end === start) break;
    reserved += costs.slice(start, end).reduce((s, u) => s + u, 0);
    let ran: { rows: Row[]; ok: boolean[] };
    try {
      ran = await work.run(start, end, ctx);
    } catch (err) {
      // Hung or crashed: this round's points are not answered, so none of the sweep is charged.
      meter.release(reserved - refunded);
      throw poolProblem(err, requestId);
    }
    let given = 0;
    ran.rows.forEach((row, i) => {
      if (!ran.ok[i]) given += costs[start + i]!;
      rows.push(row);
    });
    // A refused point costs nothing: give back what this round's failed points reserved.
    meter.release(given);
    refunded += given;
  }
  // Not even the first point fits: the sweep is refused as a single call would be.
  if (rows.length === 0 && quotaRefusal) throw quotaRefusal;
  if (rows.length < points.length) {
    meter.cutByQuota?.();
    const quota = meter.quota;
    const quotaProblem = problemBody(
      problem(
        'quota-exceeded',
        `The monthly quota${quota !== undefined ? ` of ${quota} units` : ''} ran out before this point: the points before it used what remained.`,
        { headers: quotaRefusal?.headers },
      ),
    );
    for (let index = rows.length; index < points.length; index++)
      rows.push(work.refused(index, quotaProblem));
  }
  return work.answer(rows, reserved - refunded);
}

/**
 * Checks and runs sweeps over the declarations that name a batch name: for the /v1 operation
 * (synchronously or as a job) and for callers outside the router (the console's workbench).
 */
export function sweepRunner(operations: readonly AnyOperation[]) {
  const byName = new Map<string, CompiledOperation>();
  for (const decl of operations) {
    const name = (decl.operation as { batchName?: string }).batchName;
    if (name !== undefined) byName.set(name, compileOperation(decl));
  }
  // One work per input object: a request's accept, 202 check and synchronous answer share it.
  const opened = new WeakMap<SweepInput, SweepWork>();
  const open = (input: SweepInput): SweepWork => {
    let work = opened.get(input);
    if (!work) {
      work = sweepWork(byName, input);
      opened.set(input, work);
    }
    return work;
  };

  /** The request checked, each refusal naming its field (the points are not made yet). */
  function check(raw: unknown): { sweep: SweepRequest; total: number } {
    // Each varied field is checked by its own shape first, so a refusal names its key
    // (`vary[0].steps`) rather than "matches neither a list nor a range".
    const rawVary = (raw as { vary?: unknown } | null | undefined)?.vary;
    if (raw && typeof raw === 'object' && Array.isArray(rawVary)) {
      rawVary.forEach((f: unknown, i) => {
        if (f !== null && typeof f === 'object' && !Array.isArray(f))
          validate('values' in f ? SweepListFieldSchema : SweepRangeFieldSchema, f, `vary[${i}]`);
      });
    }
    const sweep = validate(SweepRequestSchema, raw);
    const total = sweep.vary.reduce((n, f) => n * ('values' in f ? f.values.length : f.steps), 1);
    if (total > MAX_SWEEP_POINTS) {
      throw problem(
        'validation-failed',
        `vary: the fields make ${total} points; at most ${MAX_SWEEP_POINTS} are accepted per sweep.`,
        {
          errors: [
            { field: 'vary', message: `makes ${total} points; at most ${MAX_SWEEP_POINTS} are accepted` },
          ],
        },
      );
    }
    checkFields(byName.get(sweep.operation)!, sweep.vary, sweep.operation);
    return { sweep, total };
  }

  /** Checked and laid out in points (a range beyond the finite numbers is refused here). */
  function parse(raw: unknown): ParsedSweep {
    const { sweep } = check(raw);
    const { callbackUrl: _callback, ...request } = sweep;
    return { sweep, work: open({ sweep: request }) };
  }

  const run = (parsed: ParsedSweep, ctx: OperationContext, meter: SweepMeter, requestId: unknown) =>
    runSweep(parsed.work, ctx, meter, requestId);

  return { check, open, parse, run };
}

export type SweepRunner = ReturnType<typeof sweepRunner>;

/** The sweep operation, over the declarations its runner was made for. */
export function sweepOperation(sweeps: SweepRunner) {
  return declareOperation({
    operation: operationCatalogue.sweep,
    method: 'post',
    path: '/v1/sweeps',
    openApiName: 'postSweep',
    tag: 'Batch',
    summary: `One calculation over lists or ranges of one or two of its fields (at most ${MAX_SWEEP_POINTS} points)`,
    description:
      "Each point is `base` with the varied fields' values put in at their dotted paths, checked and run exactly as the single call " +
      '(its result and problem are the single call’s; field paths are those of the operation’s body). Rows come in order, the first field varying slowest. ' +
      'Each point costs what its single call costs; a refused point costs nothing. Points are reserved in order as far as the quota reaches, the costs of refused points given back for the next: ' +
      'the points the quota cannot cover are refused with the quota problem (429 if not even the first point fits). Cautions and provenance, the same for every point, are given once. ' +
      'Send `Accept: text/csv` for a flat table (the varied fields, `status`, the result columns named by `columns=`, `error`).',
    request: {
      query: SweepCsvQuerySchema,
      body: SweepRequestSchema,
      example: {
        name: 'pressure-and-feed',
        summary: 'An invented caustic evaporator over body pressure and feed temperature',
      },
    },
    response: {
      description: 'One row per point',
      schema: SweepResponseSchema,
      alternatives: { 'text/csv': { schema: z.string().meta({ description: 'One line per point' }) } },
    },
    jobs: {
      kind: 'sweep',
      accept: async (req) => {
        const { sweep, total } = sweeps.check(req.body);
        const query = validate(SweepCsvQuerySchema, req.query);
        const columns = columnList(query.columns);
        checkColumns(columns, sweep.vary);
        const { callbackUrl, ...request } = sweep;
        const input: SweepInput = { sweep: request, ...(columns ? { columns } : {}) };
        // The points are made now, so a range beyond the finite numbers is refused before any run.
        sweeps.open(input);
        return {
          input,
          total,
          ...(callbackUrl !== undefined ? { callbackUrl, callbackField: 'callbackUrl' } : {}),
        };
      },
      respond: async (accepted, req, res, ctx) => {
        const work = sweeps.open(accepted.input as SweepInput);
        const response = await runSweep(
          work,
          ctx,
          {
            charge: (units) => chargeUnits(res, units),
            release: (units) => releaseUnits(res, units),
            ...(res.locals.meter ? { quota: res.locals.meter.quota } : {}),
            cutByQuota: () => {
              if (res.locals.meter) res.locals.meter.cutByQuota = true;
            },
          },
          res.locals.requestId,
        );
        if (req.accepts(['application/json', 'text/csv']) === 'text/csv') {
          let table: string;
          try {
            table = work.csvOf(response.rows, work.columns);
          } catch (err) {
            // A column no row has: refused, so nothing is charged.
            releaseUnits(res, response.unitsCharged);
            throw err;
          }
          res.type('text/csv').send(table);
          return;
        }
        await sendJsonInSlices(res, response, 'rows');
      },
      open: (input) => sweeps.open(input as SweepInput),
    },
  });
}
