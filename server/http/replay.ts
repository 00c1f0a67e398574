/**
 * Replay: a logged /v1 call run again on today's engine, through its operation's declaration
 * (server/http/v1/operation.ts), with the request body as the request log kept it. The answer
 * holds both results, a field-by-field difference and the models whose cited source changed.
 *
 * Only an operation that may be replayed (`replay`, by default one a batch may run: a calculation
 * that changes nothing stored) and only a body kept whole: a body that was not retained, was cut
 * at the log limit or had values redacted is refused ('not-replayable'), as is an operation with a
 * query string (never logged). A replay is metered to the entry's account like the operation
 * itself (its units, a usage event and a request-log row), refused with 'quota-exceeded' when the
 * account's quota cannot cover it, and costs nothing when the calculation refuses.
 */
import { randomUUID } from 'node:crypto';
import type { ReplayDifference, ReplayResult } from '../../shared/console/request-log.js';
import { getAccount } from '../accounts/accounts.js';
import {
  committedUnitsThisMonth,
  recordRequest,
  refusalOf,
  type RequestRecord,
} from '../accounts/metering.js';
import { logBody, REDACTED } from '../accounts/request-log.js';
import type { RequestLogDetailRow } from '../accounts/request-log-query.js';
import { nextMonthStartUtc } from '../accounts/usage.js';
import type { AppDeps } from '../deps.js';
import { checkJsonBody } from './middleware/body.js';
import { problem } from './problem.js';
import { compileOperation, runOperation, type AnyOperation } from './v1/operation.js';
import { operationDeclaration } from './v1/operations/index.js';
import { oneConsoleCallAtATime } from './console-calls.js';

/** Marks the request log writes into a body it could not keep whole (request-log.ts). */
const NOT_WHOLE = ['…[truncated]', '[nested too deep]', '[body not logged'];

function notReplayable(entryId: number, why: string) {
  return problem(
    'not-replayable',
    `Request-log entry ${entryId} cannot be replayed: ${why} Nothing was run or charged.`,
  );
}

/** Whether a parsed body holds a value the log replaced (a redacted secret, a cut nesting). */
function holdsRedaction(value: unknown): boolean {
  if (typeof value === 'string')
    return value === REDACTED || value.includes(REDACTED) || value === '[nested too deep]';
  if (value === null || typeof value !== 'object') return false;
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
    if (k.includes(REDACTED) || holdsRedaction(v)) return true;
  }
  return false;
}

/** `replay` of the declaration, by default: a batch may run it (a catalogue `batchName`). */
function replayable(decl: AnyOperation): boolean {
  return decl.replay ?? 'batchName' in decl.operation;
}

/** The path parameters of a logged path for a declaration's path (undefined: it does not match). */
function paramsOf(decl: AnyOperation, path: string): Record<string, string> | undefined {
  const names: string[] = [];
  const pattern = decl.path.replace(/[.*+?^$()|[\]\\]/g, '\\$&').replace(/\{(\w+)\}/g, (_m, name: string) => {
    names.push(name);
    return '([^/]+)';
  });
  const match = new RegExp(`^${pattern}$`).exec(path);
  if (!match) return undefined;
  const params: Record<string, string> = {};
  try {
    names.forEach((name, i) => (params[name] = decodeURIComponent(match[i + 1]!)));
  } catch {
    return undefined;
  }
  return params;
}

/** The logged response as JSON, or why it cannot be compared. */
function loggedResult(row: RequestLogDetailRow): { result: unknown } | { note: string } {
  const text = row.responseBody;
  if (row.status >= 400) {
    return { note: `The logged call was refused (status ${row.status}): today’s result is shown alone.` };
  }
  if (text === null) return { note: 'No response was stored for this entry: today’s result is shown alone.' };
  if (NOT_WHOLE.some((mark) => text.includes(mark))) {
    return { note: 'The stored response was cut at the log limit: today’s result is shown alone.' };
  }
  try {
    return { result: JSON.parse(text) as unknown };
  } catch {
    return { note: 'The stored response is not JSON (e.g. CSV): today’s result is shown alone.' };
  }
}

type Leaves = Map<string, unknown>;

/** Every leaf of a JSON value by dotted path (`a.b[2].c`); `provenance` is compared apart. */
function leaves(value: unknown, path = '', out: Leaves = new Map()): Leaves {
  if (Array.isArray(value)) {
    if (value.length === 0) out.set(path, []);
    value.forEach((v, i) => leaves(v, `${path}[${i}]`, out));
  } else if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>).filter(
      ([k]) => !(path === '' && k === 'provenance'),
    );
    if (entries.length === 0 && path !== '') out.set(path, {});
    for (const [k, v] of entries) leaves(v, path === '' ? k : `${path}.${k}`, out);
  } else {
    out.set(path, value);
  }
  return out;
}

/**
 * The fields that differ between two results: numbers with today − logged and its ratio to
 * |logged| (null when logged is 0), other values as changed, and fields on one side only as
 * added (today only) or removed (logged only). Equal results give an empty list. A logged value
 * the log redacted (text that looked like a key) is not compared.
 */
export function differences(logged: unknown, today: unknown): ReplayDifference[] {
  const a = leaves(logged);
  const b = leaves(today);
  const out: ReplayDifference[] = [];
  for (const [field, was] of a) {
    if (!b.has(field)) {
      out.push({ field, change: 'removed', logged: was });
      continue;
    }
    const now = b.get(field);
    // The log replaced this value (it looked like a secret): there is nothing to compare it with.
    if (typeof was === 'string' && was.includes(REDACTED)) continue;
    if (typeof was === 'number' && typeof now === 'number') {
      if (Object.is(was, now) || was === now) continue;
      const absolute = now - was;
      out.push({
        field,
        change: 'changed',
        logged: was,
        today: now,
        absolute,
        relative: was === 0 ? null : absolute / Math.abs(was),
      });
    } else if (JSON.stringify(was) !== JSON.stringify(now)) {
      out.push({ field, change: 'changed', logged: was, today: now });
    }
  }
  for (const [field, now] of b) if (!a.has(field)) out.push({ field, change: 'added', today: now });
  return out;
}

type Models = Map<string, string>;

function modelsOf(result: unknown): Models {
  const models = (result as { provenance?: { models?: unknown } } | null)?.provenance?.models;
  const out: Models = new Map();
  if (!Array.isArray(models)) return out;
  for (const m of models as { id?: unknown; source?: unknown }[]) {
    if (typeof m?.id === 'string') out.set(m.id, typeof m.source === 'string' ? m.source : '');
  }
  return out;
}

/** The models of `provenance` whose cited source differs, or that only one result uses. */
export function modelChanges(logged: unknown, today: unknown): ReplayResult['modelSources'] {
  const a = modelsOf(logged);
  const b = modelsOf(today);
  const out: ReplayResult['modelSources'] = [];
  for (const [id, source] of a) {
    const now = b.get(id);
    if (now === undefined) out.push({ id, change: 'removed', logged: source });
    else if (now !== source) out.push({ id, change: 'changed', logged: source, today: now });
  }
  for (const [id, source] of b) if (!a.has(id)) out.push({ id, change: 'added', today: source });
  return out;
}

/**
 * Runs a logged entry again (see the module comment). The caller has checked that the user may
 * see the entry. `routePath` is the path the replay is logged under.
 */
export async function replayEntry(
  deps: AppDeps,
  row: RequestLogDetailRow,
  routePath: string,
): Promise<ReplayResult> {
  const id = row.id;
  if (row.accountId === null) throw notReplayable(id, 'it belongs to no account.');
  const decl = row.operation ? operationDeclaration(row.operation) : undefined;
  if (!decl || !replayable(decl) || decl.handle || (!decl.run && !decl.engine)) {
    throw notReplayable(
      id,
      `operation ${row.operation ?? 'unknown'} is not a calculation that can be run again.`,
    );
  }
  if (decl.request?.query)
    throw notReplayable(id, 'its input is a query string, which the log does not keep.');
  const params = paramsOf(decl, row.path);
  if (!params || row.method.toLowerCase() !== decl.method) {
    throw notReplayable(id, `its path ${row.path} is not one of ${decl.method.toUpperCase()} ${decl.path}.`);
  }
  let body: unknown = undefined;
  if (decl.request?.body) {
    const text = row.requestBody;
    if (text === null) {
      throw notReplayable(id, 'its request body was not retained (the account did not keep bodies then).');
    }
    if (NOT_WHOLE.some((mark) => text.includes(mark))) {
      throw notReplayable(id, 'its request body was cut at the log limit, so the request is incomplete.');
    }
    try {
      body = JSON.parse(text);
    } catch {
      throw notReplayable(id, 'its request body as logged is not JSON.');
    }
    if (holdsRedaction(body)) throw notReplayable(id, 'values of its request body were redacted in the log.');
    // Checked as any request body is at the door (prototype keys, nesting depth): what the log holds
    // is read back from the database, not trusted for having been checked once.
    const unsafe = checkJsonBody(body);
    if (unsafe)
      throw notReplayable(
        id,
        `its request body as logged is refused as a body: ${unsafe.detail ?? unsafe.title}`,
      );
  }

  const account = await getAccount(deps.store, row.accountId);
  if (!account) throw notReplayable(id, 'its account no longer exists.');
  const now = deps.clock();
  const units = decl.operation.units + (decl.extraUnits?.(body) ?? 0);
  const quota = account.monthlyUnitQuota;
  const quotaProblem = (remaining: number) =>
    problem(
      'quota-exceeded',
      `This replay costs ${units} units but only ${remaining} of the monthly quota of ${quota} units remain.`,
      {
        headers: {
          'Retry-After': String(
            Math.max(1, Math.ceil((nextMonthStartUtc(now).getTime() - now.getTime()) / 1000)),
          ),
        },
      },
    );
  // One replay of an account at a time on this node: the quota check and the charge of one are
  // not interleaved with another's (the /v1 metering keeps its own in-flight count).
  const { today, charged, requestId } = await oneConsoleCallAtATime(account.id, async () => {
    const used = await committedUnitsThisMonth(deps.store, account.id, now);
    if (used + units > quota) throw quotaProblem(Math.max(0, quota - used));

    let released = 0;
    const started = performance.now();
    const result = await runOperation(
      compileOperation(decl),
      { params, body },
      {
        accountId: account.id,
        store: deps.store,
        engineVersion: deps.engineVersion,
        clock: deps.clock,
        releaseUnits: (n) => (released += n),
      },
    );
    // The answer as a client would have read it (dates as strings, no undefined).
    const today = JSON.parse(JSON.stringify(result)) as unknown;
    const charged = Math.max(0, units - released);
    const requestId = randomUUID();
    const limit = deps.config.logBodyLimitBytes;
    const record: RequestRecord = {
      at: now,
      accountId: account.id,
      keyId: row.keyId,
      operation: decl.operation.id,
      status: 200,
      units: charged,
      latencyMs: Math.round(performance.now() - started),
      requestId,
      engineVersion: deps.engineVersion,
      method: 'POST',
      path: routePath,
      requestBody: account.retainRequestBodies ? row.requestBody : null,
      responseBody: account.retainRequestBodies ? logBody(today, limit) : null,
    };
    await recordRequest(deps.store, record);
    const refused = refusalOf(record);
    if (refused) throw quotaProblem(refused.remaining);
    return { today, charged, requestId };
  });

  const logged = loggedResult(row);
  const todayPart = { engineVersion: deps.engineVersion, result: today };
  const base = { entryId: id, operation: decl.operation.id, unitsCharged: charged, requestId };
  if ('note' in logged) {
    return {
      ...base,
      responseStored: false,
      note: logged.note,
      logged: { engineVersion: row.engineVersion, result: null },
      today: todayPart,
      differences: [],
      modelSources: [],
    };
  }
  return {
    ...base,
    responseStored: true,
    logged: { engineVersion: row.engineVersion, result: logged.result },
    today: todayPart,
    differences: differences(logged.result, today),
    modelSources: modelChanges(logged.result, today),
  };
}
