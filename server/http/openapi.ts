/**
 * The OpenAPI 3.1 document of the v1 calculation API, generated from the zod contracts in
 * shared/contracts (one schema feeds validation, types and this document), and the router
 * that serves it at /openapi.json with Swagger UI at /docs (assets from swagger-ui-express, no CDN).
 *
 * `scripts/generate-openapi.ts` writes the same document to openapi/openapi.json; a test fails
 * when the committed file drifts from the code.
 */
import { OpenAPIRegistry, OpenApiGeneratorV31, extendZodWithOpenApi } from '@asteasolutions/zod-to-openapi';
import { Router } from 'express';
import swaggerUi from 'swagger-ui-express';
import { z } from 'zod';
import {
  BatchRequestSchema,
  BatchResponseSchema,
  BatchUploadSchema,
  BoilingPointRequestSchema,
  BoilingPointResponseSchema,
  EnthalpyRequestSchema,
  EnthalpyResponseSchema,
  LiquorIdParamsSchema,
  LiquorListQuerySchema,
  LiquorListSchema,
  LiquorSummarySchema,
  MAX_BATCH_ROWS,
  MultipleEffectRequestSchema,
  MultipleEffectResponseSchema,
  ProblemSchema,
  SaturationQuerySchema,
  SaturationResponseSchema,
  SingleEffectRequestSchema,
  SingleEffectResponseSchema,
  SteamStateRequestSchema,
  SteamStateResponseSchema,
  StoredLiquorCreateSchema,
  StoredLiquorIdParamsSchema,
  StoredLiquorListSchema,
  StoredLiquorSchema,
  StoredLiquorUploadSchema,
  UsageResponseSchema,
} from '../../shared/contracts/index.js';

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

/**
 * Worked answers for the operations that take no input, for the invented North Mill account (a
 * test checks each against its schema and its sums).
 */
export const responseExamples = {
  listStoredLiquors: {
    liquors: [
      {
        id: 'north-mill-spent-wash',
        name: 'North Mill spent wash (invented)',
        kind: 'stored',
        definition: (StoredLiquorCreateSchema.meta() as { example: { definition: unknown } }).example
          .definition,
        createdAt: '2026-11-30T08:15:00.000Z',
      },
    ],
  },
  getUsage: {
    month: '2026-12',
    quota: { limit: 50_000, used: 1_218, remaining: 48_782, resetsAt: '2027-01-01T00:00:00.000Z' },
    totals: { requests: 412, units: 1_218, errors: 9 },
    byOperation: [
      { operation: 'evaporators.multiple-effect', requests: 41, units: 800, errors: 1 },
      { operation: 'evaporators.single-effect', requests: 80, units: 395, errors: 1 },
      { operation: 'steam.saturation', requests: 23, units: 23, errors: 0 },
      { operation: 'usage.read', requests: 268, units: 0, errors: 7 },
    ],
    byDay: [
      { day: '2026-12-01', requests: 230, units: 690, errors: 5 },
      { day: '2026-12-02', requests: 182, units: 528, errors: 4 },
    ],
  },
} as const;

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

/** Builds a fresh registry holding every v1 calculation route. */
export function buildRegistry(): OpenAPIRegistry {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'bearerAuth', {
    type: 'http',
    scheme: 'bearer',
    description: 'An API key created in the console: `Authorization: Bearer ebl_live_…`',
  });
  const security = [{ bearerAuth: [] }];

  registry.registerPath({
    method: 'get',
    path: '/v1/steam/saturation',
    operationId: 'getSteamSaturation',
    tags: ['Steam'],
    summary: 'Saturated water and steam at a pressure or a temperature (IAPWS-IF97)',
    description:
      'Give exactly one of `pressure` or `temperature` (plain numbers in kPa absolute / °C, or strings with a unit). ' +
      'Example: the heating steam of an invented caustic concentrator at Harrow Vale works, `?pressure=3 barg`.',
    security,
    request: { query: SaturationQuerySchema },
    responses: { 200: ok('Saturation properties', SaturationResponseSchema), ...commonProblems },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/steam/state',
    operationId: 'postSteamState',
    tags: ['Steam'],
    summary: 'State of water or steam at (p, T) or (p, h) (IAPWS-IF97)',
    security,
    request: {
      body: jsonBody(
        SteamStateRequestSchema,
        { pressure: '10 bar', temperature: 250 },
        'Superheated steam in a header',
      ),
    },
    responses: { 200: ok('The state', SteamStateResponseSchema), ...commonProblems },
  });

  registry.registerPath({
    method: 'get',
    path: '/v1/liquors',
    operationId: 'listLiquors',
    tags: ['Liquors'],
    summary: 'Liquor models: built-in correlations and this account’s stored liquors, with their validity',
    security,
    request: { query: LiquorListQuerySchema },
    responses: { 200: ok('The liquors', LiquorListSchema), ...commonProblems },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/stored-liquors',
    operationId: 'createStoredLiquor',
    tags: ['Liquors'],
    summary:
      'Store a liquor of your own (JSON definition, or a Dühring table uploaded as CSV in multipart/form-data)',
    description:
      'Bad CSV rows are reported by line number in the problem’s `errors` (field `file:line 7`). ' +
      'The stored id can then be used as `liquor` in any calculation.',
    security,
    request: {
      body: jsonOrUploadBody(
        StoredLiquorCreateSchema,
        StoredLiquorUploadSchema,
        'spent-wash',
        'Dühring table of an invented spent wash at North Mill',
      ),
    },
    responses: {
      201: ok('Stored', StoredLiquorSchema),
      409: problem('A liquor with this id exists (type conflict)'),
      413: problem('The upload is too large (type payload-too-large)'),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'get',
    path: '/v1/stored-liquors',
    operationId: 'listStoredLiquors',
    tags: ['Liquors'],
    summary: 'The liquors stored by this account, with their definitions',
    security,
    responses: {
      200: ok('Stored liquors', StoredLiquorListSchema, {}, responseExamples.listStoredLiquors),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'get',
    path: '/v1/liquors/{liquorId}',
    operationId: 'getLiquor',
    tags: ['Liquors'],
    summary: 'One liquor model (built-in or stored)',
    security,
    request: { params: LiquorIdParamsSchema },
    responses: {
      200: ok('The liquor', LiquorSummarySchema),
      404: problem('No such liquor'),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'delete',
    path: '/v1/stored-liquors/{liquorId}',
    operationId: 'deleteStoredLiquor',
    tags: ['Liquors'],
    summary: 'Delete a stored liquor (built-in models cannot be deleted)',
    security,
    request: { params: StoredLiquorIdParamsSchema },
    responses: {
      204: { description: 'Deleted', headers: rateLimitHeaders },
      404: problem('No stored liquor with this id'),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/liquors/{liquorId}/boiling-point',
    operationId: 'postLiquorBoilingPoint',
    tags: ['Liquors'],
    summary: 'Boiling point and boiling-point rise of a liquor at a mass fraction and pressure',
    security,
    request: {
      params: LiquorIdParamsSchema,
      body: jsonBody(
        BoilingPointRequestSchema,
        { massFraction: 0.3, pressure: '150 mbar' },
        '30 % caustic in the last body',
      ),
    },
    responses: {
      200: ok('Boiling point', BoilingPointResponseSchema),
      404: problem('No such liquor'),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/liquors/{liquorId}/enthalpy',
    operationId: 'postLiquorEnthalpy',
    tags: ['Liquors'],
    summary: 'Specific enthalpy (and heat capacity) of a liquor, steam-table datum',
    security,
    request: {
      params: LiquorIdParamsSchema,
      body: jsonBody(
        EnthalpyRequestSchema,
        { massFraction: 0.3, temperature: '60 degC' },
        'Warm 30 % caustic',
      ),
    },
    responses: {
      200: ok('Enthalpy', EnthalpyResponseSchema),
      404: problem('No such liquor'),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/evaporators/single-effect',
    operationId: 'postSingleEffect',
    tags: ['Evaporators'],
    summary: 'Single-effect evaporator: design (area from product) or rating (product from area)',
    description:
      'Mass and energy balances with the boiling-point rise included in ΔT = T_steam − T_boiling. ' +
      'Example: an invented caustic concentrator at Harrow Vale works taking 4.5 t/h of 10 % NaOH to 30 %.',
    security,
    request: {
      body: jsonBody(
        SingleEffectRequestSchema,
        {
          liquor: 'sodium-hydroxide',
          feed: { massFlow: '4.5 t/h', massFraction: 0.1, temperature: 40 },
          product: { massFraction: 0.3 },
          steam: { pressure: '3 barg' },
          body: { pressure: 20, overallHeatTransferCoefficient: 1800 },
        },
        'Harrow Vale caustic concentrator (invented)',
      ),
    },
    responses: { 200: ok('The evaporator', SingleEffectResponseSchema), ...commonProblems },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/evaporators/multiple-effect',
    operationId: 'postMultipleEffect',
    tags: ['Evaporators'],
    summary: 'Multiple-effect train (forward, backward, parallel or mixed feed), equal-area design or rating',
    security,
    request: {
      body: jsonBody(
        MultipleEffectRequestSchema,
        {
          liquor: 'sucrose',
          effects: 4,
          feedArrangement: 'forward',
          feed: { massFlow: '40 t/h', massFraction: '15 Bx', temperature: 95 },
          product: { massFraction: '65 Bx' },
          steam: { pressure: '2 barg' },
          lastEffectPressure: 20,
          overallHeatTransferCoefficients: [2800, 2300, 1800, 1100],
        },
        'Four-effect juice evaporator at the invented Corrin Flats sugar factory',
      ),
    },
    responses: { 200: ok('The train', MultipleEffectResponseSchema), ...commonProblems },
  });

  registry.registerPath({
    method: 'post',
    path: '/v1/batch',
    operationId: 'postBatch',
    tags: ['Batch'],
    summary: `Many cases of one operation (JSON array or CSV upload, at most ${MAX_BATCH_ROWS} cases)`,
    description:
      'A failing case does not fail the batch: it gets its own problem. Units charged are the sum of the cases’ costs. ' +
      'Send `Accept: text/csv` to receive the results as CSV (one line per case, dotted column names, `status` and `error` columns).',
    security,
    request: {
      body: jsonOrUploadBody(
        BatchRequestSchema,
        BatchUploadSchema,
        'caustic-sweep',
        'Boiling points along an invented caustic concentration sweep',
      ),
    },
    responses: {
      200: ok('One result or problem per case', BatchResponseSchema, {
        'text/csv': { schema: z.string().meta({ description: 'One line per case' }) },
      }),
      413: problem(`More than ${MAX_BATCH_ROWS} cases, or the upload is too large (type payload-too-large)`),
      ...commonProblems,
    },
  });

  registry.registerPath({
    method: 'get',
    path: '/v1/usage',
    operationId: 'getUsage',
    tags: ['Usage'],
    summary: "The calling account's usage this month and its quota (costs 0 units)",
    description:
      'Totals, by operation and by day for the current calendar month (UTC), and the quota: limit, used, remaining and when it resets. ' +
      'Requests answered with a status of 400 or more are counted but charge no units.',
    security,
    responses: {
      200: ok('Usage this month', UsageResponseSchema, {}, responseExamples.getUsage),
      ...commonProblems,
    },
  });

  return registry;
}

/** The complete OpenAPI 3.1 document (deterministic: same code → same JSON). */
export function buildOpenApiDocument(): ReturnType<OpenApiGeneratorV31['generateDocument']> {
  const generator = new OpenApiGeneratorV31(buildRegistry().definitions, {
    sortComponents: 'alphabetically',
  });
  return generator.generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Ebullio calculation API',
      version: API_VERSION,
      description:
        'Evaporation calculations as a metered REST API: steam tables (IAPWS-IF97), liquor boiling points and enthalpies ' +
        'from published correlations, single- and multiple-effect evaporators, and batches.\n\n' +
        'Inputs: every quantity is a number in the default unit (°C, kPa absolute, kg/s, kJ/kg, kW, m², W/(m²·K), mass fraction 0–1) ' +
        'or a string with a unit ("1.4 bar", "38 degC", "4.5 t/h", "2 barg", "65 %", "60 Bx"). Outputs are plain numbers in the ' +
        'default units; each field states its unit (`x-unit`). Every result carries `provenance` (engine version and models used).\n\n' +
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
      { name: 'Batch', description: 'Many cases in one request' },
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
