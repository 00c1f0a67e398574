/**
 * Request-body handling for /v1: one step that checks the media type (415) and runs the JSON or
 * CSV parser with the size limit (413), the JSON nesting limit (400) and refused property names
 * (422), and translation of the parsers' errors into problems
 * (400 'malformed-json', 413, 415).
 *
 * Accepted media types for POST/PUT/PATCH bodies: application/json (and +json), text/csv (parsed
 * to a string in req.body), multipart/form-data (left unparsed for a route's own multer).
 */
import { PROTOTYPE_KEYS } from '../../../shared/contracts/common.js';
import type http from 'node:http';
import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import { problem, ProblemError } from '../problem.js';

/**
 * Requests the server timed out while the app was reading their body. The app then sees the
 * request aborted; this module answers (and so meters) those as 408, like the answer that left.
 */
export const timedOutRequests = new WeakSet<http.IncomingMessage>();

/**
 * Deepest nesting of arrays and objects accepted in a JSON body. The deepest body the API
 * documents (a batch of cases with an inline custom liquor) nests about ten levels; 64 leaves room
 * and stays far below what recursive code (zod, redaction for the log, JSON.stringify) survives.
 */
export const MAX_JSON_DEPTH = 64;

/**
 * Property names refused anywhere in a JSON body. JSON.parse makes them own properties, which is
 * harmless by itself, but code that copies such a body by assignment would set a prototype
 * instead of a property; no field of the API has these names.
 */
export const FORBIDDEN_KEYS: ReadonlySet<string> = new Set(PROTOTYPE_KEYS);

/** The dotted path (`cases[2].feed.__proto__`) of the first forbidden property name; slow path. */
function forbiddenKeyPath(root: unknown): string {
  const stack: [unknown, string][] = [[root, '']];
  while (stack.length > 0) {
    const [value, path] = stack.pop()!;
    if (value === null || typeof value !== 'object') continue;
    if (Array.isArray(value)) {
      value.forEach((v, i) => stack.push([v, `${path}[${i}]`]));
      continue;
    }
    for (const key of Object.keys(value)) {
      const child = path === '' ? key : `${path}.${key}`;
      if (FORBIDDEN_KEYS.has(key)) return child;
      stack.push([(value as Record<string, unknown>)[key], child]);
    }
  }
  return '';
}

/**
 * Checks a parsed JSON body without recursion (an explicit stack), so a body nested thousands of
 * levels deep is refused before any recursive code sees it: a 400 'body-too-deep' beyond
 * {@link MAX_JSON_DEPTH} levels, a 422 naming the field for a {@link FORBIDDEN_KEYS} name.
 */
export function checkJsonBody(body: unknown): ProblemError | undefined {
  if (body === null || typeof body !== 'object') return undefined;
  const values: unknown[] = [body];
  const depths: number[] = [1];
  while (values.length > 0) {
    const value = values.pop() as object;
    const depth = depths.pop()!;
    if (depth > MAX_JSON_DEPTH) {
      return problem(
        'body-too-deep',
        `The JSON body nests deeper than ${MAX_JSON_DEPTH} levels of arrays and objects; at most ${MAX_JSON_DEPTH} are accepted.`,
      );
    }
    const children: unknown[] = Array.isArray(value) ? value : Object.keys(value);
    for (const item of children) {
      let child: unknown = item;
      if (!Array.isArray(value)) {
        if (FORBIDDEN_KEYS.has(item as string)) {
          const field = forbiddenKeyPath(body);
          return problem('validation-failed', `${field}: is not an accepted field name.`, {
            errors: [
              {
                field,
                message: `is not an accepted field name (${[...FORBIDDEN_KEYS].join(', ')} are refused)`,
              },
            ],
          });
        }
        child = (value as Record<string, unknown>)[item as string];
      }
      if (child !== null && typeof child === 'object') {
        values.push(child);
        depths.push(depth + 1);
      }
    }
  }
  return undefined;
}

/**
 * Runs after a JSON parser: refuses a body {@link checkJsonBody} rejects. The refused body is
 * dropped from the request, so nothing later (the request log included) walks it.
 */
export function jsonBodyGuard(): RequestHandler {
  return (req, _res, next) => {
    const refused = checkJsonBody(req.body);
    if (refused) {
      req.body = undefined;
      return next(refused);
    }
    next();
  };
}

const BODY_METHODS = new Set(['POST', 'PUT', 'PATCH']);

function hasBody(headers: Record<string, string | string[] | undefined>): boolean {
  if (headers['transfer-encoding'] !== undefined) return true;
  const length = headers['content-length'];
  return length !== undefined && length !== '0';
}

/** What the API does with a body, by the essence of its media type (RFC 9110 §8.3.1); else undefined. */
function mediaKind(header: string | undefined): 'json' | 'csv' | 'multipart' | undefined {
  if (header === undefined) return undefined;
  const semicolon = header.indexOf(';');
  const essence = (semicolon === -1 ? header : header.slice(0, semicolon)).trim().toLowerCase();
  if (essence === 'application/json' || /^application\/[a-z0-9!#$&^_.-]+\+json$/.test(essence)) return 'json';
  if (essence === 'text/csv') return 'csv';
  if (essence === 'multipart/form-data') return 'multipart';
  return undefined;
}

/**
 * One body step for /v1: the media type is read once and the body handed to the parser for it
 * (JSON, or CSV as a string), with the size limit (413); multipart is left to the route; any
 * other media type on a POST/PUT/PATCH with a body is a 415. The parsers are told not to check
 * the type again.
 */
export function bodyReader(limitBytes: number): RequestHandler {
  const json = express.json({ limit: limitBytes, type: () => true });
  const csv = express.text({ limit: limitBytes, type: () => true });
  const guard = jsonBodyGuard();
  return (req, res, next) => {
    const kind = mediaKind(req.headers['content-type']);
    if (kind === 'json') {
      return json(req, res, (err?: unknown) => (err ? next(err) : guard(req, res, next)));
    }
    if (kind === 'csv') return csv(req, res, next);
    if (kind === undefined && BODY_METHODS.has(req.method) && hasBody(req.headers)) {
      throw problem(
        'unsupported-media-type',
        `Content-Type "${req.get('content-type') ?? '(none)'}" is not accepted; send application/json.`,
      );
    }
    next();
  };
}

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  statusCode?: number;
  /** http-errors sets this for client errors whose message is safe to show. */
  expose?: boolean;
  limit?: number;
}

/**
 * Any other client error that Express or a parser raises as an http-errors error (a 4xx `status`
 * and `expose`), e.g. the router's "Failed to decode param" for a malformed percent-encoding in
 * the path, or a request body that does not decompress: a problem of the nearest catalogued type,
 * so it does not fall through to a 500.
 */
function clientErrorProblem(e: BodyParserError): ProblemError | undefined {
  const status = e.status ?? e.statusCode;
  if (typeof status !== 'number' || status < 400 || status > 499 || e.expose === false) return undefined;
  if (status === 413) return problem('payload-too-large', e.message);
  if (status === 415) return problem('unsupported-media-type', e.message);
  return problem('bad-request', e.message);
}

/** Turns body-parser (and other http-errors client) errors into ProblemErrors; passes the rest on. */
export function bodyErrorTranslator(): ErrorRequestHandler {
  return (err: unknown, req, _res, next) => {
    if (err instanceof ProblemError || !(err instanceof Error)) return next(err);
    const e = err as BodyParserError;
    switch (e.type) {
      case 'request.aborted':
        // The server cut a body that arrived too slowly (server.ts): recorded as the 408 it sent.
        if (timedOutRequests.has(req)) {
          return next(problem('request-timeout', 'The request body did not arrive in time.'));
        }
        return next(problem('bad-request', e.message));
      case 'entity.too.large':
        return next(problem('payload-too-large', `The request body exceeds the limit of ${e.limit} bytes.`));
      case 'entity.parse.failed':
        return next(problem('malformed-json', `The request body is not valid JSON: ${e.message}`));
      case 'encoding.unsupported':
      case 'charset.unsupported':
        return next(problem('unsupported-media-type', e.message));
      case 'request.size.invalid':
      case 'stream.encoding.set':
        return next(problem('bad-request', e.message));
      default:
        return next(clientErrorProblem(e) ?? err);
    }
  };
}
