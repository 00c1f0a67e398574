/**
 * `consoleRoute(...)`: the one way to declare a console API route. It
 *
 * 1. checks access on the server: `'public'` (anyone), `'signed-in'` (any console user) or a list
 *    of roles (admin is always added: admin may do everything) — 401 'unauthorized' without a
 *    session, 403 'forbidden' for a role not allowed;
 * 2. runs the route's own middleware (e.g. multer for an upload);
 * 3. validates params, query and (JSON) body with zod — 422 'validation-failed' with field paths;
 * 4. calls the handler with the parsed input; a returned value is sent as JSON with `status`
 *    (default 200); a handler that answers itself (CSV, redirects) returns nothing; a service's
 *    typed refusal it throws becomes its problem answer (server/console/service-errors.ts);
 * 5. records the route in {@link consoleRouteTable}, from which the console OpenAPI document
 *    (server/console/openapi.ts) and the role-matrix test are built.
 *
 * Handlers get the signed-in user as `ctx.user` (throws 401 if absent) or `res.locals.user`.
 * State-changing methods are CSRF-checked before any route runs (server/console/index.ts).
 */
import type express from 'express';
import type { Request, RequestHandler, Response } from 'express';
import type { z } from 'zod';
import { ROLES } from '../../shared/access.js';
import type { Role } from '../../shared/console/common.js';
import type { AppDeps } from '../deps.js';
import { problem } from '../http/problem.js';
import { zodProblem } from '../http/validate.js';
import { problemOfServiceError } from './service-errors.js';

export type { Role } from '../../shared/console/common.js';
/** Every console role (shared/access.ts): for routes that any signed-in role may use. */
export const ALL_ROLES: readonly Role[] = ROLES;

/** The signed-in console user (res.locals.user). */
export interface ConsoleUser {
  id: number;
  email: string;
  name: string | null;
  role: Role;
  /** Accounts the user is a member of (account_members): the scope of a developer. */
  accountIds: number[];
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      /** Set by the console session middleware when a valid access cookie is presented. */
      user?: ConsoleUser;
      /** The console_sessions id of that session. */
      consoleSessionId?: string;
      /** The app's dependencies, set by the console router for consoleRoute handlers. */
      consoleDeps?: AppDeps;
    }
  }
}

export type RouteAccess = readonly Role[] | 'public' | 'signed-in';
export type HttpMethod = 'get' | 'post' | 'put' | 'patch' | 'delete';

/** The 401 detail of the access gate (the role-matrix test recognises a gate refusal by it). */
export const SIGN_IN_REQUIRED_DETAIL = 'Sign in to the console first (no valid console session).';
/** The 403 detail of the access gate starts with this. */
export const ROLE_DENIED_PREFIX = 'The console role';

type Out<S> = S extends z.ZodType ? z.output<S> : undefined;

export interface ConsoleContext<B, Q, P> {
  req: Request;
  res: Response;
  deps: AppDeps;
  body: Out<B>;
  query: Out<Q>;
  params: Out<P>;
  /** The signed-in user; reading it on a public route without a session throws 401. */
  readonly user: ConsoleUser;
  /** The signed-in user or undefined (for 'public' routes). */
  optionalUser: ConsoleUser | undefined;
}

export interface ConsoleRouteDef<
  B extends z.ZodType | undefined,
  Q extends z.ZodType | undefined,
  P extends z.ZodType | undefined,
  R extends z.ZodType,
> {
  method: HttpMethod;
  /** Express path relative to /console-api, e.g. '/keys/:id/revoke'. */
  path: string;
  roles: RouteAccess;
  summary: string;
  description?: string;
  /** OpenAPI tag (defaults to the first path segment). */
  tag?: string;
  request?: {
    body?: B;
    query?: Q;
    params?: P;
    /** 'multipart/form-data': the body is not validated here (the route's middleware parses it). */
    bodyContentType?: 'application/json' | 'multipart/form-data';
  };
  response: R;
  /** Success status, default 200. */
  status?: number;
  /** Default 'application/json'; for anything else the handler sends the response itself. */
  responseContentType?: string;
  /** Run after the access check and before validation (e.g. multer). */
  middleware?: RequestHandler[];
  handler: (ctx: ConsoleContext<B, Q, P>) => z.input<R> | void | Promise<z.input<R> | void>;
}

/** What the table keeps of each route (for OpenAPI and the role matrix). */
export interface ConsoleRouteEntry {
  method: HttpMethod;
  path: string;
  /** '/console-api' + path, with `:name` as `{name}` (OpenAPI style). */
  openApiPath: string;
  /** 'public', 'signed-in', or the roles allowed (admin always included). */
  access: 'public' | 'signed-in' | readonly Role[];
  summary: string;
  description: string | undefined;
  tag: string;
  body: z.ZodType | undefined;
  bodyContentType: 'application/json' | 'multipart/form-data';
  query: z.ZodType | undefined;
  params: z.ZodType | undefined;
  response: z.ZodType;
  status: number;
  responseContentType: string;
  /** true for POST/PUT/PATCH/DELETE: needs the X-CSRF-Token header. */
  csrf: boolean;
}

/** Every console route declared so far (deduplicated by method + path). */
export const consoleRouteTable: ConsoleRouteEntry[] = [];

export const CONSOLE_BASE = '/console-api';

function toOpenApiPath(path: string): string {
  return CONSOLE_BASE + path.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
}

/** Whether a user with `role` (or no user) passes `access`. */
export function allows(access: ConsoleRouteEntry['access'], role: Role | undefined): boolean {
  if (access === 'public') return true;
  if (role === undefined) return false;
  if (access === 'signed-in') return true;
  return access.includes(role);
}

function normaliseAccess(roles: RouteAccess): ConsoleRouteEntry['access'] {
  if (roles === 'public' || roles === 'signed-in') return roles;
  return ALL_ROLES.filter((r) => r === 'admin' || roles.includes(r));
}

function accessGate(access: ConsoleRouteEntry['access']): RequestHandler {
  return (_req, res, next) => {
    if (access === 'public') return next();
    const user = res.locals.user;
    if (!user) throw problem('unauthorized', SIGN_IN_REQUIRED_DETAIL);
    if (access !== 'signed-in' && !access.includes(user.role)) {
      throw problem(
        'forbidden',
        `${ROLE_DENIED_PREFIX} "${user.role}" may not do this (allowed: ${access.join(', ')}).`,
      );
    }
    next();
  };
}

function parsePart(schema: z.ZodType | undefined, input: unknown, prefix: string): unknown {
  if (!schema) return undefined;
  const result = schema.safeParse(input);
  if (!result.success) throw zodProblem(result.error, input, prefix);
  return result.data;
}

/** Declares a console route on `router` (see the module comment). */
export function consoleRoute<
  B extends z.ZodType | undefined = undefined,
  Q extends z.ZodType | undefined = undefined,
  P extends z.ZodType | undefined = undefined,
  R extends z.ZodType = z.ZodType,
>(router: express.Router, def: ConsoleRouteDef<B, Q, P, R>): void {
  const access = normaliseAccess(def.roles);
  const entry: ConsoleRouteEntry = {
    method: def.method,
    path: def.path,
    openApiPath: toOpenApiPath(def.path),
    access,
    summary: def.summary,
    description: def.description,
    tag: def.tag ?? def.path.split('/')[1] ?? 'console',
    body: def.request?.body,
    bodyContentType: def.request?.bodyContentType ?? 'application/json',
    query: def.request?.query,
    params: def.request?.params,
    response: def.response,
    status: def.status ?? 200,
    responseContentType: def.responseContentType ?? 'application/json',
    csrf: def.method !== 'get',
  };
  const existing = consoleRouteTable.findIndex((e) => e.method === def.method && e.path === def.path);
  if (existing >= 0) consoleRouteTable[existing] = entry;
  else consoleRouteTable.push(entry);

  const run: RequestHandler = async (req, res) => {
    const params = parsePart(def.request?.params, req.params, 'params');
    const query = parsePart(def.request?.query, req.query, 'query');
    const body =
      entry.bodyContentType === 'application/json'
        ? parsePart(def.request?.body, req.body ?? {}, '')
        : undefined;
    const deps = res.locals.consoleDeps;
    if (!deps)
      throw new Error('console route reached outside the console router (no res.locals.consoleDeps)');
    const ctx: ConsoleContext<B, Q, P> = {
      req,
      res,
      deps,
      body: body as Out<B>,
      query: query as Out<Q>,
      params: params as Out<P>,
      get user(): ConsoleUser {
        const user = res.locals.user;
        if (!user) throw problem('unauthorized', SIGN_IN_REQUIRED_DETAIL);
        return user;
      },
      optionalUser: res.locals.user,
    };
    let result: Awaited<ReturnType<typeof def.handler>>;
    try {
      result = await def.handler(ctx);
    } catch (err) {
      throw problemOfServiceError(err);
    }
    if (res.headersSent) return;
    if (result === undefined) {
      res.status(entry.status === 200 ? 204 : entry.status).end();
      return;
    }
    res.status(entry.status).json(result);
  };
  router[def.method](def.path, accessGate(access), ...(def.middleware ?? []), run);
}

/** A console route module: registers its routes on the console router. */
export interface ConsoleRouteModule {
  register(router: express.Router, deps: AppDeps): void;
}
