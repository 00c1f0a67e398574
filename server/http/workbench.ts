/**
 * The console's workbench: a /v1 calculation, or a sweep of it, run on behalf of one API key,
 * through the operation's declaration (server/http/v1/operation.ts) in this process, as the
 * request-log replay is (./replay.ts). The call is the key's own:
 *
 * - refused (403) when the key is revoked or expired, or lacks the operation's scope;
 * - its body checked at the door as any /v1 body is (prototype keys, nesting depth), then by the
 *   operation's contract, so a refusal is the API's own problem naming the body's field;
 * - metered to the key's account with the operation's units (a sweep: each succeeding point's
 *   cost), refused with 'quota-exceeded' when the month's quota cannot cover it;
 * - logged under the key with the public method and path, so the request log shows it as a call
 *   of its own (and "Run again" can replay it); refusals are logged with 0 units.
 *
 * Which operations: the calculations a batch may run (a catalogue `batchName`), by POST with a
 * body; each offered with its request's JSON Schema, generated from the zod contract, and its
 * worked example, so the console builds its form from the contract.
 */
import { randomUUID } from 'node:crypto';
import { z } from 'zod';
import type { WorkbenchOperation, WorkbenchResult, WorkbenchRun } from '../../shared/console/workbench.js';
import { getAccount } from '../accounts/accounts.js';
import type { ApiKeyView } from '../accounts/keys.js';
import {
  committedUnitsThisMonth,
  recordRequest,
  refusalOf,
  type RequestRecord,
} from '../accounts/metering.js';
import { logBody } from '../accounts/request-log.js';
import { nextMonthStartUtc } from '../accounts/usage.js';
import type { AppDeps } from '../deps.js';
import { toProblem } from './engine-errors.js';
import { checkJsonBody } from './middleware/body.js';
import { problem, problemFields, ProblemError } from './problem.js';
import { findNonFinite } from './send.js';
import {
  compileOperation,
  pathOf,
  runCall,
  type AnyOperation,
  type CompiledOperation,
  type OperationContext,
} from './v1/operation.js';
import { calculationOperations, calculationSweeps, operationDeclaration } from './v1/operations/index.js';
import { operationCatalogue } from '../../shared/operations.js';
import { oneConsoleCallAtATime } from './console-calls.js';

/** A declaration the workbench offers: a batch-runnable calculation taking a JSON body. */
function offered(decl: AnyOperation): decl is AnyOperation & { operation: { batchName: string } } {
  return (
    'batchName' in decl.operation &&
    decl.method === 'post' &&
    decl.request?.body !== undefined &&
    decl.request.query === undefined &&
    !decl.handle &&
    (decl.run !== undefined || decl.engine !== undefined)
  );
}

type JsonSchema = Record<string, unknown>;

/** A part's JSON Schema: the input side for requests (quantities as number or text with a unit). */
function jsonSchemaOf(schema: z.ZodType, io: 'input' | 'output' = 'input'): JsonSchema {
  return z.toJSONSchema(schema, {
    io,
    unrepresentable: 'any',
    target: 'draft-2020-12',
  }) as JsonSchema;
}

/** The `example` of a generated schema: on its root, or on the definition its root refers to. */
function schemaExample(schema: JsonSchema): unknown {
  if ('example' in schema) return schema.example;
  const ref = schema.$ref;
  const defs = schema.$defs as Record<string, JsonSchema> | undefined;
  if (typeof ref === 'string' && ref.startsWith('#/$defs/') && defs) {
    return defs[ref.slice('#/$defs/'.length)]?.example;
  }
  return undefined;
}

function paramsExample(schema: JsonSchema | null): Record<string, string> | null {
  if (!schema) return null;
  const properties = (schema.properties ?? {}) as Record<string, JsonSchema>;
  const out: Record<string, string> = {};
  for (const [name, prop] of Object.entries(properties)) {
    out[name] = typeof prop.example === 'string' ? prop.example : '';
  }
  return out;
}

let listed: WorkbenchOperation[] | undefined;

/** The operations the workbench offers, with their schemas and examples (built once). */
export function workbenchOperations(): WorkbenchOperation[] {
  listed ??= calculationOperations.filter(offered).map((decl) => {
    const body = jsonSchemaOf(decl.request!.body!);
    const params = decl.request?.params ? jsonSchemaOf(decl.request.params) : null;
    const info = decl.operation;
    return {
      id: info.id,
      title: info.title,
      label: info.label,
      scope: info.scope,
      units: info.units,
      method: decl.method,
      path: decl.path,
      batchName: info.batchName,
      sweepable: params === null,
      params,
      body,
      response: decl.response.schema ? jsonSchemaOf(decl.response.schema, 'output') : null,
      example: {
        params: paramsExample(params),
        body: decl.request?.example?.value ?? schemaExample(body) ?? {},
      },
    };
  });
  return listed;
}

/** Whether a key may be used now (the /v1 door's refusals, in the console's words). */
function keyRefusal(key: ApiKeyView, now: Date, scope: string): ProblemError | undefined {
  if (key.revokedAt && key.revokedAt <= now) {
    return problem('forbidden', `API key ${key.prefix} has been revoked; choose an active key.`);
  }
  if (key.expiresAt && key.expiresAt <= now) {
    return problem('forbidden', `API key ${key.prefix} has expired; choose an active key.`);
  }
  if (!(key.scopes as string[]).includes(scope)) {
    return problem('forbidden', `API key ${key.prefix} lacks the scope "${scope}" this operation needs.`);
  }
  return undefined;
}

function problemStatus(err: unknown): number {
  return err instanceof ProblemError ? err.status : 500;
}

/**
 * Runs the request on behalf of `key` (see the module comment). The caller has checked that the
 * user may act for the key's account.
 */
export async function runOnKey(deps: AppDeps, key: ApiKeyView, run: WorkbenchRun): Promise<WorkbenchResult> {
  const decl = operationDeclaration(run.operation);
  if (!decl || !offered(decl)) {
    throw problem(
      'validation-failed',
      `operation: "${run.operation}" is not a calculation the workbench runs.`,
      {
        errors: [{ field: 'operation', message: 'is not a calculation the workbench runs' }],
      },
    );
  }
  const sweep = run.vary !== undefined;
  if (sweep && decl.request?.params) {
    throw problem(
      'validation-failed',
      `vary: ${decl.operation.id} names its liquor in the path and is not swept here.`,
      {
        errors: [{ field: 'vary', message: 'this operation takes path parameters and cannot be swept here' }],
      },
    );
  }
  const account = await getAccount(deps.store, key.accountId);
  if (!account) throw problem('not-found', `The account of API key ${key.prefix} no longer exists.`);

  const now = deps.clock();
  const catalogueEntry = sweep ? operationCatalogue.sweep : decl.operation;
  const params = run.params ?? {};
  const path = pathOf(sweep ? operationDeclaration(operationCatalogue.sweep.id)! : decl, params);
  const publicBody = sweep
    ? { operation: decl.operation.batchName, base: run.body, vary: run.vary }
    : run.body;
  const started = performance.now();
  const requestId = randomUUID();
  const limit = deps.config.logBodyLimitBytes;
  const retain = account.retainRequestBodies;
  const record = (status: number, units: number, answer: unknown, logOnly = false): RequestRecord => ({
    at: deps.clock(),
    accountId: account.id,
    keyId: key.id,
    operation: catalogueEntry.id,
    status,
    units: status < 400 ? units : 0,
    latencyMs: Math.round(performance.now() - started),
    requestId,
    engineVersion: deps.engineVersion,
    method: 'POST',
    path,
    requestBody: retain ? logBody(publicBody, limit) : null,
    responseBody: retain ? logBody(answer, limit) : null,
    ...(logOnly ? { logOnly: true } : {}),
  });

  const refused = keyRefusal(key, now, catalogueEntry.scope);
  if (refused) {
    // As at the /v1 door: a known key's refusal is shown to its account, never metered.
    await recordRequest(deps.store, record(refused.status, 0, null, true));
    throw refused;
  }

  const quota = account.monthlyUnitQuota;
  const retryAfter = String(
    Math.max(1, Math.ceil((nextMonthStartUtc(now).getTime() - now.getTime()) / 1000)),
  );
  const quotaProblem = (wanted: number, remaining: number) =>
    problem(
      'quota-exceeded',
      `This request costs ${wanted} units but only ${remaining} of the monthly quota of ${quota} units remain.`,
      { headers: { 'Retry-After': retryAfter } },
    );

  // One workbench call of an account at a time on this node: the quota check and the charge of
  // one are not interleaved with another's.
  return oneConsoleCallAtATime(account.id, async () => {
    const used = await committedUnitsThisMonth(deps.store, account.id, now);
    let charged = 0;
    const charge = (units: number) => {
      if (used + charged + units > quota) throw quotaProblem(charged + units, Math.max(0, quota - used));
      charged += units;
    };
    const ctx: OperationContext = {
      accountId: account.id,
      store: deps.store,
      engineVersion: deps.engineVersion,
      clock: deps.clock,
      ...(deps.enginePool ? { enginePool: deps.enginePool } : {}),
      releaseUnits: (n) => (charged -= Math.min(n, charged)),
    };
    let result: unknown;
    try {
      const unsafe = checkJsonBody(run.body);
      if (unsafe) throw unsafe;
      if (sweep) {
        charge(catalogueEntry.units);
        const parsed = calculationSweeps.parse(publicBody);
        result = await calculationSweeps.run(
          parsed,
          ctx,
          { charge, release: (n) => (charged -= n), quota },
          requestId,
        );
      } else {
        const op: CompiledOperation = compileOperation(decl);
        charge(decl.operation.units + (decl.extraUnits?.(run.body) ?? 0));
        result = await runCall(op, { params, body: run.body }, ctx, deps.enginePool, requestId);
        const bad = findNonFinite(result);
        if (bad !== undefined) {
          throw problem(
            'no-solution',
            `The calculation produced a non-finite number (${bad}); no result is returned.`,
          );
        }
      }
    } catch (thrown) {
      // An engine error that escaped its field map is the problem the app would answer with.
      let err = thrown;
      try {
        err = toProblem(thrown);
      } catch {
        // unknown: a 500 from the app
      }
      // A refusal is logged under the key with 0 units, as the public call's would be.
      const status = problemStatus(err);
      await recordRequest(
        deps.store,
        record(status, 0, err instanceof ProblemError ? problemFields(err) : null),
      );
      throw err;
    }
    // The answer as a client reads it (dates as strings, no undefined).
    const answer = JSON.parse(JSON.stringify(result)) as unknown;
    const entry = record(200, charged, answer);
    await recordRequest(deps.store, entry);
    const overQuota = refusalOf(entry);
    if (overQuota) throw quotaProblem(charged, overQuota.remaining);
    return {
      kind: sweep ? 'sweep' : 'single',
      operation: decl.operation.id,
      keyId: key.id,
      accountId: account.id,
      unitsCharged: charged,
      requestId,
      request: { method: 'POST', path, body: publicBody },
      result: answer,
    };
  });
}
