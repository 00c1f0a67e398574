/**
 * `declareOperation({...})`: the one declaration of a /v1 operation. It names the catalogue
 * entry (shared/operations.ts: dotted id, scope, unit cost, batch name), the method and path, the
 * request and response contracts with a worked example, the OpenAPI wording, and the calculation
 * (`run(input, ctx)` returning the response object). From the list of declarations
 * (./operations/index.ts) come:
 *
 * - the /v1 router ({@link mountOperation}): scope check, quota and metering (`requireOperation`),
 *   then params → `load` → query → body, each validated by its contract and converted to SI
 *   (server/http/quantities.ts), then `run`, then the answer (through the non-finite guard);
 * - the OpenAPI document (server/http/openapi.ts), with the operationId `openApiName`;
 * - the batch dispatcher (./batch.ts): a batch's `operation` names a declaration by its
 *   catalogue `batchName`, and each case runs as that operation's own request;
 * - jobs: a declaration with a `jobs` part answers 202 and runs in the background when asked or
 *   large (`jobHandler` below, server/http/jobs/), and gets the /v1/jobs routes (./operations/jobs.ts).
 *
 * Field paths in problems are relative to the request part (`feed.massFlow`); a batch re-bases
 * them onto its case.
 */
import type { Request, RequestHandler, Response, Router } from 'express';
import type { z } from 'zod';
import type { CatalogueEntry } from '../../../shared/operations.js';
import type { Store } from '../../db/store.js';
import type { AppDeps } from '../../deps.js';
import {
  reviveError,
  engineTasks,
  type EngineTaskName,
  type TaskOutcome,
} from '../../workers/engine-tasks.js';
import { EngineCallError, type EnginePool } from '../../workers/engine-pool.js';
import { signingSecretCreatedAt } from '../../accounts/signing-secrets.js';
import { jobSettings } from '../../config.js';
import { calculate, type FieldMap } from '../engine-errors.js';
import { checkCallbackUrl } from '../jobs/callback.js';
import { createJob, jobResource, newJobId } from '../jobs/repo.js';
import { idempotency } from '../middleware/idempotency.js';
import { chargeUnits, guardOperation, releaseUnits } from '../middleware/operation.js';
import { problem, type ProblemError } from '../problem.js';
import { siPlan, toSI, type SI, type SiPlan } from '../quantities.js';
import { sendCalculation } from '../send.js';
import { validate } from '../validate.js';

/** What a calculation may use besides its input. */
export interface OperationContext {
  accountId: number;
  /** The data store (server/db/store.ts). */
  store: Store;
  engineVersion: string;
  clock: () => Date;
  /** The worker threads of heavy calculations (absent: everything inline). */
  enginePool?: EnginePool;
  /**
   * Gives back units of this request's charge for work that was refused after all (a study's
   * infeasible candidates, as a batch's failed cases). Absent where nothing can be given back.
   */
  releaseUnits?: (units: number) => void;
  /** Jobs: how long an ended job is kept, and the runner's hook for a job ended by a request. */
  jobs?: { retentionMs: number; ended: (jobId: string) => void };
}

type Out<S> = S extends z.ZodType ? z.output<S> : undefined;
type Part<S> = S extends z.ZodType ? SI<z.output<S>> : undefined;

/** A request parsed by its contracts, quantities in SI, with what `load` found. */
export interface OperationInput<P, Q, B, L> {
  params: Part<P>;
  query: Part<Q>;
  body: Part<B>;
  loaded: L;
}

export type OpenApiTag = 'Steam' | 'Liquors' | 'Evaporators' | 'Studies' | 'Batch' | 'Jobs' | 'Usage';

export interface OperationDeclaration<
  P extends z.ZodType | undefined = z.ZodType | undefined,
  Q extends z.ZodType | undefined = z.ZodType | undefined,
  B extends z.ZodType | undefined = z.ZodType | undefined,
  L = unknown,
  R = unknown,
> {
  /** The catalogue entry (shared/operations.ts): dotted id, scope, units, batch name. */
  operation: CatalogueEntry;
  method: 'get' | 'post' | 'put' | 'delete';
  /** Full OpenAPI-style path (`/v1/liquors/{liquorId}`); the router mounts it under /v1. */
  path: string;
  /** The OpenAPI operationId (kept as published; see DEVELOPERS.md). */
  openApiName: string;
  tag: OpenApiTag;
  summary: string;
  description?: string;
  request?: {
    params?: P;
    query?: Q;
    body?: B;
    /** The worked example of the body: its value (default: the body schema's own example). */
    example?: { summary: string; name?: string; value?: unknown };
    /** The multipart/form-data alternative of the body. */
    upload?: z.ZodType;
  };
  response: {
    status?: 200 | 201 | 204;
    description: string;
    schema?: z.ZodType;
    /** A worked answer, for an operation that takes no input. */
    example?: unknown;
    /** Other media types of the answer. */
    alternatives?: Record<string, { schema: z.ZodType }>;
  };
  /** Problem statuses this operation adds to the common ones (401, 403, 422, 429). */
  problems?: Record<number, string>;
  /** Express middleware run after the scope/quota guard (e.g. a multipart reader). */
  middleware?: RequestHandler[];
  /**
   * Units beyond the catalogue's base cost, read from the raw body before it is parsed, so a
   * request the quota cannot cover is refused before any work (undefined: not readable yet).
   */
  extraUnits?: (body: unknown) => number | undefined;
  /**
   * Finds what the request names (a liquor: 404 'not-found'): from the path, before the body is
   * read, or with `loadAfterBody` from the validated body (before its quantities are converted).
   */
  load?: (parts: { params: Out<P>; query: Out<Q>; body: Out<B> }, ctx: OperationContext) => L | Promise<L>;
  loadAfterBody?: boolean;
  /**
   * The calculation: input in SI → the response body. A run that reads the database returns a
   * promise (the router awaits it; such an operation is not run in a batch).
   */
  run?: (input: OperationInput<P, Q, B, L>, ctx: OperationContext) => R | Promise<R>;
  /**
   * A heavy calculation, in three steps so that the middle one may run in a worker thread
   * (server/workers/): `input` (main thread) turns the request in SI into the task's plain
   * input, with the liquor as a description; the task `task` (server/workers/engine-tasks.ts)
   * runs the engine, in the pool or inline; `output` (main thread) formats the engine's plain
   * result. Replaces `run`. A batch always sends its cases to the pool; a single call goes there
   * when `offload` says so (past the crossover measured by tests/bench/pool.ts), else it runs
   * inline, which is faster for light calls.
   */
  engine?: EnginePart<OperationInput<P, Q, B, L>, R>;
  /**
   * The operation is deprecated (DEVELOPERS.md "How /v1 evolves"): every answer carries the
   * `Deprecation` (RFC 9745) and, with `sunset`, `Sunset` (RFC 8594) headers and a `Link` to
   * `link`; the OpenAPI document marks it `deprecated` and states the dates.
   */
  deprecation?: Deprecation;
  /**
   * Whether a logged call may be run again on today's engine (the console's replay,
   * server/http/replay.ts). Default: an operation a batch may run (its catalogue entry has a
   * `batchName`: a calculation that changes nothing stored). Replay needs the retained body; the query string is never logged.
   */
  replay?: boolean;
  /** How a `run` result is sent: 'calculation' (the non-finite guard) or Express's res.json. */
  send?: 'calculation' | 'json';
  /** For an operation that answers itself (content negotiation, uploads): replaces `run`. */
  handle?: (req: Request, res: Response, ctx: OperationContext) => void | Promise<void>;
  /**
   * An operation whose catalogue entry has a `batchName` runs in a batch, each case as the body
   * (or query) of its own request. Here it may say how: `load` finds what the path would name
   * from the case (and the batch's shared fields), and `units` prices a case.
   */
  /**
   * The operation may run as a job (server/http/jobs/): a long run of points answered `202
   * Accepted` with `Location: /v1/jobs/{id}` when the request says `Prefer: respond-async` or has
   * more points than the `asyncJobThreshold` setting. Replaces `handle`: the router reads the
   * request with `accept`, then either answers at once with `respond` or stores the accepted input
   * as a job, which the runner rebuilds with `open` and runs a chunk of points at a time.
   */
  jobs?: JobPart;
  batch?: {
    load?: (
      c: Record<string, unknown>,
      shared: { liquor?: unknown },
      ctx: OperationContext,
    ) => L | Promise<L>;
    /** Fields of the case that `load` consumed and the body must not see. */
    consumes?: readonly string[];
    /** Units of one case (default: the catalogue's base units). */
    units?: (c: Record<string, unknown>) => number;
  };
}

/** What an operation that may run as a job accepted: its input (plain JSON) and its size. */
export interface Accepted {
  /** The checked request as plain JSON: stored with the job, handed back to `respond` and `open`. */
  input: unknown;
  /** Points (or cases) the request runs. */
  total: number;
  /** The job's `callbackUrl`, if the request gave one (checked by the router). */
  callbackUrl?: string;
  /** The field the callback URL came in, for a refusal (`callbackUrl` or `query.callbackUrl`). */
  callbackField?: string;
}

/** See {@link OperationDeclaration.jobs}. */
export interface JobPart {
  /** The job resource's `operation` ('batch', 'sweep'). */
  kind: string;
  /** Reads and checks the request, refusing as the synchronous call would; charges nothing. */
  accept: (req: Request, res: Response, ctx: OperationContext) => Promise<Accepted>;
  /** The synchronous answer (charging, running and sending as the operation always did). */
  respond: (accepted: Accepted, req: Request, res: Response, ctx: OperationContext) => Promise<void>;
  /** The work of a stored input, a chunk of points at a time. */
  open: (input: unknown) => JobWork;
}

/** A job's points, run a chunk at a time; rows are in the synchronous answer's own format. */
export interface JobWork {
  total: number;
  /** Units point `index` costs when it succeeds (its single call's price). */
  cost: (index: number) => number;
  /** Runs points [start, end): their rows, and whether each succeeded. Throws a pool failure. */
  run: (start: number, end: number, ctx: OperationContext) => Promise<{ rows: unknown[]; ok: boolean[] }>;
  /** The row of a point refused for want of quota. */
  refused: (index: number, problem: ProblemBody) => unknown;
  /** The JSON answer the synchronous call gives for these rows. */
  answer: (rows: unknown[], unitsCharged: number) => Record<string, unknown>;
  /** The key of the rows in the answer (written a slice at a time). */
  rowsKey: string;
  /** The CSV answer (`Accept: text/csv`); the query is the result request's (e.g. `columns`). */
  csv: (rows: unknown[], query: Record<string, unknown>) => string;
}

/** A problem as plain JSON (a row's). */
export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail?: string;
  errors?: { field: string; message: string }[];
}

/** When an operation was deprecated, when it goes away, and the page that says what replaces it. */
export interface Deprecation {
  since: Date;
  sunset?: Date;
  /** An absolute URL of the documentation page (what replaces the operation, how to move). */
  link: string;
}

/**
 * The response headers of a deprecated operation:
 * - `Deprecation: @<unix seconds>`: RFC 9745 §2.1, a Structured Field Date (RFC 9651 §3.3.7);
 * - `Sunset: <IMF-fixdate>`: RFC 8594 §3, an HTTP-date (RFC 9110 §5.6.7);
 * - `Link: <url>; rel="deprecation"; type="text/html"` (RFC 9745 §3) and, with a sunset,
 *   `<url>; rel="sunset"; type="text/html"` (RFC 8594 §6).
 *
 * E.g. a deprecation since 2032-01-01T00:00:00Z is sent as `Deprecation: @1956528000`.
 */
export function deprecationHeaders(d: Deprecation): Record<string, string> {
  const links = [`<${d.link}>; rel="deprecation"; type="text/html"`];
  const headers: Record<string, string> = { Deprecation: `@${Math.floor(d.since.getTime() / 1000)}` };
  if (d.sunset) {
    headers.Sunset = d.sunset.toUTCString();
    links.push(`<${d.link}>; rel="sunset"; type="text/html"`);
  }
  headers.Link = links.join(', ');
  return headers;
}

/** The sentence the OpenAPI description of a deprecated operation ends with. */
export function deprecationNote(d: Deprecation): string {
  const day = (date: Date) => date.toISOString().slice(0, 10);
  return (
    `**Deprecated** since ${day(d.since)}` +
    (d.sunset ? `; it stops answering on ${day(d.sunset)} (the \`Sunset\` header)` : '') +
    `. Every answer carries the \`Deprecation\` header and a \`Link\` to ${d.link}, which says what replaces it.`
  );
}

export interface EnginePart<I, R> {
  /** The engine task: the operation's id in server/workers/engine-tasks.ts. */
  task: EngineTaskName;
  /** The request in SI → the task's input: plain data only (may throw problems). */
  input: (input: I, ctx: OperationContext) => unknown;
  /** Engine field names → request paths, for the errors of `input` and of the task. */
  fields: FieldMap;
  /** Whether a single call goes to the pool (default: yes). */
  offload?: (taskInput: never) => boolean;
  /** The engine's result (plain data, the task's result type) → the response body. */
  output: (result: never, input: I, ctx: OperationContext) => R;
}

/** Declares an operation (typed; nothing happens until the router and the document read it). */
export function declareOperation<
  P extends z.ZodType | undefined = undefined,
  Q extends z.ZodType | undefined = undefined,
  B extends z.ZodType | undefined = undefined,
  L = undefined,
  R = unknown,
>(decl: OperationDeclaration<P, Q, B, L, R>): OperationDeclaration<P, Q, B, L, R> {
  return decl;
}

// The declarations are stored in one list of mixed types; this is the erased view of one.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type AnyOperation = OperationDeclaration<any, any, any, any, any>;

/** `/v1/liquors/{liquorId}` → `/liquors/:liquorId` (the v1 router's own path). */
export function routerPath(path: string): string {
  return path.replace(/^\/v1/, '').replace(/\{(\w+)\}/g, ':$1');
}

/** The path of an operation with its parameters filled in (e.g. a Location header). */
export function pathOf(decl: AnyOperation, params: Record<string, string>): string {
  return decl.path.replace(/\{(\w+)\}/g, (_, name: string) => encodeURIComponent(params[name] ?? ''));
}

/** Per declaration, built once: the parts' schemas and their SI conversion plans. */
export interface CompiledOperation {
  decl: AnyOperation;
  params?: { schema: z.ZodType; plan: SiPlan };
  query?: { schema: z.ZodType; plan: SiPlan };
  body?: { schema: z.ZodType; plan: SiPlan };
}

export function compileOperation(decl: AnyOperation): CompiledOperation {
  const part = (schema: z.ZodType | undefined) => (schema ? { schema, plan: siPlan(schema) } : undefined);
  const out: CompiledOperation = { decl };
  const params = part(decl.request?.params);
  const query = part(decl.request?.query);
  const body = part(decl.request?.body);
  if (params) out.params = params;
  if (query) out.query = query;
  if (body) out.body = body;
  return out;
}

/**
 * A request parsed and converted, ready to answer: `done` holds the answer of a `run`
 * operation; an `engine` operation holds its task, to run in the pool or inline, and `finish`,
 * which formats the task's result (`get` returns it or throws the engine's error).
 */
export type Prepared =
  | { done: unknown }
  | {
      task: EngineTaskName;
      taskInput: unknown;
      offload: boolean;
      finish: (get: () => unknown) => unknown;
    };

/**
 * Parses a request for `op` and prepares it: params are validated, then (by default) `load`
 * finds what the path names, then query and body are validated (`load` runs here instead with
 * `loadAfterBody`), then every quantity is converted to SI, then `run` (or the `engine` part's
 * `input`). A batch case brings what `load` would find in `caseLoad`.
 */
export async function prepareOperation(
  op: CompiledOperation,
  raw: { params?: unknown; query?: unknown; body?: unknown },
  ctx: OperationContext,
  caseLoad?: { value: unknown },
): Promise<Prepared> {
  const decl = op.decl;
  const load = caseLoad ? undefined : decl.load;
  // A batch case has no path: it brings what `load` would have found from the path's params.
  const params: unknown = op.params && !caseLoad ? validate(op.params.schema, raw.params) : undefined;
  let loaded: unknown = caseLoad?.value;
  if (load && !decl.loadAfterBody) loaded = await load({ params, query: undefined, body: undefined }, ctx);
  const query: unknown = op.query ? validate(op.query.schema, raw.query) : undefined;
  const body: unknown = op.body ? validate(op.body.schema, raw.body) : undefined;
  if (load && decl.loadAfterBody) loaded = await load({ params, query, body }, ctx);
  const context = { liquor: liquorOf(loaded, body) };
  const input = {
    params: op.params && !caseLoad ? toSI(op.params.plan, params, context) : undefined,
    query: op.query ? toSI(op.query.plan, query, context) : undefined,
    body: op.body ? toSI(op.body.plan, body, context) : undefined,
    loaded,
  };
  const engine = decl.engine;
  if (!engine) return { done: await decl.run!(input, ctx) };
  const taskInput = calculate(engine.fields, () => engine.input(input, ctx));
  return {
    task: engine.task,
    taskInput,
    offload: (engine.offload as ((t: unknown) => boolean) | undefined)?.(taskInput) ?? true,
    finish: (get) =>
      (engine.output as (result: unknown, i: typeof input, c: OperationContext) => unknown)(
        calculate(engine.fields, get),
        input,
        ctx,
      ),
  };
}

/** Runs an engine task here, its errors thrown as the engine threw them. */
export function runTaskInline(task: EngineTaskName, taskInput: unknown): unknown {
  return (engineTasks[task] as (input: unknown) => unknown)(taskInput);
}

/** A pooled task's outcome: its result, or its engine error rebuilt and thrown. */
export function outcomeValue(outcome: TaskOutcome): unknown {
  if (!outcome.ok) throw reviveError(outcome.error);
  return outcome.value;
}

/** What the pool could not answer, as the request's problem (503 timeout, 500 failure), logged. */
export function poolProblem(err: unknown, requestId: unknown): ProblemError {
  if (!(err instanceof EngineCallError)) throw err;
  console.error(`[engine-pool] request ${String(requestId)}: ${err.message}`);
  return err.kind === 'timeout'
    ? problem(
        'calculation-timeout',
        `${err.message} It was stopped and nothing was charged; quote request id ${String(requestId)} if it recurs.`,
      )
    : problem(
        'calculation-failed',
        `${err.message} Nothing was charged; quote request id ${String(requestId)} if it recurs.`,
      );
}

/** Whether tasks go to worker threads (a pool with threads, not destroyed). */
export function pooled(pool: EnginePool | undefined): pool is EnginePool {
  return pool !== undefined && pool.workers > 0 && !pool.destroyed;
}

/**
 * Parses and runs one call of `op`: its engine task in the worker pool when the task asks to be
 * offloaded and a pool is there, else on this thread. A pool that fails answers the 5xx problem
 * naming the request (poolProblem).
 */
export async function runCall(
  op: CompiledOperation,
  raw: { params?: unknown; query?: unknown; body?: unknown },
  ctx: OperationContext,
  pool: EnginePool | undefined,
  requestId: unknown,
): Promise<unknown> {
  const prepared = await prepareOperation(op, raw, ctx);
  if ('done' in prepared) return prepared.done instanceof Promise ? await prepared.done : prepared.done;
  if (prepared.offload && pooled(pool)) {
    let outcome: TaskOutcome;
    try {
      outcome = await pool.run(prepared.task, prepared.taskInput);
    } catch (err) {
      throw poolProblem(err, requestId);
    }
    return prepared.finish(() => outcomeValue(outcome));
  }
  return prepared.finish(() => runTaskInline(prepared.task, prepared.taskInput));
}

/** Parses and runs a request for `op` on this thread (the engine inline). */
export async function runOperation(
  op: CompiledOperation,
  raw: { params?: unknown; query?: unknown; body?: unknown },
  ctx: OperationContext,
  caseLoad?: { value: unknown },
): Promise<unknown> {
  const prepared = await prepareOperation(op, raw, ctx, caseLoad);
  if ('done' in prepared) return prepared.done;
  return prepared.finish(() => runTaskInline(prepared.task, prepared.taskInput));
}

/**
 * The liquor a request is about, for units that fit one liquor only (°Bx): the model `load`
 * found, else the body's liquor id ("custom" for an inline definition).
 */
function liquorOf(loaded: unknown, body: unknown): string | undefined {
  const id = (loaded as { model?: { id?: unknown } } | null | undefined)?.model?.id;
  if (typeof id === 'string') return id;
  const ref = (body as { liquor?: unknown } | null | undefined)?.liquor;
  if (typeof ref === 'string') return ref;
  return ref !== null && typeof ref === 'object' ? 'custom' : undefined;
}

/** The jobs' part of a context, made once per app (contexts are made per request). */
const jobsContexts = new WeakMap<AppDeps, NonNullable<OperationContext['jobs']>>();
function jobsContextOf(deps: AppDeps): NonNullable<OperationContext['jobs']> {
  let jobs = jobsContexts.get(deps);
  if (!jobs) {
    jobs = {
      retentionMs: jobSettings(deps.config).retentionMs,
      ended: (jobId) => deps.jobRunner?.ended(jobId),
    };
    jobsContexts.set(deps, jobs);
  }
  return jobs;
}

function contextOf(res: Response, deps: AppDeps): OperationContext {
  return {
    accountId: res.locals.auth!.accountId,
    store: deps.store,
    engineVersion: deps.engineVersion,
    clock: deps.clock,
    ...(deps.enginePool ? { enginePool: deps.enginePool } : {}),
    releaseUnits: (units) => releaseUnits(res, units),
    jobs: jobsContextOf(deps),
  };
}

/** Whether a `Prefer` header (RFC 7240 §2) asks for `respond-async`. */
export function prefersAsync(header: string | undefined): boolean {
  if (!header) return false;
  return header
    .split(',')
    .some((preference) => preference.split(';')[0]!.split('=')[0]!.trim().toLowerCase() === 'respond-async');
}

/**
 * The handler of an operation that may run as a job: the request is read and checked by `accept`
 * (refusals as the synchronous call's), then answered at once by `respond`, or, asked with
 * `Prefer: respond-async` or larger than the threshold, stored as a job and answered `202
 * Accepted` with `Location: /v1/jobs/{id}` and the job resource. The 202 charges nothing (it is
 * metered as a 2xx of 0 units); the points charge as the runner commits them. A callback URL is
 * checked here (422 naming the field), and needs the account's signing secret.
 */
function jobHandler(part: JobPart, deps: AppDeps): RequestHandler {
  return async (req, res) => {
    const ctx = contextOf(res, deps);
    const accepted = await part.accept(req, res, ctx);
    const settings = jobSettings(deps.config);
    const preferred = prefersAsync(req.get('prefer'));
    if (!preferred && accepted.total <= settings.threshold) {
      await part.respond(accepted, req, res, ctx);
      return;
    }
    const field = accepted.callbackField ?? 'callbackUrl';
    let callbackUrl: string | undefined;
    if (accepted.callbackUrl !== undefined) {
      callbackUrl = (await checkCallbackUrl(accepted.callbackUrl, field, settings.allowLoopbackCallbacks))
        .href;
      if ((await signingSecretCreatedAt(deps.store, ctx.accountId)) === undefined) {
        throw problem(
          'validation-failed',
          `${field}: the account has no signing secret to sign the callback with.`,
          {
            errors: [
              {
                field,
                message:
                  'needs the account’s signing secret; create one in the console (account → signing secret)',
              },
            ],
          },
        );
      }
    }
    // Not even the first point fits the quota: refused now, as the synchronous call would be.
    const work = part.open(accepted.input);
    if (work.total > 0) {
      chargeUnits(res, work.cost(0));
      releaseUnits(res, work.cost(0));
    }
    const job = await createJob(deps.store, {
      id: newJobId(),
      accountId: ctx.accountId,
      keyId: res.locals.auth?.keyId ?? null,
      operation: part.kind,
      input: accepted.input,
      total: accepted.total,
      callbackUrl,
      now: deps.clock(),
    });
    deps.jobRunner?.wake();
    res.status(202).location(`/v1/jobs/${job.id}`);
    if (preferred) res.setHeader('Preference-Applied', 'respond-async');
    res.json(jobResource(job));
  };
}

/** Registers one declared operation on the v1 router. */
export function mountOperation(router: Router, decl: AnyOperation, deps: AppDeps): void {
  const op = compileOperation(decl);
  const status = decl.response.status ?? 200;
  const extraUnits = decl.extraUnits;
  const handler: RequestHandler = decl.jobs
    ? jobHandler(decl.jobs, deps)
    : decl.handle
      ? (req, res) => decl.handle!(req, res, contextOf(res, deps))
      : async (req, res) => {
          if (extraUnits) {
            const extra = extraUnits(req.body);
            if (extra) chargeUnits(res, extra);
          }
          const result = await runCall(op, req, contextOf(res, deps), deps.enginePool, res.locals.requestId);
          if (status === 204) res.status(204).end();
          else if (decl.send === 'json') res.status(status).json(result);
          else sendCalculation(res, result, status);
        };
  const deprecation = decl.deprecation ? deprecationHeaders(decl.deprecation) : undefined;
  // Set first, so every answer of the operation carries them (problems included).
  const announce: RequestHandler[] = deprecation
    ? [
        (_req, res, next) => {
          for (const [name, value] of Object.entries(deprecation)) res.append(name, value);
          next();
        },
      ]
    : [];
  // Every POST takes an Idempotency-Key (middleware/idempotency.ts), after the scope and quota
  // guard (a refused request is not an answer to keep) and before any work.
  router[decl.method](
    routerPath(decl.path),
    ...announce,
    guardOperation(decl.operation),
    ...(decl.method === 'post' ? [idempotency(deps.store, deps.clock)] : []),
    ...(decl.middleware ?? []),
    handler,
  );
}
