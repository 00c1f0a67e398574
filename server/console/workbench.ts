/**
 * Console routes for the workbench: GET /workbench/operations (the calculations it offers, each
 * with its request's JSON Schema from the API contract and its worked example) and POST
 * /workbench/run (one calculation, or a sweep of it, run with a chosen API key as that key's own
 * call: server/http/workbench.ts). Admins may use any account's key, developers the keys of
 * the accounts they are members of; billing users do not run calculations.
 */
import {
  WorkbenchOperationListSchema,
  WorkbenchResultSchema,
  WorkbenchRunSchema,
} from '../../shared/console/workbench.js';
import { getKey } from '../accounts/keys.js';
import { problem } from '../http/problem.js';
import { runOnKey, workbenchOperations } from '../http/workbench.js';
import { scopeOf } from './accounts.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

/** The roles that run calculations from the console (admin is always added). */
const WORKBENCH_ROLES = ['developer'] as const;

export const workbenchRoutes: ConsoleRouteModule = {
  register(router, deps) {
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
      handler: async ({ body, user }) => {
        const key = await getKey(deps.store, body.keyId);
        const scope = scopeOf(user);
        // A key outside the user's accounts is answered as one that does not exist: its id
        // says nothing about other accounts.
        if (!key || (scope !== null && !scope.includes(key.accountId))) {
          throw problem('not-found', `There is no API key ${body.keyId} in your accounts.`);
        }
        return runOnKey(deps, key, body);
      },
    });
  },
};
