/**
 * Contract of jobs: a long batch or sweep answered `202 Accepted` and run in the background
 * (`Prefer: respond-async`, or more points than the server's threshold), read at /v1/jobs/{id}.
 */
import { z } from 'zod';
import { operationCatalogue } from '../operations.js';
import { ProblemSchema } from './common.js';

/** Longest callback URL accepted. */
export const MAX_CALLBACK_URL = 2000;

export const CallbackUrlSchema = z
  .string()
  .min(1)
  .max(MAX_CALLBACK_URL)
  .meta({
    description:
      'Used when the request runs as a job: an https URL that receives the job resource (POST, JSON) when the job ends, signed with ' +
      "the account's signing secret (headers `Ebullio-Job-Id`, `Ebullio-Timestamp` in Unix seconds and `Ebullio-Signature`: hex " +
      'HMAC-SHA256 of `<id>.<timestamp>.<body>`). It must not resolve to a loopback, link-local or private address.',
    example: 'https://hooks.example.com/ebullio/jobs',
  });

export const JobIdParamsSchema = z
  .object({
    jobId: z
      .string()
      .min(1)
      .max(64)
      .regex(/^[A-Za-z0-9_-]+$/)
      .meta({
        description: 'The job id from the `Location` header of the 202 answer',
        example: 'job_4kQnW2xY7pLm0aBcDeFgHiJk',
      }),
  })
  .strict();

export const JobResultCsvQuerySchema = z
  .object({
    columns: z.string().max(4000).optional().meta({
      description:
        'For a sweep: comma-separated dotted result columns, as for the synchronous sweep with `Accept: text/csv`',
      example: 'area,duty,steamEconomy',
    }),
  })
  .meta({ id: 'JobResultCsvQuery' });

const at = z.string().meta({ description: 'ISO 8601 instant (UTC)', example: '2031-03-14T10:00:00.000Z' });

export const JobSchema = z
  .object({
    id: z.string(),
    operation: z.enum([operationCatalogue.batch.id, 'sweep']).meta({ description: 'What the job runs' }),
    state: z.enum(['queued', 'running', 'succeeded', 'failed', 'cancelled']),
    progress: z
      .object({ done: z.int().min(0), total: z.int().min(0) })
      .meta({ description: 'Points (or cases) committed so far, of all' }),
    unitsCharged: z.int().min(0).meta({
      description:
        'Units the committed points charged (each what its single call costs; refused points nothing)',
    }),
    createdAt: at,
    startedAt: at.nullable(),
    finishedAt: at.nullable(),
    expiresAt: at
      .nullable()
      .meta({ description: 'When the job and its results are deleted (set once it ends)' }),
    problem: ProblemSchema.optional().meta({
      description:
        'Why the job failed (quota-exceeded: the quota ran out; its result then refuses the remaining points)',
    }),
    callback: z
      .object({
        url: z.string(),
        state: z.enum(['pending', 'delivered', 'failed']).nullable(),
        attempts: z.int().min(0),
        outcome: z
          .string()
          .optional()
          .meta({ description: 'The last attempt: the status answered, or the error' }),
      })
      .optional()
      .meta({ description: 'The callback and its delivery, when the request gave a callbackUrl' }),
    links: z.object({
      self: z.string(),
      result: z
        .string()
        .optional()
        .meta({ description: 'The JSON answer, once the job succeeded (or the quota stopped it)' }),
      resultCsv: z
        .string()
        .optional()
        .meta({ description: 'The CSV answer, as `Accept: text/csv` gives it' }),
    }),
  })
  .meta({
    id: 'Job',
    example: {
      id: 'job_4kQnW2xY7pLm0aBcDeFgHiJk',
      operation: 'sweep',
      state: 'running',
      progress: { done: 500, total: 3000 },
      unitsCharged: 2500,
      createdAt: '2031-03-14T10:00:00.000Z',
      startedAt: '2031-03-14T10:00:00.120Z',
      finishedAt: null,
      expiresAt: null,
      links: { self: '/v1/jobs/job_4kQnW2xY7pLm0aBcDeFgHiJk' },
    },
  });
export type Job = z.infer<typeof JobSchema>;
