/**
 * Console contracts: the workbench (GET /console-api/workbench/operations, POST
 * /console-api/workbench/run). The workbench runs a /v1 calculation, or a sweep of it, with a
 * chosen API key of an account the user may act for; the answer is the public API's own.
 */
import { z } from 'zod';
import { KEY_SCOPES } from '../access.js';

/** A JSON Schema document (draft 2020-12), generated from the operation's zod contract. */
const JsonSchemaSchema = z
  .record(z.string(), z.unknown())
  .meta({ description: 'JSON Schema (draft 2020-12) of the part, generated from the API contract' });

export const WorkbenchOperationSchema = z
  .object({
    id: z.string().meta({ description: 'Dotted operation id (as in usage and the request log)' }),
    title: z.string(),
    label: z.string(),
    scope: z.enum(KEY_SCOPES).meta({ description: 'The API-key scope the operation needs' }),
    units: z.int().meta({ description: 'Base cost in units' }),
    method: z.enum(['get', 'post', 'put', 'delete']),
    path: z
      .string()
      .meta({ description: 'The public path of the operation, with `{name}` for path parameters' }),
    batchName: z.string().meta({ description: 'The name a batch or sweep gives in `operation`' }),
    sweepable: z.boolean().meta({ description: 'Whether the workbench can sweep it (no path parameters)' }),
    params: JsonSchemaSchema.nullable().meta({ description: 'The path parameters (null: none)' }),
    body: JsonSchemaSchema,
    response: JsonSchemaSchema.nullable().meta({
      description: 'The answer’s JSON Schema (each number’s unit in `x-unit`), null when not documented',
    }),
    example: z.object({
      params: z.record(z.string(), z.string()).nullable(),
      body: z.unknown(),
    }),
  })
  .meta({ id: 'WorkbenchOperation' });
export type WorkbenchOperation = z.infer<typeof WorkbenchOperationSchema>;

export const WorkbenchOperationListSchema = z
  .object({ items: z.array(WorkbenchOperationSchema) })
  .meta({ id: 'WorkbenchOperationList' });
export type WorkbenchOperationList = z.infer<typeof WorkbenchOperationListSchema>;

/** At most two varied fields, each a list or a range, as in a /v1 sweep. */
export const MAX_WORKBENCH_VARY = 2;

export const WorkbenchRunSchema = z
  .object({
    keyId: z
      .int()
      .min(1)
      .meta({ description: 'The API key the call is made with (metered and logged as its own)' }),
    operation: z.string().min(1).max(64).meta({ description: 'Dotted operation id' }),
    params: z
      .record(z.string().max(64), z.string().max(200))
      .optional()
      .meta({ description: 'Path parameters, e.g. { "liquorId": "sodium-hydroxide" }' }),
    body: z.unknown().meta({ description: 'The request body, checked exactly as the public call checks it' }),
    vary: z
      .array(z.unknown())
      .min(1)
      .max(MAX_WORKBENCH_VARY)
      .optional()
      .meta({ description: 'Run a sweep: the `vary` of a /v1 sweep request, with `body` as its `base`' }),
  })
  .strict()
  .meta({ id: 'WorkbenchRun' });
export type WorkbenchRun = z.infer<typeof WorkbenchRunSchema>;

export const WorkbenchResultSchema = z
  .object({
    kind: z.enum(['single', 'sweep']),
    operation: z.string(),
    keyId: z.int(),
    accountId: z.int(),
    unitsCharged: z.int(),
    requestId: z.string().meta({ description: 'The request-log id of the call' }),
    request: z
      .object({
        method: z.string(),
        path: z.string(),
        body: z.unknown(),
      })
      .meta({ description: 'The equivalent public /v1 request' }),
    result: z.unknown().meta({
      description:
        'The public answer: the operation’s result (warnings, cautions, provenance), or the sweep’s rows',
    }),
  })
  .meta({ id: 'WorkbenchResult' });
export type WorkbenchResult = z.infer<typeof WorkbenchResultSchema>;
