/** Contract of the batch operation: many cases of one operation in one request. */
import { z } from 'zod';
import { batchOperationNames, type BatchOperationName } from '../operations.js';
import { ProblemSchema } from './common.js';
import { CallbackUrlSchema } from './jobs.js';
import { LiquorRefSchema } from './liquors.js';

/**
 * Operations a batch can run, by their short batch names (shared/operations.ts); each case has
 * the body (or query) of that operation's own route.
 */
export const batchOperations = batchOperationNames;
export type BatchOperation = BatchOperationName;

/** Most cases in one batch request; more is refused with 413. */
export const MAX_BATCH_ROWS = 1000;

/** The batch's query string (besides a CSV body's `operation` and `liquor`): the job's callback. */
export const BatchQuerySchema = z
  .object({
    callbackUrl: CallbackUrlSchema.optional(),
  })
  .meta({ id: 'BatchQuery' });

export const BatchRequestSchema = z
  .object({
    operation: z.enum(batchOperations).meta({ description: 'The operation every case runs' }),
    liquor: LiquorRefSchema.optional().meta({
      description:
        'For liquor-boiling-point and liquor-enthalpy: the liquor (a case may give its own `liquor`)',
    }),
    cases: z
      .array(z.record(z.string(), z.unknown()))
      .min(1)
      .meta({
        description: `The cases (at most ${MAX_BATCH_ROWS}); each is the request body of the operation's own route (for steam-saturation: { pressure } or { temperature })`,
      }),
  })
  .strict()
  .meta({
    id: 'BatchRequest',
    example: {
      operation: 'liquor-boiling-point',
      liquor: 'sodium-hydroxide',
      cases: [
        { massFraction: 0.2, pressure: 20 },
        { massFraction: 0.3, pressure: 20 },
        { massFraction: 0.4, pressure: 20 },
      ],
    },
  });
export type BatchRequest = z.infer<typeof BatchRequestSchema>;

export const BatchResultRowSchema = z
  .object({
    index: z.int().min(0).meta({ description: 'Position of the case in the request (0-based)' }),
    line: z.int().min(2).optional().meta({
      description:
        'For cases sent as CSV: the line of the file the case came from (the header is line 1, so the first case is line 2). Problems about CSV cases name `line N, column <field>`',
    }),
    status: z.enum(['ok', 'error']),
    result: z
      .record(z.string(), z.unknown())
      .optional()
      .meta({ description: "The operation's response for this case" }),
    problem: ProblemSchema.optional().meta({
      description: 'Why this case failed (the other cases are unaffected)',
    }),
  })
  .meta({ id: 'BatchResultRow' });

/** What a batch and a sweep both answer about their run: which operation, how many cases, how they ended. */
export const runTally = {
  operation: z.enum(batchOperations),
  count: z.int(),
  succeeded: z.int(),
  failed: z.int(),
};

export const BatchResponseSchema = z
  .object({
    ...runTally,
    unitsCharged: z.int().meta({
      description:
        'Sum of the costs of the cases that succeeded; a refused case (status error) costs nothing. The quota must cover every case before the batch runs',
    }),
    results: z.array(BatchResultRowSchema),
  })
  .meta({ id: 'BatchResponse' });
export type BatchResponse = z.infer<typeof BatchResponseSchema>;

export const BatchUploadSchema = z
  .object({
    operation: z.enum(batchOperations),
    liquor: z.string().optional().meta({ description: 'Liquor id for the liquor operations' }),
    file: z.string().meta({
      format: 'binary',
      description:
        'CSV with a header row of dotted field names (e.g. feed.massFlow, feed.massFraction, steam.pressure); ' +
        'each further line is one case; cells may carry units ("4.5 t/h")',
    }),
  })
  .meta({ id: 'BatchUpload' });
