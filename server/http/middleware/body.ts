/**
 * Request-body handling for /v1: one step that checks the media type (415) and runs the JSON or
 * CSV parser with the size limit (413), and translation of the parsers' errors into problems
 * (400 'malformed-json', 413, 415).
 *
 * Accepted media types for POST/PUT/PATCH bodies: application/json (and +json), text/csv (parsed
 * to a string in req.body), multipart/form-data (left unparsed for a route's own multer).
 */
import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import { problem, ProblemError } from '../problem.js';
import { timedOutRequests } from '../server.js';

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
  return (req, res, next) => {
    const kind = mediaKind(req.headers['content-type']);
    if (kind === 'json') return json(req, res, next);
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
