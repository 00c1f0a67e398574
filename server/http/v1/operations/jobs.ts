/**
 * The jobs of an account: a long batch or sweep answered `202 Accepted` (server/http/v1/operation.ts,
 * the declarations' `jobs`) is read, its result fetched and cancelled here. The result routes
 * answer exactly what the synchronous call would have (the same `answer` and `csv` of the
 * operation's job part, over the rows the runner committed). Another account's job, an unknown id
 * and an expired job are all 404. Reading costs 0 units.
 */
import type { Request, Response } from 'express';
import { z } from 'zod';
import { JobIdParamsSchema, JobResultCsvQuerySchema, JobSchema } from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { cancelJob, getJob, hasResult, jobResource, jobRows, type JobRow } from '../../jobs/repo.js';
import { problem } from '../../problem.js';
import { validate } from '../../validate.js';
import {
  declareOperation,
  type AnyOperation,
  type JobPart,
  type OperationContext,
  type ProblemBody,
} from '../operation.js';
import { sendJsonInSlices } from './batch.js';

const jobExample = JobSchema.meta()?.example;

/** The caller's job, or 404 (another account's, unknown, or expired and about to be pruned). */
async function liveJob(ctx: OperationContext, jobId: string): Promise<JobRow> {
  const row = await getJob(ctx.store, ctx.accountId, jobId);
  if (!row || (row.expiresAt !== null && row.expiresAt.getTime() <= ctx.clock().getTime())) {
    throw problem(
      'not-found',
      `There is no job ${jobId} on this account (results are kept for a limited time).`,
    );
  }
  return row;
}

/** The routes of jobs, over the declarations that may run as jobs. */
export function jobOperations(operations: readonly AnyOperation[]): AnyOperation[] {
  const parts = new Map<string, JobPart>();
  for (const decl of operations) if (decl.jobs) parts.set(decl.jobs.kind, decl.jobs);

  /** The job's rows and its work: the quota-stopped points refused with the job's problem. */
  const finished = async (req: Request, ctx: OperationContext) => {
    const { jobId } = validate(JobIdParamsSchema, req.params);
    const row = await liveJob(ctx, jobId);
    if (!hasResult(row)) {
      throw problem(
        'conflict',
        row.state === 'queued' || row.state === 'running'
          ? `Job ${jobId} is ${row.state} (${row.done} of ${row.total} points done); its result is there once it has succeeded.`
          : `Job ${jobId} ${row.state === 'cancelled' ? 'was cancelled' : 'failed'}, so it has no result.`,
      );
    }
    const part = parts.get(row.operation);
    if (!part) throw problem('internal', `Job ${jobId} is of an operation this server does not run.`);
    const work = part.open(JSON.parse(row.input) as unknown);
    const rows = await jobRows(ctx.store, row.id);
    const refusal = row.problem === null ? undefined : (JSON.parse(row.problem) as ProblemBody);
    for (let index = rows.length; index < work.total && refusal; index++)
      rows.push(work.refused(index, refusal));
    return { row, work, rows };
  };

  const read = declareOperation({
    operation: operationCatalogue.jobRead,
    method: 'get',
    path: '/v1/jobs/{jobId}',
    openApiName: 'getJob',
    tag: 'Jobs',
    summary: 'A job: state, progress, units charged and, once done, links to its result (costs 0 units)',
    request: { params: JobIdParamsSchema },
    response: { description: 'The job', schema: JobSchema, example: jobExample },
    problems: { 404: 'No such job on this account, or its results expired (type not-found)' },
    send: 'json',
    run: async (input, ctx) => jobResource(await liveJob(ctx, input.params.jobId)),
  });

  const result = declareOperation({
    operation: operationCatalogue.jobResult,
    method: 'get',
    path: '/v1/jobs/{jobId}/result',
    openApiName: 'getJobResult',
    tag: 'Jobs',
    summary: "A finished job's result: the JSON the synchronous request would have answered (costs 0 units)",
    description:
      'The batch or sweep answer over every point, in order. A job the quota stopped (state failed, problem quota-exceeded) ' +
      'has a result too: its remaining points are refused with the quota problem, as a sweep refuses them.',
    request: { params: JobIdParamsSchema },
    response: {
      description: 'The batch (BatchResponse) or sweep (SweepResponse) answer',
      schema: z.record(z.string(), z.unknown()),
    },
    problems: {
      404: 'No such job on this account, or its results expired (type not-found)',
      409: 'The job has not ended yet, or it was cancelled or failed without a result (type conflict)',
    },
    handle: async (req: Request, res: Response, ctx: OperationContext) => {
      const { row, work, rows } = await finished(req, ctx);
      const answer = work.answer(rows, row.units) as { [key: string]: unknown[] } & Record<string, unknown>;
      await sendJsonInSlices(res, answer, work.rowsKey);
    },
  });

  const resultCsv = declareOperation({
    operation: operationCatalogue.jobResultCsv,
    method: 'get',
    path: '/v1/jobs/{jobId}/result.csv',
    openApiName: 'getJobResultCsv',
    tag: 'Jobs',
    summary:
      "A finished job's result as CSV, as the synchronous request answers with `Accept: text/csv` (costs 0 units)",
    request: { params: JobIdParamsSchema, query: JobResultCsvQuerySchema },
    response: {
      description: 'One line per point or case',
      alternatives: {
        'text/csv': { schema: z.string().meta({ description: 'One line per point or case' }) },
      },
    },
    problems: {
      404: 'No such job on this account, or its results expired (type not-found)',
      409: 'The job has not ended yet, or it was cancelled or failed without a result (type conflict)',
    },
    handle: async (req: Request, res: Response, ctx: OperationContext) => {
      const query = validate(JobResultCsvQuerySchema, req.query);
      const { work, rows } = await finished(req, ctx);
      res.type('text/csv').send(work.csv(rows, query));
    },
  });

  const cancel = declareOperation({
    operation: operationCatalogue.jobCancel,
    method: 'delete',
    path: '/v1/jobs/{jobId}',
    openApiName: 'cancelJob',
    tag: 'Jobs',
    summary: 'Cancels a queued or running job (the points already committed stay charged; costs 0 units)',
    description:
      'A running job stops at once: the chunk it is running is discarded and not charged. The answer is the job, cancelled.',
    request: { params: JobIdParamsSchema },
    response: {
      description: 'The job, cancelled',
      schema: JobSchema,
      example: {
        ...(jobExample as object),
        state: 'cancelled',
        finishedAt: '2031-03-14T10:00:04.000Z',
        expiresAt: '2031-03-15T10:00:04.000Z',
      },
    },
    problems: {
      404: 'No such job on this account, or its results expired (type not-found)',
      409: 'The job has already ended (type conflict)',
    },
    send: 'json',
    run: async (input, ctx) => {
      const row = await liveJob(ctx, input.params.jobId);
      const now = ctx.clock();
      const cancelled = await cancelJob(ctx.store, row, now, ctx.jobs?.retentionMs ?? 24 * 3_600_000);
      if (!cancelled) throw problem('conflict', `Job ${row.id} has already ended (${row.state}).`);
      ctx.jobs?.ended(row.id);
      return jobResource(cancelled);
    },
  });

  return [read, result, resultCsv, cancel];
}
