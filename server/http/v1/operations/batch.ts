/**
 * Many cases of one operation in one request: JSON ({ operation, liquor?, cases: [...] }),
 * text/csv (operation and liquor in the query string), or a CSV file in multipart/form-data.
 * `operation` is a declaration's batch name (shared/operations.ts); each case runs as that
 * operation's own request, and its problem's paths are re-based onto `cases[i].`. A failing
 * case gets its own problem and does not fail the batch. A refused case costs nothing, as the same
 * request refused on its own route would: every case's cost is reserved before any case runs (429
 * if the quota cannot cover them all, so a batch never overshoots the quota), and the cost of the
 * cases that fail is released afterwards, so units charged = the sum of the succeeding cases' costs.
 * `Accept: text/csv` returns one line per case with dotted column names.
 *
 * A batch may run as a job (`Prefer: respond-async`; its declaration's `jobs` part, with the job's
 * `callbackUrl` in the query string since the body may be CSV): `batchWork` runs a range of cases
 * and answers over all rows, for the synchronous answer and the job alike. As a job the cases are
 * charged chunk by chunk as far as the quota reaches, rather than all reserved up front.
 */
import type { Response } from 'express';
import {
  BatchQuerySchema,
  BatchRequestSchema,
  BatchResponseSchema,
  type BatchRequest,
  BatchUploadSchema,
  MAX_BATCH_ROWS,
  type BatchResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { z } from 'zod';
import { toCsv } from '../../csv.js';
import { csvPlace, readCsv } from '../../csv-input.js';
import { rebaseProblem, rebaseWarnings, toProblem } from '../../engine-errors.js';
import { FORBIDDEN_KEYS } from '../../middleware/body.js';
import { chargeUnits, releaseUnits } from '../../middleware/operation.js';
import { problem, problemFields, ProblemError } from '../../problem.js';
import { findNonFinite } from '../../send.js';
import { singleCsvUpload } from '../../upload.js';
import { validate } from '../../validate.js';
import type { TaskOutcome } from '../../../workers/engine-tasks.js';
import {
  compileOperation,
  declareOperation,
  outcomeValue,
  poolProblem,
  pooled,
  prepareOperation,
  runTaskInline,
  type AnyOperation,
  type CompiledOperation,
  type OperationContext,
  type Prepared,
} from '../operation.js';

/** Largest array index a CSV column may name: no array of a case has more than 50 entries. */
const MAX_COLUMN_INDEX = 999;

/** A header cell that names no usable field: the header is line 1. */
function columnProblem(column: string, message: string): ProblemError {
  return problem('validation-failed', `CSV column "${column}" ${message}.`, {
    errors: [{ field: csvPlace(1, column), message }],
  });
}

/**
 * Sets a dotted path ("feed.massFlow", "overallHeatTransferCoefficients[1]") in an object. The
 * path is a CSV column name, so it is hostile: a segment naming a prototype (`__proto__`,
 * `constructor`, `prototype`) is refused, only own properties are descended into (never an
 * inherited `toString`), an array takes only indices up to {@link MAX_COLUMN_INDEX} (never
 * `length`), and a column that would overwrite another column's value is refused.
 */
function setPath(target: Record<string, unknown>, path: string, value: unknown): void {
  const keys = path.split(/\.|\[(\d+)\]/).filter((k) => k !== undefined && k !== '');
  let node: Record<string, unknown> | unknown[] = target;
  keys.forEach((key, i) => {
    if (FORBIDDEN_KEYS.has(key)) {
      throw columnProblem(
        path,
        `names "${key}", which is not a field (${[...FORBIDDEN_KEYS].join(', ')} are refused)`,
      );
    }
    const isIndex = /^\d+$/.test(key);
    if (Array.isArray(node) && (!isIndex || Number(key) > MAX_COLUMN_INDEX)) {
      throw columnProblem(
        path,
        `needs an index from 0 to ${MAX_COLUMN_INDEX} after "${keys.slice(0, i).join('.')}"`,
      );
    }
    const last = i === keys.length - 1;
    const nextIsIndex = /^\d+$/.test(keys[i + 1] ?? '');
    const k = isIndex ? Number(key) : key;
    const container = node as Record<string | number, unknown>;
    const existing = Object.hasOwn(container, k) ? container[k] : undefined;
    if (last) {
      if (existing !== undefined) throw columnProblem(path, 'sets a value that another column sets too');
      container[k] = value;
    } else if (existing === undefined) {
      node = container[k] = nextIsIndex ? [] : {};
    } else if (existing !== null && typeof existing === 'object') {
      node = existing as Record<string, unknown>;
    } else {
      throw columnProblem(path, `goes inside "${keys.slice(0, i + 1).join('.')}", which another column sets`);
    }
  });
}

/** CSV cell → JSON value: numbers become numbers, "" is omitted, the rest stay strings (units). */
function cell(text: string): unknown {
  const t = text.trim();
  if (t === '') return undefined;
  if (/^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(t)) return Number(t);
  if (t === 'true' || t === 'false') return t === 'true';
  return t;
}

/** Cases from CSV: a header of dotted field names, one case per line (read by server/http/csv-input.ts). */
export function casesFromCsv(text: string): { cases: Record<string, unknown>[]; lines: number[] } {
  const { header, rows } = readCsv(text);
  const cases = rows.map(({ cells }) => {
    const c: Record<string, unknown> = {};
    header.forEach((name, i) => {
      const v = cell(cells[i] ?? '');
      if (v !== undefined && name !== '') setPath(c, name, v);
    });
    return c;
  });
  return { cases, lines: rows.map((r) => r.line) };
}

/**
 * The problem of a case as one message for the CSV `error` column: each field once with its
 * message (the detail only when no field is named), never the title, detail and fields together.
 */
export function errorCell(p: {
  title: string;
  detail?: string;
  errors?: { field: string; message: string }[];
}): string {
  const errors = p.errors ?? [];
  if (errors.length === 0) return p.detail ?? p.title;
  return errors
    .map((e) => (e.message.startsWith(e.field) ? e.message : `${e.field}: ${e.message}`))
    .join('; ');
}

/** Flattens a result into dotted columns for CSV output. */
export function flatten(value: unknown, prefix: string, out: Record<string, unknown>): void {
  if (Array.isArray(value)) value.forEach((v, i) => flatten(v, `${prefix}[${i}]`, out));
  else if (value !== null && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  } else out[prefix] = value;
}

/**
 * A problem about a whole CSV case (its field was the case itself, "line 3, column "), named by
 * its line alone.
 */
function wholeRowPaths(p: ProblemError, line: number): ProblemError {
  const bare = `${csvPlace(line, '')}, column `;
  if (!p.errors?.some((e) => e.field === bare)) return p;
  return new ProblemError({
    status: p.status,
    type: p.type,
    title: p.title,
    detail: p.detail,
    errors: p.errors.map((e) => (e.field === bare ? { ...e, field: csvPlace(line) } : e)),
    headers: p.headers,
  });
}

/**
 * A case's error as the problem of its row: its field paths re-based onto `base` (a CSV case's
 * whole-row problem named by its line); anything unexpected becomes a plain "no solution".
 */
export function caseProblem(err: unknown, base: string, line?: number): BatchProblem {
  let p: ProblemError;
  try {
    p = rebaseProblem(toProblem(err), base);
    if (line !== undefined) p = wholeRowPaths(p, line);
  } catch {
    p = problem('no-solution', 'This case could not be calculated.');
  }
  return problemBody(p);
}

/** A problem as the JSON body of a row. */
export function problemBody(p: ProblemError): BatchProblem {
  return problemFields(p);
}

type BatchProblem = NonNullable<BatchResponse['results'][number]['problem']>;

/**
 * The batch request of CSV cases: a refusal of a case's shape names the case's line rather than
 * `cases[i]` (the cases' own fields are checked when each runs, named by line and column).
 */
function validateCsvBatch(raw: unknown, lines: readonly number[]) {
  try {
    return validate(BatchRequestSchema, raw);
  } catch (err) {
    if (!(err instanceof ProblemError) || !err.errors) throw err;
    const named = err.errors.map((e) => {
      const m = /^cases\[(\d+)\](?:\.(.*))?$/.exec(e.field);
      const line = m ? lines[Number(m[1])] : undefined;
      return line === undefined ? e : { ...e, field: csvPlace(line, m?.[2]) };
    });
    throw new ProblemError({
      status: err.status,
      type: err.type,
      title: err.title,
      detail: err.detail,
      errors: named,
      headers: err.headers,
    });
  }
}

/** One case as its operation's own request (paths relative to the case), parsed and prepared. */
async function prepareCase(
  op: CompiledOperation,
  c: Record<string, unknown>,
  shared: { liquor?: unknown },
  ctx: OperationContext,
): Promise<Prepared> {
  const batch = op.decl.batch;
  let input = c;
  let caseLoad: { value: unknown } | undefined;
  if (batch?.load) {
    caseLoad = { value: await batch.load(c, shared, ctx) };
    input = { ...c };
    for (const key of batch.consumes ?? []) delete input[key];
  }
  return prepareOperation(op, op.body ? { body: input } : { query: input }, ctx, caseLoad);
}

/** Cases parsed (or formatted) between two turns of the event loop, so /healthz and light calls are answered in between. */
export const CASES_PER_TURN = 64;

/**
 * Sends `body` as JSON with its array `key` last, written a slice of CASES_PER_TURN items per turn
 * of the event loop: a thousand train results make megabytes of JSON, and no single pause of the
 * loop should be long. Encoded to bytes slice by slice too, so sending is one copy; the bytes
 * equal those of res.json for the same object with `key` last.
 */
export async function sendJsonInSlices<K extends string>(
  res: Response,
  body: { [P in K]: readonly unknown[] } & Record<string, unknown>,
  key: K,
): Promise<void> {
  const { [key]: items, ...rest } = body;
  const head = JSON.stringify({ ...rest, [key]: [] });
  const pieces: Buffer[] = [Buffer.from(`${head.slice(0, -'[]}'.length)}[`)];
  for (let i = 0; i < items.length; i += CASES_PER_TURN) {
    if (i > 0) await nextTurn();
    const slice = JSON.stringify(items.slice(i, i + CASES_PER_TURN)).slice(1, -1);
    pieces.push(Buffer.from(i > 0 ? `,${slice}` : slice));
  }
  pieces.push(Buffer.from(']}'));
  res.type('application/json').send(Buffer.concat(pieces));
}
export const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Parses and runs many cases of one operation (the batch's and the sweep's engine): every case is
 * parsed here (validation, liquor, SI), a slice per turn of the event loop, and each slice's
 * engine tasks go to the pool's threads at once, so they calculate while the rest is parsed
 * (inline without a pool: the tasks run as each case is settled). Returns `settle(i)`, which gives
 * case i's result or throws its problem. Throws the pool's failure (hung or crashed) once every
 * slice has settled, so a failed run leaves no task behind.
 */
export async function runCases(
  op: CompiledOperation,
  cases: readonly Record<string, unknown>[],
  shared: { liquor?: unknown },
  ctx: OperationContext,
  /**
   * 'always' (the batch): every engine task goes to the pool. 'declared' (the sweep): only the
   * tasks whose single call would go there (the declaration's `engine.offload`, the crossover of
   * tests/bench/pool.ts); lighter ones run inline as each case is settled, a slice per turn.
   */
  offload: 'always' | 'declared' = 'always',
): Promise<(index: number) => unknown> {
  // 1. Parse every case here (validation, liquor, SI), a slice per turn of the event loop;
  // 2. and hand each slice's engine tasks to the pool's threads at once, so they calculate
  //    while the rest is parsed (inline without a pool: the tasks run as each case is formatted).
  const pool = ctx.enginePool;
  const prepared: ({ ok: true; value: Prepared } | { ok: false; error: unknown })[] = [];
  const outcomes = new Map<number, TaskOutcome>();
  const inFlight: Promise<void>[] = [];
  const failures: unknown[] = [];
  let waiting: { index: number; task: Exclude<Prepared, { done: unknown }> }[] = [];
  const dispatch = () => {
    if (waiting.length === 0 || !pooled(pool)) return;
    const sent = waiting;
    waiting = [];
    inFlight.push(
      pool
        .runMany(
          sent[0]!.task.task,
          sent.map((t) => t.task.taskInput),
        )
        .then(
          (answers) => sent.forEach((t, i) => outcomes.set(t.index, answers[i]!)),
          // Caught at once: a slice may fail while later ones are still being parsed.
          (err: unknown) => void failures.push(err),
        ),
    );
  };
  for (const [index, c] of cases.entries()) {
    if (index > 0 && index % CASES_PER_TURN === 0) {
      dispatch();
      await nextTurn();
    }
    try {
      const value = await prepareCase(op, c, shared, ctx);
      prepared.push({ ok: true, value });
      if (!('done' in value) && (offload === 'always' || value.offload)) waiting.push({ index, task: value });
    } catch (error) {
      prepared.push({ ok: false, error });
    }
  }
  dispatch();
  // Every slice settles before the answer, so a failed batch leaves no task running for it.
  await Promise.all(inFlight);
  if (failures.length > 0) throw failures[0];
  return (index: number): unknown => {
    const p = prepared[index]!;
    if (!p.ok) throw p.error;
    const v = p.value;
    if ('done' in v) return v.done;
    const outcome = outcomes.get(index);
    return v.finish(outcome ? () => outcomeValue(outcome) : () => runTaskInline(v.task, v.taskInput));
  };
}

/** What a batch job stores: the checked request, and the CSV line of each case if it came as CSV. */
interface BatchInput {
  batch: BatchRequest;
  lines?: number[];
}
type BatchRow = BatchResponse['results'][number];

/** The batch's cases as work: run a range of cases, answer with all rows (synchronously or as a job). */
function batchWork(
  byName: ReadonlyMap<string, { op: CompiledOperation; requestKeys: ReadonlySet<string> }>,
  { batch, lines }: BatchInput,
) {
  const { op, requestKeys } = byName.get(batch.operation)!;
  const caseUnits = op.decl.batch?.units;
  const costs = batch.cases.map((c) => (caseUnits ? caseUnits(c) : op.decl.operation.units));
  const shared = { liquor: batch.liquor };
  const place = (index: number) => {
    const line = lines?.[index];
    // A CSV case's fields are named by line and column, as the user sees them in the file.
    const base = line === undefined ? `cases[${index}].` : `${csvPlace(line, '')}, column `;
    return { line, base, head: { index, ...(line !== undefined ? { line } : {}) } };
  };
  return {
    total: batch.cases.length,
    costs,
    rowsKey: 'results',
    cost: (index: number) => costs[index]!,
    /** Cases [start, end): parsed, run (in the pool) and formatted a slice per turn. */
    async run(
      start: number,
      end: number,
      ctx: OperationContext,
    ): Promise<{ rows: BatchRow[]; ok: boolean[] }> {
      const settle = await runCases(op, batch.cases.slice(start, end), shared, ctx);
      const rows: BatchRow[] = [];
      for (let index = start; index < end; index++) {
        if (index > start && (index - start) % CASES_PER_TURN === 0) await nextTurn();
        const { line, base, head } = place(index);
        try {
          const result = settle(index - start);
          rebaseWarnings(result, base, requestKeys);
          const bad = findNonFinite(result);
          if (bad) throw problem('no-solution', `The calculation produced a non-finite number (${bad}).`);
          rows.push({ ...head, status: 'ok', result: result as Record<string, unknown> });
        } catch (err) {
          rows.push({ ...head, status: 'error', problem: caseProblem(err, base, line) });
        }
      }
      return { rows, ok: rows.map((r) => r.status === 'ok') };
    },
    refused: (index: number, p: BatchProblem): BatchRow => ({
      ...place(index).head,
      status: 'error',
      problem: p,
    }),
    answer(rows: unknown[], unitsCharged: number): BatchResponse {
      const results = rows as BatchRow[];
      const failed = results.filter((r) => r.status === 'error').length;
      return {
        operation: batch.operation,
        count: results.length,
        succeeded: results.length - failed,
        failed,
        unitsCharged,
        results,
      };
    },
    csv(rows: unknown[]): string {
      const flatRows = (rows as BatchRow[]).map((r) => {
        // CSV cases are numbered by their input line (header = line 1), JSON cases by index.
        const flat: Record<string, unknown> =
          r.line !== undefined ? { line: r.line, status: r.status } : { index: r.index, status: r.status };
        if (r.result) flatten(r.result, '', flat);
        if (r.problem) flat.error = errorCell(r.problem);
        return flat;
      });
      const columns = [...new Set(flatRows.flatMap((r) => Object.keys(r)))];
      return toCsv(columns, flatRows);
    },
  };
}

// Text fields can hold an inline liquor definition, so they keep multer's 1 MB default.
const readUpload = singleCsvUpload();

/** The batch operation over the declarations that name a batch name. */
export function batchOperation(operations: readonly AnyOperation[]) {
  const byName = new Map<string, { op: CompiledOperation; requestKeys: ReadonlySet<string> }>();
  for (const decl of operations) {
    const name = (decl.operation as { batchName?: string }).batchName;
    if (name === undefined) continue;
    const op = compileOperation(decl);
    const part = (op.body ?? op.query)?.schema as { shape?: Record<string, unknown> } | undefined;
    byName.set(name, { op, requestKeys: new Set(Object.keys(part?.shape ?? {})) });
  }
  // One work per input object: a request's 202 check and synchronous answer share it.
  const opened = new WeakMap<BatchInput, ReturnType<typeof batchWork>>();
  const openBatch = (input: BatchInput) => {
    let work = opened.get(input);
    if (!work) {
      work = batchWork(byName, input);
      opened.set(input, work);
    }
    return work;
  };
  return declareOperation({
    operation: operationCatalogue.batch,
    method: 'post',
    path: '/v1/batch',
    openApiName: 'postBatch',
    tag: 'Batch',
    summary: `Many cases of one operation (JSON array or CSV upload, at most ${MAX_BATCH_ROWS} cases)`,
    description:
      'A failing case does not fail the batch: it gets its own problem. A refused case costs nothing, as it would on its own route: ' +
      'units charged are the sum of the costs of the cases that succeeded. The quota must cover every case before any runs (429 otherwise), ' +
      'so a batch never overshoots the quota; the units of the cases that fail are then given back. ' +
      'Send `Accept: text/csv` to receive the results as CSV (one line per case, dotted column names, `status` and `error` columns).',
    request: {
      query: BatchQuerySchema,
      body: BatchRequestSchema,
      upload: BatchUploadSchema,
      example: {
        name: 'caustic-sweep',
        summary: 'Boiling points along an invented caustic concentration sweep',
      },
    },
    response: {
      description: 'One result or problem per case',
      schema: BatchResponseSchema,
      alternatives: { 'text/csv': { schema: z.string().meta({ description: 'One line per case' }) } },
    },
    problems: {
      413: `More than ${MAX_BATCH_ROWS} cases, or the upload is too large (type payload-too-large)`,
    },
    jobs: {
      // A batch's job is named as the batch operation.
      kind: operationCatalogue.batch.id,
      accept: async (req, res) => {
        let raw: unknown;
        // The CSV line of each case when the cases came as CSV: problems and output name it.
        let lines: number[] | undefined;
        if (req.is('multipart/form-data')) {
          await readUpload(req, res);
          const body = (req.body ?? {}) as Record<string, unknown>;
          if (!req.file) {
            throw problem('validation-failed', 'The upload needs a CSV file in the field "file".', {
              errors: [{ field: 'file', message: 'is required' }],
            });
          }
          const read = casesFromCsv(req.file.buffer.toString('utf8'));
          lines = read.lines;
          raw = {
            operation: body.operation,
            ...(body.liquor ? { liquor: body.liquor } : {}),
            cases: read.cases,
          };
        } else if (typeof req.body === 'string') {
          const q = req.query as Record<string, unknown>;
          const read = casesFromCsv(req.body);
          lines = read.lines;
          raw = {
            operation: q.operation,
            ...(q.liquor ? { liquor: q.liquor } : {}),
            cases: read.cases,
          };
        } else {
          raw = req.body;
        }
        const cases = (raw as { cases?: unknown } | undefined)?.cases;
        if (Array.isArray(cases) && cases.length > MAX_BATCH_ROWS) {
          throw problem(
            'payload-too-large',
            `The batch has ${cases.length} cases; at most ${MAX_BATCH_ROWS} are accepted per request.`,
          );
        }
        const batch = lines ? validateCsvBatch(raw, lines) : validate(BatchRequestSchema, raw);
        const query = validate(BatchQuerySchema, req.query);
        const input: BatchInput = { batch, ...(lines ? { lines } : {}) };
        return {
          input,
          total: batch.cases.length,
          ...(query.callbackUrl !== undefined
            ? { callbackUrl: query.callbackUrl, callbackField: 'callbackUrl' }
            : {}),
        };
      },
      respond: async (accepted, req, res, ctx) => {
        const work = openBatch(accepted.input as BatchInput);
        const reserved = work.costs.reduce((sum, u) => sum + u, 0);
        // Reserve every case's cost first: the quota check must cover the whole batch.
        chargeUnits(res, reserved);
        let ran: { rows: BatchRow[]; ok: boolean[] };
        try {
          ran = await work.run(0, work.total, ctx);
        } catch (err) {
          // Hung or crashed: no case is answered, so none is charged.
          releaseUnits(res, reserved);
          throw poolProblem(err, res.locals.requestId);
        }
        // A refused case costs nothing: give back what the failed cases reserved.
        const refunded = ran.ok.reduce((sum, ok, i) => sum + (ok ? 0 : work.costs[i]!), 0);
        releaseUnits(res, refunded);
        const response = work.answer(ran.rows, reserved - refunded);
        if (req.accepts(['application/json', 'text/csv']) === 'text/csv') {
          res.type('text/csv').send(work.csv(ran.rows));
          return;
        }
        await sendJsonInSlices(res, response, 'results');
      },
      open: (input) => openBatch(input as BatchInput),
    },
  });
}
