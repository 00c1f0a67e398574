/**
 * Console routes for the workbench: GET /workbench/operations (the calculations it offers, each
 * with its request's JSON Schema from the API contract and its worked example) and POST
 * /workbench/run (one calculation, or a sweep of it, run with a chosen API key as that key's own
 * call: server/http/workbench.ts, within the key's per-minute limit). Admins may use any account's key, developers the keys of
 * the accounts they are members of; billing users do not run calculations.
 */
import {
  WorkbenchOperationListSchema,
  WorkbenchResultSchema,
  WorkbenchRunSchema,
} from '../../shared/console/workbench.js';
import type { Request, Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import { getKey } from '../accounts/keys.js';
import type { AppDeps } from '../deps.js';
import { failClosed, limiterStore } from '../http/middleware/rate-limit.js';
import { problem } from '../http/problem.js';
import { runOnKey, workbenchOperations } from '../http/workbench.js';
import { scopeOf } from './accounts.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

/**
 * The key's own per-minute limit, counted per key as its /v1 calls are (with shared state, in the
 * same Redis counter). Called by the handler once the user's right to the key is checked, so no
 * one can spend another account's allowance.
 */
function keyRateLimit(deps: AppDeps) {
  const store = limiterStore(deps, 'key');
  const limiter = failClosed(
    rateLimit({
      windowMs: 60_000,
      limit: (_req, res) => res.locals.workbenchKey?.rateLimitPerMinute ?? 60,
      standardHeaders: 'draft-7',
      legacyHeaders: false,
      keyGenerator: (_req, res) => `key:${String(res.locals.workbenchKey?.id ?? 'none')}`,
      handler: (_req, res, next) => {
        const limit = res.locals.workbenchKey?.rateLimitPerMinute ?? 60;
        next(problem('rate-limited', `This API key allows ${limit} requests per minute.`));
      },
      ...(store ? { store } : {}),
      validate: { ip: false, trustProxy: false, xForwardedForHeader: false, keyGeneratorIpFallback: false },
    }),
  );
  return (req: Request, res: Response, key: { id: number; rateLimitPerMinute: number }) =>
    new Promise<void>((resolve, reject) => {
      res.locals.workbenchKey = key;
      limiter(req, res, (err?: unknown) => (err ? reject(err as Error) : resolve()));
    });
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      /** The key a workbench run is made with (its id and per-minute limit). */
      workbenchKey?: { id: number; rateLimitPerMinute: number };
    }
  }
}

/** The roles that run calculations from the console (admin is always added). */
const WORKBENCH_ROLES = ['developer'] as const;

export const workbenchRoutes: ConsoleRouteModule = {
  register(router, deps) {
    const limitKey = keyRateLimit(deps);
    consoleRoute(router, {
      method: 'get',
      path: '/workbench/operations',
      roles: WORKBENCH_ROLES,
      summary: 'The calculations the workbench runs, each with its request’s JSON Schema and worked example',
      response: WorkbenchOperationListSchema,
      handler: () => ({ items: workbenchOperations() }),
    });

    consoleRoute(router, {
      method: 'post',
      path: '/workbench/run',
      roles: WORKBENCH_ROLES,
      summary:
        'Run a calculation, or a sweep of it, with an API key of an account you may act for: metered and logged as the key’s own call',
      description:
        'The body is checked exactly as the public call checks it (problems name its fields); the key must be active and hold the operation’s scope; the units are charged to the key’s account within its quota.',
      request: { body: WorkbenchRunSchema },
      response: WorkbenchResultSchema,
      handler: async ({ body, user, req, res }) => {
        const key = await getKey(deps.store, body.keyId);
        const scope = scopeOf(user);
        // A key outside the user's accounts is answered as one that does not exist: its id
        // says nothing about other accounts.
        if (!key || (scope !== null && !scope.includes(key.accountId))) {
          throw problem('not-found', `There is no API key ${body.keyId} in your accounts.`);
        }
        await limitKey(req, res, key);
        return runOnKey(deps, key, body);
      },
    });
  },
};
