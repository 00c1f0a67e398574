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
 *   catalogue `batchName`, and each case runs as that operation's own request.
 *
 * Field paths in problems are relative to the request part (`feed.massFlow`); a batch re-bases
 * them onto its case.
 */
import type { Request, RequestHandler, Response, Router } from 'express';
import type { z } from 'zod';
import type { CatalogueEntry } from '../../../shared/operations.js';
import type { Db, Sqlite } from '../../db/client.js';
import type { AppDeps } from '../../deps.js';
import { chargeUnits, guardOperation, releaseUnits } from '../middleware/operation.js';
import { siPlan, toSI, type SI, type SiPlan } from '../quantities.js';
import { sendCalculation } from '../send.js';
import { validate } from '../validate.js';

/** What a calculation may use besides its input. */
export interface OperationContext {
  accountId: number;
  db: Db;
  sqlite: Sqlite;
  engineVersion: string;
  clock: () => Date;
  /**
   * Gives back units of this request's charge for work that was refused after all (a study's
   * infeasible candidates, as a batch's failed cases). Absent where nothing can be given back.
   */
  releaseUnits?: (units: number) => void;
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

export type OpenApiTag = 'Steam' | 'Liquors' | 'Evaporators' | 'Studies' | 'Batch' | 'Usage';

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
  load?: (parts: { params: Out<P>; query: Out<Q>; body: Out<B> }, ctx: OperationContext) => L;
  loadAfterBody?: boolean;
  /** The calculation: input in SI → the response body. */
  run?: (input: OperationInput<P, Q, B, L>, ctx: OperationContext) => R;
  /** How a `run` result is sent: 'calculation' (the non-finite guard) or Express's res.json. */
  send?: 'calculation' | 'json';
  /** For an operation that answers itself (content negotiation, uploads): replaces `run`. */
  handle?: (req: Request, res: Response, ctx: OperationContext) => void | Promise<void>;
  /**
   * An operation whose catalogue entry has a `batchName` runs in a batch, each case as the body
   * (or query) of its own request. Here it may say how: `load` finds what the path would name
   * from the case (and the batch's shared fields), and `units` prices a case.
   */
  batch?: {
    load?: (c: Record<string, unknown>, shared: { liquor?: unknown }, ctx: OperationContext) => L;
    /** Fields of the case that `load` consumed and the body must not see. */
    consumes?: readonly string[];
    /** Units of one case (default: the catalogue's base units). */
    units?: (c: Record<string, unknown>) => number;
  };
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
 * Parses a request for `op` and runs it: params are validated, then (by default) `load` finds
 * what the path names, then query and body are validated (`load` runs here instead with
 * `loadAfterBody`), then every quantity is converted to SI, then `run`. A batch case brings what
 * `load` would find in `caseLoad`.
 */
export function runOperation(
  op: CompiledOperation,
  raw: { params?: unknown; query?: unknown; body?: unknown },
  ctx: OperationContext,
  caseLoad?: { value: unknown },
): unknown {
  const decl = op.decl;
  const load = caseLoad ? undefined : decl.load;
  // A batch case has no path: it brings what `load` would have found from the path's params.
  const params: unknown = op.params && !caseLoad ? validate(op.params.schema, raw.params) : undefined;
  let loaded: unknown = caseLoad?.value;
  if (load && !decl.loadAfterBody) loaded = load({ params, query: undefined, body: undefined }, ctx);
  const query: unknown = op.query ? validate(op.query.schema, raw.query) : undefined;
  const body: unknown = op.body ? validate(op.body.schema, raw.body) : undefined;
  if (load && decl.loadAfterBody) loaded = load({ params, query, body }, ctx);
  const context = { liquor: liquorOf(loaded, body) };
  return decl.run!(
    {
      params: op.params && !caseLoad ? toSI(op.params.plan, params, context) : undefined,
      query: op.query ? toSI(op.query.plan, query, context) : undefined,
      body: op.body ? toSI(op.body.plan, body, context) : undefined,
      loaded,
    },
    ctx,
  );
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

function contextOf(res: Response, deps: AppDeps): OperationContext {
  return {
    accountId: res.locals.auth!.accountId,
    db: deps.db,
    sqlite: deps.sqlite,
    engineVersion: deps.engineVersion,
    clock: deps.clock,
    releaseUnits: (units) => releaseUnits(res, units),
  };
}

/** Registers one declared operation on the v1 router. */
export function mountOperation(router: Router, decl: AnyOperation, deps: AppDeps): void {
  const op = compileOperation(decl);
  const status = decl.response.status ?? 200;
  const extraUnits = decl.extraUnits;
  const handler: RequestHandler = decl.handle
    ? (req, res) => decl.handle!(req, res, contextOf(res, deps))
    : (req, res) => {
        if (extraUnits) {
          const extra = extraUnits(req.body);
          if (extra) chargeUnits(res, extra);
        }
        const result = runOperation(op, req, contextOf(res, deps));
        if (status === 204) res.status(204).end();
        else if (decl.send === 'json') res.status(status).json(result);
        else sendCalculation(res, result, status);
      };
  router[decl.method](
    routerPath(decl.path),
    guardOperation(decl.operation),
    ...(decl.middleware ?? []),
    handler,
  );
}
