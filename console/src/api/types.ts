/**
 * Session types of the console, from the shared contract (`import type` only: no zod at runtime).
 * The role list itself comes from shared/access.ts, which has no imports.
 */
import { ROLES, type Role } from '../../../shared/access.js';

export type { Paged, Role, UserSummary } from '../../../shared/console/common.js';

/** The signed-in user as GET /console-api/auth/me returns it (res.locals.user on the server). */
export interface ConsoleUser {
  id: number;
  email: string;
  name: string | null;
  role: Role;
  accountIds: number[];
}

/** /auth/me and /auth/sign-in answer either `{ user }` or the user itself; accept both. */
export function unwrapUser(body: unknown): ConsoleUser | null {
  if (!body || typeof body !== 'object') return null;
  const candidate = 'user' in body ? (body as { user: unknown }).user : body;
  if (!candidate || typeof candidate !== 'object') return null;
  const u = candidate as Partial<ConsoleUser>;
  if (typeof u.id !== 'number' || typeof u.email !== 'string' || !ROLES.includes(u.role as Role)) return null;
  return {
    id: u.id,
    email: u.email,
    name: typeof u.name === 'string' ? u.name : null,
    role: u.role as Role,
    accountIds: Array.isArray(u.accountIds) ? u.accountIds.filter((n) => typeof n === 'number') : [],
  };
}
