/**
 * The one catalogue of metered operations: which scope each needs and what it costs.
 *
 * A "unit" is Ebullio's billing measure. Cheap catalogue reads cost 0 units but are still
 * metered (they appear in usage_events and usage_daily with units = 0). Operations whose cost
 * depends on the request charge `units` up front (in `requireOperation`) and the rest with
 * `chargeUnits(res, n)` once the request is parsed:
 * - evaporators.multiple-effect: 5 + `unitsPerEffect` × number of effects;
 * - batch: 0 up front + the sum of each row's own operation cost.
 * Units are billed only for successful responses (status < 400); errors are metered with 0 units.
 *
 * `path` is the OpenAPI-style path (full, including `/v1`), `method` the HTTP method.
 */

import { KEY_SCOPES } from '../../shared/access.js';

/** The key scopes (shared/access.ts), under the catalogue's own name. */
export const scopes = KEY_SCOPES;
export type Scope = (typeof scopes)[number];

export interface OperationSpec {
  scope: Scope;
  /** Base cost in units, charged before the handler runs. */
  units: number;
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  path: string;
  summary: string;
  /** Extra units per effect (multiple-effect only). */
  unitsPerEffect?: number;
}

export const operations = {
  'steam.saturation': {
    scope: 'steam',
    units: 1,
    method: 'GET',
    path: '/v1/steam/saturation',
    summary: 'Saturation state of water at a pressure or temperature (IAPWS-IF97)',
  },
  'steam.state': {
    scope: 'steam',
    units: 1,
    method: 'POST',
    path: '/v1/steam/state',
    summary: 'Water or steam state at (p, T) or (p, h) (IAPWS-IF97)',
  },
  'liquors.list': {
    scope: 'liquors',
    units: 0,
    method: 'GET',
    path: '/v1/liquors',
    summary: 'List the built-in and stored liquor models with their validity ranges',
  },
  'liquors.get': {
    scope: 'liquors',
    units: 0,
    method: 'GET',
    path: '/v1/liquors/{liquorId}',
    summary: 'One liquor model: source, validity box, properties offered',
  },
  'liquors.boiling-point': {
    scope: 'liquors',
    units: 1,
    method: 'POST',
    path: '/v1/liquors/{liquorId}/boiling-point',
    summary: 'Boiling point and boiling-point rise of a liquor at a concentration and pressure',
  },
  'liquors.enthalpy': {
    scope: 'liquors',
    units: 1,
    method: 'POST',
    path: '/v1/liquors/{liquorId}/enthalpy',
    summary: 'Specific enthalpy of a liquor at a concentration and temperature',
  },
  'liquors.stored.create': {
    scope: 'liquors',
    units: 1,
    method: 'POST',
    path: '/v1/stored-liquors',
    summary: "Store a custom liquor definition on the caller's account",
  },
  'liquors.stored.list': {
    scope: 'liquors',
    units: 0,
    method: 'GET',
    path: '/v1/stored-liquors',
    summary: "List the caller's stored liquor definitions",
  },
  'liquors.stored.delete': {
    scope: 'liquors',
    units: 0,
    method: 'DELETE',
    path: '/v1/stored-liquors/{liquorId}',
    summary: 'Delete a stored liquor definition',
  },
  'evaporators.single-effect': {
    scope: 'evaporators',
    units: 5,
    method: 'POST',
    path: '/v1/evaporators/single-effect',
    summary: 'Design or rate a single-effect evaporator',
  },
  'evaporators.multiple-effect': {
    scope: 'evaporators',
    units: 5,
    unitsPerEffect: 5,
    method: 'POST',
    path: '/v1/evaporators/multiple-effect',
    summary: 'Design a multiple-effect train (5 units + 5 per effect)',
  },
  batch: {
    scope: 'batch',
    units: 0,
    method: 'POST',
    path: '/v1/batch',
    summary: 'Run many calculations in one request (cost: the sum of the rows)',
  },
  'usage.read': {
    scope: 'usage',
    units: 0,
    method: 'GET',
    path: '/v1/usage',
    summary: "The calling account's usage and quota for the current month",
  },
} as const satisfies Record<string, OperationSpec>;

export type OperationId = keyof typeof operations;

export const operationIds = Object.keys(operations) as OperationId[];

export function isOperationId(value: string): value is OperationId {
  return Object.prototype.hasOwnProperty.call(operations, value);
}

export function isScope(value: string): value is Scope {
  return (scopes as readonly string[]).includes(value);
}
