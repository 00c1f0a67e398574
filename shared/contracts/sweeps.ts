/**
 * Contract of the sweep operation: one request of an operation, repeated while one or two of its
 * fields run through lists or ranges of values. The operations a sweep can run are those a batch
 * can (their catalogue `batchName`, shared/operations.ts), so a new calculation is sweepable as
 * soon as it is batchable.
 */
import { z } from 'zod';
import { batchOperations, runTally } from './batch.js';
import { ProblemSchema, PROTOTYPE_KEYS } from './common.js';
import { CallbackUrlSchema } from './jobs.js';

/** Most points in one sweep (the product of the fields' counts); more is refused with 422. */
export const MAX_SWEEP_POINTS = 10_000;
/** Most fields a sweep varies. */
export const MAX_SWEEP_FIELDS = 2;

/** Path segments that never name a field (they would reach an object's prototype). */
export const FORBIDDEN_SEGMENTS = PROTOTYPE_KEYS;

/** `body.pressure`, `feed.temperature`, `effects[1].area`: object keys and array indices. */
const FIELD_PATH = /^[A-Za-z_$][\w$]*(?:\.[A-Za-z_$][\w$]*|\[\d{1,3}\])*$/;

const fieldPath = z
  .string()
  .max(200)
  .regex(FIELD_PATH, {
    message: 'must be a dotted path into the request body, e.g. "body.pressure" or "feed.temperature"',
  })
  .refine((p) => !p.split(/[.[\]]/).some((seg) => FORBIDDEN_SEGMENTS.includes(seg)), {
    message: `must not contain the segments ${FORBIDDEN_SEGMENTS.join(', ')}`,
  })
  .meta({
    description:
      "Dotted path of the field in the operation's request body (array entries as `[i]`), e.g. `body.pressure`",
    example: 'body.pressure',
  });

const sweepValue = z.union([z.number(), z.string().max(100), z.boolean()]).meta({
  description:
    'A value of the field, as the operation accepts it: a number in its default unit or a string with a unit ("20 kPa")',
});

export const SweepListFieldSchema = z
  .object({
    field: fieldPath,
    values: z
      .array(sweepValue)
      .min(1)
      .max(MAX_SWEEP_POINTS)
      .meta({ description: `The values, in order (1 to ${MAX_SWEEP_POINTS})` }),
  })
  .strict();

export const SweepRangeFieldSchema = z
  .object({
    field: fieldPath,
    from: z.number().meta({ description: "First value, in the field's default unit" }),
    to: z.number().meta({ description: "Last value, in the field's default unit" }),
    steps: z
      .int()
      .min(2)
      .max(MAX_SWEEP_POINTS)
      .meta({ description: `Number of points, both ends included (2 to ${MAX_SWEEP_POINTS})` }),
    spacing: z
      .enum(['linear', 'log'])
      .default('linear')
      .meta({ description: 'Even steps (`linear`) or even ratios (`log`; both ends must be above 0)' }),
  })
  .strict()
  .superRefine((r, ctx) => {
    if (r.spacing === 'log') {
      for (const key of ['from', 'to'] as const) {
        if (!(r[key] > 0))
          ctx.addIssue({
            code: 'custom',
            path: [key],
            message: 'must be above 0 for log spacing',
          });
      }
    }
  });

export const SweepFieldSchema = z.union([SweepListFieldSchema, SweepRangeFieldSchema]).meta({
  id: 'SweepField',
  description: 'A varied field: a list of `values`, or a range `from`, `to`, `steps` (and `spacing`)',
});
export type SweepField = z.output<typeof SweepFieldSchema>;

export const SweepRequestSchema = z
  .object({
    operation: z.enum(batchOperations).meta({ description: 'The operation every point runs' }),
    base: z.record(z.string(), z.unknown()).meta({
      description:
        "A valid request body of the operation; each point replaces the varied fields' values in it",
    }),
    vary: z
      .array(SweepFieldSchema)
      .min(1)
      .max(MAX_SWEEP_FIELDS)
      .superRefine((fields, ctx) => {
        const seen = new Set<string>();
        fields.forEach((f, i) => {
          if (seen.has(f.field))
            ctx.addIssue({ code: 'custom', path: [i, 'field'], message: 'is varied twice' });
          seen.add(f.field);
        });
      })
      .meta({
        description: `One or two fields (the first varies slowest); at most ${MAX_SWEEP_POINTS} points in all`,
      }),
    callbackUrl: CallbackUrlSchema.optional(),
  })
  .strict()
  .meta({
    id: 'SweepRequest',
    example: {
      operation: 'single-effect',
      base: {
        liquor: 'sodium-hydroxide',
        feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
        product: { massFraction: 0.3 },
        steam: { pressure: '3 barg' },
        body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
      },
      vary: [
        { field: 'body.pressure', values: [10, 15, '20 kPa'] },
        { field: 'feed.temperature', from: 30, to: 80, steps: 6 },
      ],
    },
  });
export type SweepRequest = z.output<typeof SweepRequestSchema>;

export const SweepRowSchema = z
  .object({
    values: z
      .record(z.string(), z.union([z.number(), z.string(), z.boolean()]))
      .meta({ description: 'The varied fields and their values at this point, as sent' }),
    status: z.enum(['ok', 'error']),
    result: z.record(z.string(), z.unknown()).optional().meta({
      description:
        "The operation's response at this point (warnings included; the cautions and provenance given once at the top)",
    }),
    problem: ProblemSchema.optional().meta({
      description:
        "Why this point failed (the other points are unaffected): the single call's problem, its paths naming the operation's body fields",
    }),
  })
  .meta({ id: 'SweepRow' });

export const SweepResponseSchema = z
  .object({
    ...runTally,
    unitsCharged: z.int().meta({
      description:
        'Sum of the costs of the points that succeeded (each costs what its single call costs); refused points cost nothing',
    }),
    cautions: z.array(z.unknown()).optional().meta({
      description: "The operation's cautions, the same for every point, given once",
    }),
    provenance: z.record(z.string(), z.unknown()).optional().meta({
      description: "The operation's provenance, the same for every point, given once",
    }),
    rows: z.array(SweepRowSchema).meta({ description: 'One row per point, the first field varying slowest' }),
  })
  .meta({ id: 'SweepResponse' });
export type SweepResponse = z.infer<typeof SweepResponseSchema>;

export const SweepCsvQuerySchema = z
  .object({
    columns: z.string().max(4000).optional().meta({
      description:
        'For `Accept: text/csv`: comma-separated dotted result columns (e.g. `steamFlow,heatTransferArea`); default: every number of the result',
      example: 'area,duty,steamEconomy',
    }),
  })
  .meta({ id: 'SweepQuery' });
