/**
 * Who may do what: the console roles and the API-key scopes, defined once for the server (route
 * role lists, database enums, the operation catalogue), the zod contracts and the console.
 * Plain `as const` arrays with no imports, so the console may import them as values without
 * pulling zod into its bundle.
 */

/** Console roles. admin: everything; billing: billing plus read-only views; developer: own accounts' keys, usage, request log. */
export const ROLES = ['admin', 'billing', 'developer'] as const;
export type Role = (typeof ROLES)[number];

/** The scopes an API key can hold; each metered operation needs one (shared/operations.ts). */
export const KEY_SCOPES = ['steam', 'liquors', 'evaporators', 'batch', 'usage'] as const;
export type KeyScope = (typeof KEY_SCOPES)[number];
