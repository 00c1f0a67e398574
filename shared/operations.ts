/**
 * The catalogue of metered /v1 operations as plain data: each operation's dotted id, a label,
 * the key scope it needs, its unit cost and, for the operations a batch can run, the short name
 * batch clients send. No zod and no server code, so the console may import it as a value.
 *
 * This is the one place an operation id is spelled. The server's operation declarations
 * (server/http/v1/operations/) refer to these entries by their key and add the path, the
 * contracts and the calculation; metering, usage, batch results and the OpenAPI document all use
 * the dotted id.
 *
 * A "unit" is Ebullio's billing measure. Cheap catalogue reads cost 0 units but are still
 * metered (they appear in usage_events and usage_daily with units = 0). Units are billed only
 * for successful responses (status < 400); errors are metered with 0 units.
 */
import type { KeyScope } from './access.js';

export interface OperationInfo {
  /** Dotted id: `<area>.<operation>`; metering, usage and the request log record it. */
  readonly id: string;
  /** A few words for tables and filters (the console's usage and request-log views). */
  readonly title: string;
  /** One line for people (console usage pages, the OpenAPI summary of the catalogue). */
  readonly label: string;
  /** The API-key scope the operation needs. */
  readonly scope: KeyScope;
  /** Base cost in units, charged before the calculation runs. */
  readonly units: number;
  /** Extra units per effect (multiple-effect: 5 + 5 per effect). */
  readonly unitsPerEffect?: number;
  /** The short name a batch request gives in `operation` to run this operation on every case. */
  readonly batchName?: string;
}

export const operationCatalogue = {
  steamSaturation: {
    id: 'steam.saturation',
    title: 'Steam saturation',
    label: 'Saturation state of water at a pressure or temperature (IAPWS-IF97)',
    scope: 'steam',
    units: 1,
    batchName: 'steam-saturation',
  },
  steamState: {
    id: 'steam.state',
    title: 'Steam state',
    label: 'Water or steam state at (p, T) or (p, h) (IAPWS-IF97)',
    scope: 'steam',
    units: 1,
    batchName: 'steam-state',
  },
  liquorList: {
    id: 'liquors.list',
    title: 'Liquor list',
    label: 'List the built-in and stored liquor models with their validity ranges',
    scope: 'liquors',
    units: 0,
  },
  liquorGet: {
    id: 'liquors.get',
    title: 'Liquor details',
    label: 'One liquor model: source, validity box, properties offered',
    scope: 'liquors',
    units: 0,
  },
  liquorBoilingPoint: {
    id: 'liquors.boiling-point',
    title: 'Liquor boiling point',
    label: 'Boiling point and boiling-point rise of a liquor at a concentration and pressure',
    scope: 'liquors',
    units: 1,
    batchName: 'liquor-boiling-point',
  },
  liquorEnthalpy: {
    id: 'liquors.enthalpy',
    title: 'Liquor enthalpy',
    label: 'Specific enthalpy of a liquor at a concentration and temperature',
    scope: 'liquors',
    units: 1,
    batchName: 'liquor-enthalpy',
  },
  storedLiquorCreate: {
    id: 'liquors.stored.create',
    title: 'Store a liquor',
    label: "Store a custom liquor definition on the caller's account",
    scope: 'liquors',
    units: 1,
  },
  storedLiquorList: {
    id: 'liquors.stored.list',
    title: 'Stored liquors',
    label: "List the caller's stored liquor definitions",
    scope: 'liquors',
    units: 0,
  },
  storedLiquorUpdate: {
    id: 'liquors.stored.update',
    title: 'Update a stored liquor',
    label: 'Store a new version of a stored liquor definition',
    scope: 'liquors',
    units: 1,
  },
  storedLiquorDelete: {
    id: 'liquors.stored.delete',
    title: 'Delete a stored liquor',
    label: 'Delete a stored liquor definition',
    scope: 'liquors',
    units: 0,
  },
  singleEffect: {
    id: 'evaporators.single-effect',
    title: 'Single-effect evaporator',
    label: 'Design or rate a single-effect evaporator',
    scope: 'evaporators',
    units: 5,
    batchName: 'single-effect',
  },
  multipleEffect: {
    id: 'evaporators.multiple-effect',
    title: 'Multiple-effect train',
    label: 'Design a multiple-effect train (5 units + 5 per effect)',
    scope: 'evaporators',
    units: 5,
    unitsPerEffect: 5,
    batchName: 'multiple-effect',
  },
  mechanicalVaporRecompression: {
    id: 'evaporators.mechanical-vapor-recompression',
    title: 'MVR evaporator',
    label: 'Design or rate a mechanical-vapour-recompression evaporator (compressor, make-up steam, area)',
    scope: 'evaporators',
    units: 5,
    batchName: 'mechanical-vapor-recompression',
  },
  evaporatorSchemeStudy: {
    id: 'studies.evaporator-schemes',
    title: 'Scheme study',
    label: 'Rank evaporator schemes by total annual cost (the sum of the units of the calculations it runs)',
    scope: 'evaporators',
    units: 0,
  },
  overallCoefficient: {
    id: 'heat-transfer.overall-coefficient',
    title: 'U estimate',
    label: 'Estimate the overall heat-transfer coefficient U of an evaporator tube from film coefficients',
    scope: 'evaporators',
    units: 2,
    batchName: 'overall-coefficient',
  },
  batch: {
    id: 'batch',
    title: 'Batch',
    label: 'Run many calculations in one request (cost: the sum of the rows)',
    scope: 'batch',
    units: 0,
  },
  sweep: {
    id: 'sweeps.run',
    title: 'Sweep',
    label: 'Run one calculation over a list or range of one or two fields (cost: the sum of the points)',
    scope: 'batch',
    units: 0,
  },
  jobRead: {
    id: 'jobs.read',
    title: 'Job state',
    label: 'State, progress and units of a batch or sweep running as a job',
    scope: 'batch',
    units: 0,
  },
  jobResult: {
    id: 'jobs.result',
    title: 'Job result',
    label: "A finished job's result as JSON (its points were charged as they ran)",
    scope: 'batch',
    units: 0,
  },
  jobResultCsv: {
    id: 'jobs.result-csv',
    title: 'Job result (CSV)',
    label: "A finished job's result as CSV",
    scope: 'batch',
    units: 0,
  },
  jobCancel: {
    id: 'jobs.cancel',
    title: 'Cancel a job',
    label: 'Cancel a queued or running job (the points already done stay charged)',
    scope: 'batch',
    units: 0,
  },
  usageRead: {
    id: 'usage.read',
    title: 'Usage report',
    label: "The calling account's usage and quota for the current month",
    scope: 'usage',
    units: 0,
  },
} as const satisfies Record<string, OperationInfo>;

type Catalogue = typeof operationCatalogue;
export type OperationKey = keyof Catalogue;
export type OperationId = Catalogue[OperationKey]['id'];
export type CatalogueEntry = Catalogue[OperationKey];

/** Every operation, in catalogue order. */
export const operationList: readonly CatalogueEntry[] = Object.values(operationCatalogue);

/** Every dotted operation id, in catalogue order. */
export const operationIds: readonly OperationId[] = operationList.map((o) => o.id);

const byId = new Map<string, CatalogueEntry>(operationList.map((o) => [o.id, o]));

/** The catalogue entry of a dotted id (undefined for an unknown id). */
export function operationInfo(id: string): CatalogueEntry | undefined {
  return byId.get(id);
}

export function isOperationId(value: string): value is OperationId {
  return byId.has(value);
}

type BatchEntry = Extract<CatalogueEntry, { batchName: string }>;
export type BatchOperationName = BatchEntry['batchName'];

/** The short names a batch request may give, in catalogue order. */
export const batchOperationNames = operationList
  .map((o) => ('batchName' in o ? o.batchName : undefined))
  .filter((n): n is BatchOperationName => n !== undefined) as unknown as readonly [
  BatchOperationName,
  ...BatchOperationName[],
];
