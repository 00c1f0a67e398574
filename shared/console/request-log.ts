/**
 * Console contracts: the request log (GET /console-api/request-log, /request-log/:id,
 * /request-log/export.csv). Paging, sorting and filtering happen on the server.
 */
import { z } from 'zod';
import { IdNumberSchema, InstantSchema } from './accounts.js';

export const MAX_PAGE_SIZE = 200;
/** The CSV export stops after this many rows (the response says so in a header). */
export const CSV_ROW_CAP = 50_000;

/** "404", or a class "4xx" (1xx–5xx). */
export const StatusFilterSchema = z
  .string()
  .regex(/^(?:[1-5][0-9][0-9]|[1-5]xx)$/, { error: 'must be a status like 404 or a class like 4xx' });

export const RequestLogFilterSchema = z.object({
  accountId: IdNumberSchema.optional(),
  keyId: IdNumberSchema.optional(),
  operation: z.string().min(1).max(64).optional().meta({ description: 'Operation id, e.g. steam.state' }),
  status: StatusFilterSchema.optional(),
  from: InstantSchema.optional().meta({ description: 'At or after this instant' }),
  to: InstantSchema.optional().meta({ description: 'Before this instant' }),
  requestId: z.string().min(1).max(128).optional(),
});
export type RequestLogFilter = z.infer<typeof RequestLogFilterSchema>;

export const RequestLogSortSchema = z.enum(['at', 'latency', 'status']);

export const RequestLogQuerySchema = RequestLogFilterSchema.extend({
  page: z.coerce.number().int().min(1).max(1_000_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(MAX_PAGE_SIZE).default(50),
  sort: RequestLogSortSchema.default('at'),
  order: z.enum(['asc', 'desc']).default('desc'),
});
export type RequestLogQuery = z.infer<typeof RequestLogQuerySchema>;

export const RequestLogItemSchema = z
  .object({
    id: z.int(),
    requestId: z.string(),
    at: InstantSchema,
    accountId: z.int().nullable(),
    keyId: z.int().nullable(),
    accountName: z.string().nullable().meta({ description: 'The account’s name (null without an account)' }),
    keyName: z.string().nullable().meta({ description: 'The API key’s name (null without a key)' }),
    method: z.string(),
    path: z.string(),
    operation: z.string().nullable().meta({ description: 'Metered operation, when the request reached one' }),
    status: z.int(),
    latencyMs: z.int(),
    units: z.int().nullable(),
    idempotentReplay: z.boolean().meta({
      description:
        'The answer was the stored answer of an earlier request with the same Idempotency-Key (0 units)',
    }),
  })
  .meta({ id: 'ConsoleRequestLogItem' });
export type RequestLogItem = z.infer<typeof RequestLogItemSchema>;

export const RequestLogPageSchema = z
  .object({
    items: z.array(RequestLogItemSchema),
    total: z.int(),
    page: z.int(),
    pageSize: z.int(),
  })
  .meta({ id: 'ConsoleRequestLogPage' });
export type RequestLogPage = z.infer<typeof RequestLogPageSchema>;

export const RequestLogIdParamsSchema = z.object({ id: IdNumberSchema });

export const RequestLogDetailSchema = RequestLogItemSchema.extend({
  engineVersion: z.string(),
  bodiesRetained: z
    .boolean()
    .meta({ description: 'False when the account does not retain bodies (both bodies are then null)' }),
  requestBody: z.string().nullable().meta({ description: 'Redacted, truncated at the log limit' }),
  responseBody: z.string().nullable().meta({ description: 'Redacted, truncated at the log limit' }),
  timings: z.object({
    receivedAt: InstantSchema.meta({ description: 'at − latency' }),
    completedAt: InstantSchema.meta({ description: 'When the response was metered and logged' }),
    latencyMs: z.int(),
  }),
}).meta({ id: 'ConsoleRequestLogDetail' });
export type RequestLogDetail = z.infer<typeof RequestLogDetailSchema>;

/** Columns of GET /request-log/export.csv, in order. */
export const REQUEST_LOG_CSV_COLUMNS = [
  'id',
  'requestId',
  'at',
  'accountId',
  'keyId',
  'method',
  'path',
  'operation',
  'status',
  'latencyMs',
  'units',
  'idempotentReplay',
] as const;

/** One field that differs between the logged result and today's (dotted path, `[i]` for items). */
export const ReplayDifferenceSchema = z
  .object({
    field: z.string().meta({ example: 'steamEconomy' }),
    change: z.enum(['changed', 'added', 'removed']).meta({
      description: 'added: only today’s result has the field; removed: only the logged one',
    }),
    logged: z.unknown().optional(),
    today: z.unknown().optional(),
    absolute: z.number().optional().meta({ description: 'Numbers: today − logged, in the field’s unit' }),
    relative: z
      .number()
      .nullable()
      .optional()
      .meta({ description: 'Numbers: (today − logged) / |logged|; null when the logged value is 0' }),
  })
  .meta({ id: 'ConsoleReplayDifference' });
export type ReplayDifference = z.infer<typeof ReplayDifferenceSchema>;

export const ReplayModelChangeSchema = z
  .object({
    id: z.string(),
    change: z.enum(['changed', 'added', 'removed']),
    logged: z.string().optional().meta({ description: 'The source the logged result cites' }),
    today: z.string().optional().meta({ description: 'The source today’s result cites' }),
  })
  .meta({ id: 'ConsoleReplayModelChange' });

export const ReplayResultSchema = z
  .object({
    entryId: z.int(),
    operation: z.string().meta({ description: 'The dotted operation id that was run again' }),
    unitsCharged: z.int().min(0).meta({ description: 'Units charged to the entry’s account for the replay' }),
    requestId: z.string().meta({ description: 'The request id of the replay in the request log' }),
    responseStored: z
      .boolean()
      .meta({ description: 'False when no comparable response was logged: only today’s result is given' }),
    note: z.string().optional().meta({ description: 'Why there is no comparison, when there is none' }),
    logged: z.object({
      engineVersion: z.string(),
      result: z.unknown().meta({ description: 'The logged response body (null when not stored)' }),
    }),
    today: z.object({ engineVersion: z.string(), result: z.unknown() }),
    differences: z
      .array(ReplayDifferenceSchema)
      .meta({ description: 'Fields that differ (provenance excluded); empty when the results agree' }),
    modelSources: z
      .array(ReplayModelChangeSchema)
      .meta({ description: 'Models of provenance whose cited source differs, or that one side only uses' }),
  })
  .meta({ id: 'ConsoleReplayResult' });
export type ReplayResult = z.infer<typeof ReplayResultSchema>;
