/**
 * API-key authentication: `Authorization: Bearer <key>`. Failures are 401 'unauthorized' with
 * `WWW-Authenticate: Bearer` (RFC 6750 §3) and a detail naming the reason: missing, malformed,
 * unknown, revoked, expired or rotated (see server/accounts/keys.ts on why "unknown" never reveals
 * whether a public id exists).
 */
import type { RequestHandler } from 'express';
import { authenticateToken } from '../../accounts/keys.js';
import type { AppDeps } from '../../deps.js';
import { problem } from '../problem.js';
import './locals.js';

const DETAILS = {
  missing: 'No API key: send "Authorization: Bearer <key>".',
  malformed: 'The Authorization header is not "Bearer <key>" with a well-formed key.',
  unknown: 'The API key is not recognised.',
  revoked: 'The API key has been revoked.',
  expired: 'The API key has expired.',
  rotated: 'The API key was rotated and its overlap window has ended; use its replacement.',
} as const;

function unauthorized(reason: keyof typeof DETAILS) {
  const error = reason === 'missing' ? '' : ', error="invalid_token"';
  return problem('unauthorized', DETAILS[reason], {
    headers: { 'WWW-Authenticate': `Bearer realm="ebullio"${error}` },
  });
}

/** Presented token of the request, if any (used for redaction). */
export function presentedToken(header: string | undefined): string | undefined {
  const m = header === undefined ? null : /^Bearer +(\S+)\s*$/i.exec(header);
  return m?.[1];
}

export function authenticate(deps: AppDeps): RequestHandler {
  return (req, res, next) => {
    const header = req.get('authorization');
    if (header === undefined || header.trim() === '') throw unauthorized('missing');
    const token = presentedToken(header);
    if (token === undefined) throw unauthorized('malformed');
    const result = authenticateToken(deps.sqlite, deps.config.secret, token, deps.clock());
    if (!result.ok) throw unauthorized(result.reason);
    res.locals.auth = {
      accountId: result.key.accountId,
      keyId: result.key.id,
      publicId: result.key.publicId,
      scopes: result.key.scopes,
      rateLimitPerMinute: result.key.rateLimitPerMinute,
      monthlyUnitQuota: result.key.account.monthlyUnitQuota,
      retainRequestBodies: result.key.account.retainRequestBodies,
    };
    next();
  };
}

/**
 * Authentication happens on the headers, but a body can take seconds to arrive: after the body
 * is read, the key is checked again, so a key revoked (or expired) while its request's body was
 * still coming is refused with the same 401 as at the door. Cheap: the found key is remembered
 * while the database's auth_revision is unchanged (server/accounts/keys.ts).
 */
export function reauthenticate(deps: AppDeps): RequestHandler {
  return (req, res, next) => {
    const recheck = () => {
      const token = presentedToken(req.get('authorization'));
      const result =
        token === undefined
          ? ({ ok: false, reason: 'malformed' } as const)
          : authenticateToken(deps.sqlite, deps.config.secret, token, deps.clock());
      if (!result.ok) throw unauthorized(result.reason);
    };
    // Multipart bodies are read by the route (upload.ts), which calls this again when done.
    res.locals.recheckKey = recheck;
    recheck();
    next();
  };
}
