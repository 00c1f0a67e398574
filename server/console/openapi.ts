/**
 * The console API's own OpenAPI 3.1 document, built from {@link consoleRouteTable} (every route
 * declared with consoleRoute registers itself there). It documents the two session cookies
 * (apiKey-in-cookie security schemes) and the X-CSRF-Token header of state-changing calls.
 *
 * `scripts/generate-console-openapi.ts` writes it to openapi/console.json; a drift test fails
 * when the committed file differs. Served at GET /console-api/openapi.json.
 */
import { OpenAPIRegistry, OpenApiGeneratorV31, extendZodWithOpenApi } from '@asteasolutions/zod-to-openapi';
import { z } from 'zod';
import {
  ACCESS_COOKIE,
  ConsoleProblemSchema,
  CSRF_COOKIE,
  CSRF_HEADER,
  REFRESH_COOKIE,
} from '../../shared/console/common.js';
import type { ConsoleRouteEntry } from './route.js';

extendZodWithOpenApi(z);

export const CONSOLE_API_VERSION = '1.0.0';

function problemResponse(description: string) {
  return { description, content: { 'application/problem+json': { schema: ConsoleProblemSchema } } };
}

function accessText(entry: ConsoleRouteEntry): string {
  if (entry.access === 'public') return 'Access: public.';
  if (entry.access === 'signed-in') return 'Access: any signed-in console user.';
  return `Access: roles ${entry.access.join(', ')}.`;
}

function operationId(entry: ConsoleRouteEntry): string {
  const words = `${entry.method} ${entry.path}`
    .replace(/[:{}]/g, ' by ')
    .split(/[^A-Za-z0-9]+/)
    .filter((w) => w.length > 0);
  return words.map((w, i) => (i === 0 ? w.toLowerCase() : w[0]!.toUpperCase() + w.slice(1))).join('');
}

/** A fresh registry holding the given routes (sorted by path and method: deterministic output). */
export function buildConsoleRegistry(entries: readonly ConsoleRouteEntry[]): OpenAPIRegistry {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'consoleSession', {
    type: 'apiKey',
    in: 'cookie',
    name: ACCESS_COOKIE,
    description:
      'Short-lived access JWT (HS256, claims sub, sid, role) set by POST /console-api/auth/sign-in and /auth/refresh; httpOnly, SameSite=Strict, Secure over HTTPS.',
  });
  registry.registerComponent('securitySchemes', 'consoleRefresh', {
    type: 'apiKey',
    in: 'cookie',
    name: REFRESH_COOKIE,
    description:
      'Refresh token, rotated on every refresh; httpOnly, SameSite=Strict, path /console-api/auth.',
  });
  const csrfHeader = {
    name: CSRF_HEADER,
    in: 'header' as const,
    required: true,
    description: `Double-submit CSRF token: must equal the ${CSRF_COOKIE} cookie set by GET /console-api/auth/csrf.`,
    schema: { type: 'string' as const },
  };
  const sorted = [...entries].sort((a, b) =>
    a.openApiPath === b.openApiPath
      ? a.method.localeCompare(b.method)
      : a.openApiPath.localeCompare(b.openApiPath),
  );
  for (const entry of sorted) {
    const responses: Record<string, unknown> = {
      [entry.status]: {
        description: 'Success',
        content: { [entry.responseContentType]: { schema: entry.response } },
      },
      422: problemResponse('validation-failed: a field is missing or invalid (see `errors`)'),
    };
    if (entry.access !== 'public') {
      responses[401] = problemResponse('No valid console session (type unauthorized)');
      if (entry.access !== 'signed-in')
        responses[403] = problemResponse('The role may not do this (type forbidden)');
    }
    if (entry.csrf) responses[403] = problemResponse('csrf-failed, or the role may not do this (forbidden)');
    registry.registerPath({
      method: entry.method,
      path: entry.openApiPath,
      operationId: operationId(entry),
      tags: [entry.tag],
      summary: entry.summary,
      description: [entry.description, accessText(entry)].filter(Boolean).join('\n\n'),
      security: entry.access === 'public' ? [] : [{ consoleSession: [] }],
      parameters: entry.csrf ? [csrfHeader] : [],
      request: {
        ...(entry.params ? { params: entry.params as z.ZodObject } : {}),
        ...(entry.query ? { query: entry.query as z.ZodObject } : {}),
        ...(entry.body
          ? { body: { required: true, content: { [entry.bodyContentType]: { schema: entry.body } } } }
          : {}),
      },
      responses: responses as never,
    });
  }
  return registry;
}

/** The console OpenAPI document for these routes. */
export function buildConsoleOpenApiDocument(
  entries: readonly ConsoleRouteEntry[],
): ReturnType<OpenApiGeneratorV31['generateDocument']> {
  const generator = new OpenApiGeneratorV31(buildConsoleRegistry(entries).definitions, {
    sortComponents: 'alphabetically',
  });
  return generator.generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Ebullio console API',
      version: CONSOLE_API_VERSION,
      description:
        'The API behind the Ebullio operator console (served at /console). Sessions are cookies: an access JWT and a ' +
        `refresh token, both httpOnly and SameSite=Strict. Every POST/PUT/PATCH/DELETE needs the ${CSRF_HEADER} header equal ` +
        `to the ${CSRF_COOKIE} cookie (GET /console-api/auth/csrf). Errors are RFC 9457 problem details. ` +
        'Roles: admin (everything), billing (billing; read-only elsewhere), developer (keys, usage and request log of own accounts).',
    },
    servers: [{ url: '/' }],
  });
}
