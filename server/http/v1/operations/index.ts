/**
 * Every /v1 operation, declared once (server/http/v1/operation.ts). The router, the OpenAPI
 * document and the batch dispatcher are built from this list; its order is the order of the
 * OpenAPI document's paths. Add a new operation's declaration here.
 */
import type { AnyOperation } from '../operation.js';
import { batchOperation } from './batch.js';
import { sweepOperation, sweepRunner } from './sweeps.js';
import { jobOperations } from './jobs.js';
import { multipleEffect, singleEffect } from './evaporators.js';
import { mechanicalVaporRecompressionOperation } from './recompression.js';
import { overallCoefficient } from './heat-transfer.js';
import { liquorBoilingPoint, liquorEnthalpy, liquorGet, liquorList } from './liquors.js';
import { steamSaturation, steamState } from './steam.js';
import {
  storedLiquorCreate,
  storedLiquorDelete,
  storedLiquorList,
  storedLiquorUpdate,
} from './stored-liquors.js';
import { evaporatorSchemeStudy } from './studies.js';
import { usageRead } from './usage.js';

const calculations: AnyOperation[] = [
  steamSaturation,
  steamState,
  liquorList,
  storedLiquorCreate,
  storedLiquorList,
  liquorGet,
  storedLiquorUpdate,
  storedLiquorDelete,
  liquorBoilingPoint,
  liquorEnthalpy,
  singleEffect,
  multipleEffect,
  mechanicalVaporRecompressionOperation,
  overallCoefficient,
];

/** Sweeps over the calculations: the /v1 operation's and the console workbench's (compiled once). */
export const calculationSweeps = sweepRunner(calculations);

const operations: AnyOperation[] = [
  ...calculations,
  batchOperation(calculations),
  sweepOperation(calculationSweeps),
  evaporatorSchemeStudy,
  usageRead,
];

/** Every operation, and the routes of jobs for those that may run as jobs (their `jobs` part). */
export const v1Operations: readonly AnyOperation[] = [...operations, ...jobOperations(operations)];

/** The calculations a batch, a sweep or the console's workbench may run. */
export const calculationOperations: readonly AnyOperation[] = calculations;

const byId = new Map<string, AnyOperation>(v1Operations.map((d) => [d.operation.id, d]));

/** The declaration of a dotted operation id (undefined for an unknown id). */
export function operationDeclaration(id: string): AnyOperation | undefined {
  return byId.get(id);
}
