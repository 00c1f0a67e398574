/**
 * CSRF protection of the console API: the signed double-submit cookie pattern, bound to the
 * session (OWASP CSRF Prevention Cheat Sheet, "Signed Double-Submit Cookie", with the session id
 * in the HMAC). GET /console-api/auth/csrf sets the readable cookie `ebullio_csrf` =
 * `<nonce>.<binding>.<HMAC-SHA256(key, binding + nonce)>`, where the binding is a keyed digest of the
 * session id ('anon' before sign-in), and returns it; every POST/PUT/PATCH/DELETE must
 * send the same value in `X-CSRF-Token`. Failures are 403 'csrf-failed'.
 *
 * Binding: a request that names a session (a valid access cookie, or on /console-api/auth the
 * refresh cookie) must carry a token minted for that session, so a token obtained by another
 * client — even a validly signed one planted as a cookie — does not work on this session. A token
 * minted before sign-in is anonymous (empty session id); sign-in and invitation acceptance set a
 * fresh token bound to the new session, and sign-out an anonymous one (the console reads the
 * cookie before every mutating call, so it picks the new token up by itself). A request naming no
 * session carries no session authority; it needs a token signed by this server, bound or not (an
 * access cookie that just expired must reach its route's 401, so the console can refresh).
 */
import crypto from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { CSRF_COOKIE, CSRF_HEADER } from '../../../shared/console/common.js';
import { randomToken } from '../../accounts/sessions.js';
import { consoleSettings } from '../../config.js';
import type { AppDeps } from '../../deps.js';
import { problem } from '../../http/problem.js';
import { presentedSessionId } from './session.js';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The binding part of a token: 'anon' before sign-in, else a keyed digest of the session id. */
function bindingOf(key: Uint8Array, sessionId: string): string {
  if (sessionId === '') return 'anon';
  return crypto
    .createHmac('sha256', key)
    .update(`csrf-session:${sessionId}`)
    .digest('base64url')
    .slice(0, 22);
}

function signature(key: Uint8Array, binding: string, nonce: string): string {
  return crypto.createHmac('sha256', key).update(`csrf:${binding}.${nonce}`).digest('base64url');
}

/** A fresh token `<nonce>.<binding>.<signature>` bound to `sessionId` ('' before sign-in). */
export function newCsrfToken(deps: AppDeps, sessionId = ''): string {
  const key = consoleSettings(deps.config).jwtKey;
  const nonce = randomToken(24);
  const binding = bindingOf(key, sessionId);
  return `${nonce}.${binding}.${signature(key, binding, nonce)}`;
}

function equalText(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && crypto.timingSafeEqual(x, y);
}

/**
 * True when this server minted the token for `sessionId` ('' = anonymous); with `sessionId`
 * undefined, true for any token this server minted, whatever it is bound to.
 */
export function isValidCsrfToken(deps: AppDeps, token: string, sessionId: string | undefined = ''): boolean {
  const [nonce, binding, sig, extra] = token.split('.');
  if (!nonce || !binding || !sig || extra !== undefined) return false;
  const key = consoleSettings(deps.config).jwtKey;
  if (!equalText(sig, signature(key, binding, nonce))) return false;
  return sessionId === undefined || equalText(binding, bindingOf(key, sessionId));
}

export function presentedCsrfCookie(req: Request): string | undefined {
  const value = (req.cookies as Record<string, string> | undefined)?.[CSRF_COOKIE];
  return typeof value === 'string' && value !== '' ? value : undefined;
}

/** Sets the readable CSRF cookie to a fresh token bound to `sessionId` and returns the token. */
export function issueCsrfCookie(deps: AppDeps, req: Request, res: Response, sessionId = ''): string {
  const csrfToken = newCsrfToken(deps, sessionId);
  res.cookie(CSRF_COOKIE, csrfToken, { httpOnly: false, sameSite: 'strict', secure: req.secure, path: '/' });
  return csrfToken;
}

/**
 * 403 'csrf-failed' unless a state-changing request sends X-CSRF-Token equal to its cookie, and
 * the token is bound to the session the request names (any token of ours when it names none).
 */
export function csrfCheck(deps: AppDeps): RequestHandler {
  return (req, res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const cookie = presentedCsrfCookie(req);
    const header = req.get(CSRF_HEADER);
    if (!cookie)
      throw problem('csrf-failed', `No ${CSRF_COOKIE} cookie: call GET /console-api/auth/csrf first.`);
    if (!header) throw problem('csrf-failed', `The ${CSRF_HEADER} header is missing.`);
    if (!equalText(cookie, header)) {
      throw problem('csrf-failed', `The ${CSRF_HEADER} header does not match the ${CSRF_COOKIE} cookie.`);
    }
    const sessionId = presentedSessionId(req, res);
    if (sessionId !== undefined) {
      if (!isValidCsrfToken(deps, cookie, sessionId)) {
        throw problem(
          'csrf-failed',
          `The ${CSRF_COOKIE} token was not issued for this session: call GET /console-api/auth/csrf again.`,
        );
      }
    } else if (!isValidCsrfToken(deps, cookie, undefined)) {
      throw problem('csrf-failed', `The ${CSRF_COOKIE} cookie was not issued by this server.`);
    }
    next();
  };
}
