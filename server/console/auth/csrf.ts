/**
 * CSRF protection of the console API: the signed double-submit cookie pattern (OWASP CSRF
 * Prevention Cheat Sheet, "Signed Double-Submit Cookie"). GET /console-api/auth/csrf sets the
 * readable cookie `ebullio_csrf` = `<random>.<HMAC-SHA256(key, random)>` and returns it; every
 * POST/PUT/PATCH/DELETE must send the same value in `X-CSRF-Token`, and the value must carry a
 * valid signature (so a cookie planted by another origin's subdomain is refused too).
 * Failures are 403 'csrf-failed'.
 */
import crypto from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { CSRF_COOKIE, CSRF_HEADER } from '../../../shared/console/common.js';
import { consoleSettings } from '../../config.js';
import type { AppDeps } from '../../deps.js';
import { problem } from '../../http/problem.js';
import { randomToken } from './session.js';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function signature(key: Uint8Array, nonce: string): string {
  return crypto.createHmac('sha256', key).update(`csrf:${nonce}`).digest('base64url');
}

export function newCsrfToken(deps: AppDeps): string {
  const nonce = randomToken(24);
  return `${nonce}.${signature(consoleSettings(deps.config).jwtKey, nonce)}`;
}

export function isValidCsrfToken(deps: AppDeps, token: string): boolean {
  const [nonce, sig, extra] = token.split('.');
  if (!nonce || !sig || extra !== undefined) return false;
  const expected = Buffer.from(signature(consoleSettings(deps.config).jwtKey, nonce));
  const actual = Buffer.from(sig);
  return expected.length === actual.length && crypto.timingSafeEqual(expected, actual);
}

export function presentedCsrfCookie(req: Request): string | undefined {
  const value = (req.cookies as Record<string, string> | undefined)?.[CSRF_COOKIE];
  return typeof value === 'string' && value !== '' ? value : undefined;
}

/** 403 'csrf-failed' unless a state-changing request sends X-CSRF-Token equal to a valid cookie. */
export function csrfCheck(deps: AppDeps): RequestHandler {
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const cookie = presentedCsrfCookie(req);
    const header = req.get(CSRF_HEADER);
    if (!cookie)
      throw problem('csrf-failed', `No ${CSRF_COOKIE} cookie: call GET /console-api/auth/csrf first.`);
    if (!header) throw problem('csrf-failed', `The ${CSRF_HEADER} header is missing.`);
    const a = Buffer.from(cookie);
    const b = Buffer.from(header);
    if (a.length !== b.length || !crypto.timingSafeEqual(a, b)) {
      throw problem('csrf-failed', `The ${CSRF_HEADER} header does not match the ${CSRF_COOKIE} cookie.`);
    }
    if (!isValidCsrfToken(deps, cookie)) {
      throw problem('csrf-failed', `The ${CSRF_COOKIE} cookie was not issued by this server.`);
    }
    next();
  };
}
