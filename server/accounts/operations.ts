/**
 * The API-key scopes under the catalogue's name, and the operation catalogue itself, which is
 * plain data in shared/operations.ts (dotted id, label, scope, unit cost): metering, usage and the
 * seed read it from here; the /v1 operation declarations add each one's path and calculation.
 */
import { KEY_SCOPES } from '../../shared/access.js';

export {
  isOperationId,
  operationCatalogue,
  operationIds,
  operationInfo,
  type OperationId,
  type OperationInfo,
} from '../../shared/operations.js';

/** The key scopes (shared/access.ts), under the catalogue's own name. */
export const scopes = KEY_SCOPES;
export type Scope = (typeof scopes)[number];

export function isScope(value: string): value is Scope {
  return (scopes as readonly string[]).includes(value);
}
