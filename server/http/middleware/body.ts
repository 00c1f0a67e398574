/**
 * Request-body handling for /v1: a media-type guard (415), JSON and CSV parsers with the size
 * limit (413), and translation of the parsers' errors into problems (400 'malformed-json', 413, 415).
 *
 * Accepted media types for POST/PUT/PATCH bodies: application/json (and +json), text/csv (parsed
 * to a string in req.body), multipart/form-data (left unparsed for a route's own multer).
 */
import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import { problem, ProblemError } from '../problem.js';

const BODY_METHODS = new Set(['POST', 'PUT', 'PATCH']);
const ACCEPTED = ['application/json', 'application/*+json', 'text/csv', 'multipart/form-data'];

function hasBody(headers: Record<string, string | string[] | undefined>): boolean {
  if (headers['transfer-encoding'] !== undefined) return true;
  const length = headers['content-length'];
  return length !== undefined && length !== '0';
}

/** 415 for a body whose media type is not one the API accepts. */
export function mediaTypeGuard(): RequestHandler {
  return (req, _res, next) => {
    if (!BODY_METHODS.has(req.method) || !hasBody(req.headers)) return next();
    if (!req.get('content-type') || req.is(ACCEPTED) === false) {
      throw problem(
        'unsupported-media-type',
        `Content-Type "${req.get('content-type') ?? '(none)'}" is not accepted; send application/json.`,
      );
    }
    next();
  };
}

export function bodyParsers(limitBytes: number): RequestHandler[] {
  return [
    express.json({ limit: limitBytes, type: ['application/json', 'application/*+json'] }),
    express.text({ limit: limitBytes, type: 'text/csv' }),
  ];
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
  return (err: unknown, _req, _res, next) => {
    if (err instanceof ProblemError || !(err instanceof Error)) return next(err);
    const e = err as BodyParserError;
    switch (e.type) {
      case 'entity.too.large':
        return next(problem('payload-too-large', `The request body exceeds the limit of ${e.limit} bytes.`));
      case 'entity.parse.failed':
        return next(problem('malformed-json', `The request body is not valid JSON: ${e.message}`));
      case 'encoding.unsupported':
      case 'charset.unsupported':
        return next(problem('unsupported-media-type', e.message));
      case 'request.aborted':
      case 'request.size.invalid':
      case 'stream.encoding.set':
        return next(problem('bad-request', e.message));
      default:
        return next(clientErrorProblem(e) ?? err);
    }
  };
}
