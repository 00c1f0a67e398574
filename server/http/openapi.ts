/**
 * The OpenAPI 3.1 document of the v1 calculation API, generated from the zod contracts in
 * shared/contracts (one schema feeds validation, types and this document), and the router
 * that serves it at /openapi.json with Swagger UI at /docs (assets from swagger-ui-express, no CDN).
 *
 * `scripts/generate-openapi.ts` writes the same document to openapi/openapi.json; a test fails
 * when the committed file drifts from the code.
 */
import {
  OpenAPIRegistry,
  OpenApiGeneratorV31,
  extendZodWithOpenApi,
  type ResponseConfig,
} from '@asteasolutions/zod-to-openapi';
import { Router } from 'express';
import swaggerUi from 'swagger-ui-express';
import { z } from 'zod';
import { JobSchema, ProblemSchema, UNIT_GRAMMAR } from '../../shared/contracts/index.js';
import { deprecationNote, type AnyOperation } from './v1/operation.js';
import { v1Operations } from './v1/operations/index.js';

extendZodWithOpenApi(z);

export const API_VERSION = '1.0.0';

const rateLimitHeaders = {
  RateLimit: {
    description:
      'The key’s limit, requests left in the current window and seconds until it resets (IETF ' +
      'draft-ietf-httpapi-ratelimit-headers-07), e.g. `limit=60, remaining=58, reset=42`',
    schema: { type: 'string' as const },
  },
  'RateLimit-Policy': {
    description:
      'The key’s rate-limit policy (draft-07): requests per window and the window in seconds, e.g. `60;w=60`',
    schema: { type: 'string' as const },
  },
};

/** The headers every answer of a deprecated operation carries (server/http/v1/operation.ts). */
function deprecationResponseHeaders(withSunset: boolean) {
  return {
    Deprecation: {
      description:
        'When the operation was deprecated: a Structured Field Date, `@<unix seconds>` (RFC 9745 §2.1)',
      schema: { type: 'string' as const },
    },
    ...(withSunset
      ? {
          Sunset: {
            description: 'When the operation stops answering, as an HTTP-date (RFC 8594 §3)',
            schema: { type: 'string' as const },
          },
        }
      : {}),
    Link: {
      description:
        'The page that says what replaces the operation: `rel="deprecation"` (RFC 9745 §3)' +
        (withSunset ? ' and `rel="sunset"` (RFC 8594 §6)' : ''),
      schema: { type: 'string' as const },
    },
  };
}

function problem(description: string) {
  return {
    description,
    headers: rateLimitHeaders,
    content: { 'application/problem+json': { schema: ProblemSchema } },
  };
}

const commonProblems = {
  401: problem('Missing or invalid API key (type unauthorized)'),
  403: problem('The key lacks the scope of this operation (type forbidden)'),
  422: problem(
    'validation-failed (a field is missing or malformed), unit-not-recognised, out-of-range (value outside a model; ' +
      'the field, value and valid range in display units are in `errors`), no-solution, or inconsistent-input',
  ),
  429: problem('Rate limit or monthly quota exceeded (type rate-limited or quota-exceeded); see Retry-After'),
  503: problem(
    'busy: the request limits cannot be checked (a service sharing its limits between nodes cannot reach its limit store); nothing was done, retry after Retry-After',
  ),
};

function ok(
  description: string,
  schema: z.ZodType,
  extra: Record<string, { schema: z.ZodType }> = {},
  example?: unknown,
) {
  return {
    description,
    headers: rateLimitHeaders,
    content: { 'application/json': { schema, ...(example === undefined ? {} : { example }) }, ...extra },
  };
}

function jsonBody(schema: z.ZodType, example: unknown, summary: string) {
  return {
    required: true,
    content: {
      'application/json': {
        schema,
        examples: { [summary.toLowerCase().replace(/\W+/g, '-')]: { summary, value: example } },
      },
    },
  };
}

/**
 * A body sent as JSON (with the schema's own example under `exampleName`) or uploaded as
 * multipart/form-data.
 */
function jsonOrUploadBody(schema: z.ZodType, uploadSchema: z.ZodType, exampleName: string, summary: string) {
  return {
    required: true,
    content: {
      'application/json': {
        schema,
        examples: { [exampleName]: { summary, value: schema.meta()?.example } },
      },
      'multipart/form-data': { schema: uploadSchema },
    },
  };
}

/** The OpenAPI request of a declared operation: its parameters and its body with the worked example. */
function requestOf(decl: AnyOperation) {
  const r = decl.request;
  if (!r) return undefined;
  const body = r.body
    ? r.upload
      ? jsonOrUploadBody(r.body, r.upload, r.example?.name ?? 'example', r.example?.summary ?? decl.summary)
      : jsonBody(r.body, r.example?.value ?? r.body.meta()?.example, r.example?.summary ?? decl.summary)
    : undefined;
  return {
    ...(r.params ? { params: r.params } : {}),
    ...(r.query ? { query: r.query } : {}),
    ...(body ? { body } : {}),
  };
}

/** The Idempotency-Key header every POST takes (server/http/middleware/idempotency.ts). */
const idempotencyKeyHeader = z
  .string()
  .min(1)
  .max(255)
  .optional()
  .openapi({
    param: {
      name: 'Idempotency-Key',
      in: 'header',
      description:
        'Makes a retry safe (IETF httpapi Idempotency-Key draft): 1–255 printable ASCII characters, as a token or a ' +
        'quoted string (`"…"`), unique per request. The first request with a key is processed and its answer kept ' +
        'for 24 h for the account; a retry with the same key, method, path, Accept and body gets that answer again (same ' +
        'status and body, header `Idempotent-Replayed: true`, 0 units, marked in the request log). The same key ' +
        'with another request: 422 idempotency-key-reused; while the first is still processed: 409 ' +
        'idempotency-key-in-flight. Answers 5xx, 401, 403 and 429 are not kept (a retry runs again). Not accepted on ' +
        'multipart uploads (400).',
    },
    example: '"7c1c1f5e-3a0e-4c39-9f59-2f0a3e6c1d42"',
  });

/** The Prefer header of an operation that may run as a job (RFC 7240). */
const preferHeader = z
  .string()
  .max(1000)
  .optional()
  .openapi({
    param: {
      name: 'Prefer',
      in: 'header',
      description:
        '`respond-async` (RFC 7240 §4.1) runs the request as a job whatever its size: the answer is `202 Accepted` with ' +
        '`Preference-Applied: respond-async`, `Location: /v1/jobs/{id}` and the job. Without it a request of more points than ' +
        "the server's threshold (2000 by default) runs as a job too.",
    },
    example: 'respond-async',
  });

/** The 202 answer of an operation that ran as a job. */
function acceptedAnswer() {
  return {
    description:
      'Accepted as a job (asked with `Prefer: respond-async`, or larger than the threshold): follow `Location`; the result, ' +
      'once the job has succeeded, is exactly the answer this request would have had (JSON at `links.result`, CSV at `links.resultCsv`). ' +
      'The 202 costs nothing; each point charges what its single call costs as the job commits it.',
    headers: {
      ...rateLimitHeaders,
      ...replayedHeader,
      Location: { description: 'The job: `/v1/jobs/{id}`', schema: { type: 'string' as const } },
      'Preference-Applied': {
        description: '`respond-async` when the request asked for it',
        schema: { type: 'string' as const, enum: ['respond-async'] },
      },
    },
    content: {
      'application/json': {
        schema: JobSchema,
        examples: {
          queued: {
            summary: 'A sweep accepted as a job',
            value: {
              ...jobExample,
              state: 'queued',
              progress: { done: 0, total: 3000 },
              unitsCharged: 0,
              startedAt: null,
            },
          },
        },
      },
    },
  };
}
const jobExample = JobSchema.meta()?.example as Record<string, unknown>;

const idempotencyProblems = {
  400: problem(
    'The Idempotency-Key header is malformed or sent with a multipart upload (type idempotency-key-invalid)',
  ),
  409: problem(
    'The first request with this Idempotency-Key is still being processed (type idempotency-key-in-flight); see Retry-After',
  ),
};

const replayedHeader = {
  'Idempotent-Replayed': {
    description:
      '`true` when the answer is the stored answer of an earlier request with the same Idempotency-Key',
    schema: { type: 'string' as const, enum: ['true'] },
  },
};

/** Registers one declared operation: path, operationId, wording, request, answer and problems. */
function registerOperation(
  registry: OpenAPIRegistry,
  decl: AnyOperation,
  security: { bearerAuth: never[] }[],
  idempotencyKey: z.ZodType,
): void {
  const { response } = decl;
  const post = decl.method === 'post';
  const plain = response.schema
    ? ok(response.description, response.schema, response.alternatives ?? {}, response.example)
    : response.alternatives
      ? { description: response.description, headers: rateLimitHeaders, content: response.alternatives }
      : { description: response.description, headers: rateLimitHeaders };
  if (post) plain.headers = { ...rateLimitHeaders, ...replayedHeader };
  const extra: Record<number, ReturnType<typeof problem>> = post ? { ...idempotencyProblems } : {};
  for (const [status, description] of Object.entries(decl.problems ?? {})) {
    // An operation's own wording of a status comes first; the key's cases are added to it.
    const own = problem(description);
    const key = extra[Number(status)];
    if (key) own.description = `${description}; or: ${key.description}`;
    extra[Number(status)] = own;
  }
  const headers = [...(post ? [idempotencyKey] : []), ...(decl.jobs ? [preferHeader] : [])];
  const request = { ...requestOf(decl), ...(headers.length > 0 ? { headers } : {}) };
  const dep = decl.deprecation;
  const description = [decl.description, dep ? deprecationNote(dep) : undefined].filter(Boolean).join('\n\n');
  const responses: Record<string, ResponseConfig> = {
    [response.status ?? 200]: plain,
    ...(decl.jobs ? { 202: acceptedAnswer() } : {}),
    ...extra,
    ...commonProblems,
    ...(post
      ? {
          422: problem(
            `${commonProblems[422].description}; or idempotency-key-reused (this Idempotency-Key was used for a different request)`,
          ),
        }
      : {}),
  };
  if (dep) {
    // Every answer of a deprecated operation carries the headers, refusals included.
    const deprecationHeaders = deprecationResponseHeaders(dep.sunset !== undefined);
    for (const [status, answer] of Object.entries(responses)) {
      responses[status] = { ...answer, headers: { ...answer.headers, ...deprecationHeaders } };
    }
  }
  registry.registerPath({
    method: decl.method,
    path: decl.path,
    operationId: decl.openApiName,
    tags: [decl.tag],
    summary: decl.summary,
    ...(description ? { description } : {}),
    ...(dep ? { deprecated: true } : {}),
    security,
    ...(Object.keys(request).length > 0 ? { request } : {}),
    responses,
  });
}

/** Builds a fresh registry holding every v1 calculation route (or the given declarations). */
export function buildRegistry(operations: readonly AnyOperation[] = v1Operations): OpenAPIRegistry {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'bearerAuth', {
    type: 'http',
    scheme: 'bearer',
    description: 'An API key created in the console: `Authorization: Bearer ebk1.…`',
  });
  const security = [{ bearerAuth: [] }];

  const idempotencyKey = registry.registerParameter('IdempotencyKey', idempotencyKeyHeader);
  for (const decl of operations) registerOperation(registry, decl, security, idempotencyKey);

  return registry;
}

/** The complete OpenAPI 3.1 document (deterministic: same code → same JSON). */
export function buildOpenApiDocument(
  operations: readonly AnyOperation[] = v1Operations,
): ReturnType<OpenApiGeneratorV31['generateDocument']> {
  const generator = new OpenApiGeneratorV31(buildRegistry(operations).definitions, {
    sortComponents: 'alphabetically',
  });
  return generator.generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Ebullio calculation API',
      version: API_VERSION,
      description:
        'Evaporation calculations as a metered REST API: steam tables (IAPWS-IF97), liquor boiling points, enthalpies ' +
        'and transport properties from published correlations, single- and multiple-effect evaporators (with thermal ' +
        'vapour recompression and condensate flash), mechanical-vapour-recompression evaporators, an estimate of the ' +
        'overall heat-transfer coefficient from film coefficients, a study that ranks evaporator schemes by annual ' +
        'cost, and batches.\n\n' +
        'Outputs are plain numbers in the default units; each field states its unit (`x-unit`). ' +
        'Every result carries `provenance` (engine version and models used).\n\n' +
        UNIT_GRAMMAR +
        '\n\n' +
        'Errors are RFC 9457 problem details (`application/problem+json`). Rate-limit state is sent in the `RateLimit` and ' +
        '`RateLimit-Policy` headers (IETF draft-ietf-httpapi-ratelimit-headers-07).\n\n' +
        'Results are preliminary engineering estimates; pressure and vacuum equipment must be designed under local codes by a licensed engineer.',
    },
    servers: [{ url: '/' }],
    security: [{ bearerAuth: [] }],
    tags: [
      { name: 'Steam', description: 'Water and steam properties, IAPWS-IF97' },
      { name: 'Liquors', description: 'Liquor models and stored liquor data' },
      { name: 'Evaporators', description: 'Evaporator design and rating' },
      { name: 'Studies', description: 'Comparisons of schemes for one duty, costed' },
      { name: 'Batch', description: 'Many cases in one request' },
      {
        name: 'Jobs',
        description: 'Long batches and sweeps run in the background: state, progress, results, cancel',
      },
    ],
  });
}

let cached: ReturnType<typeof buildOpenApiDocument> | undefined;

/** The document, built once per process. */
export function openApiDocument(): ReturnType<typeof buildOpenApiDocument> {
  cached ??= buildOpenApiDocument();
  return cached;
}

/** A bar above the API reference with the way back to the console (served here, nothing from elsewhere). */
const DOCS_BAR_PATH = '/docs-assets/back-to-console.js';
const DOCS_BAR_JS = `(function () {
  var bar = document.createElement('nav');
  bar.className = 'ebullio-docs-bar';
  bar.setAttribute('aria-label', 'Ebullio');
  var back = document.createElement('a');
  back.href = '/console/';
  back.textContent = '\u2190 Back to the Ebullio console';
  bar.appendChild(back);
  document.body.insertBefore(bar, document.body.firstChild);
})();`;
const DOCS_BAR_CSS = `.ebullio-docs-bar { padding: 10px 20px; background: #1f3a4d; font: 14px/1.4 sans-serif; }
.ebullio-docs-bar a { color: #fff; text-decoration: none; }
.ebullio-docs-bar a:hover, .ebullio-docs-bar a:focus { text-decoration: underline; }`;

/**
 * Serves GET /openapi.json and Swagger UI at /docs (public, not metered). Mount at the app root:
 * `app.use(openApiRouter())`.
 */
export function openApiRouter(): Router {
  const router = Router();
  router.get('/openapi.json', (_req, res) => {
    res.json(openApiDocument());
  });
  router.get(DOCS_BAR_PATH, (_req, res) => {
    res.type('application/javascript').send(DOCS_BAR_JS);
  });
  router.use(
    '/docs',
    swaggerUi.serve,
    swaggerUi.setup(undefined, {
      customSiteTitle: 'Ebullio API',
      customCss: DOCS_BAR_CSS,
      customJs: DOCS_BAR_PATH,
      swaggerOptions: { url: '/openapi.json', persistAuthorization: true },
    }),
  );
  return router;
}

/** For app.ts: `appModules.push(openApiModule)` (or `app.use(openApiRouter())`). */
export const openApiModule = {
  register(app: { use: (handler: Router) => unknown }): void {
    app.use(openApiRouter());
  },
};
