/**
 * Building blocks shared by every console contract (shared by server and console: zod only, no
 * server imports): roles, the signed-in user, paging, timestamps and the problem-details shape.
 *
 * Conventions of the console API (`/console-api`): JSON, camelCase, times as ISO 8601 strings in
 * UTC, lists paged server-side as `{ items, total, page, pageSize }`, every error an RFC 9457
 * problem (`application/problem+json`).
 */
import { z } from 'zod';
import { ROLES } from '../access.js';

/** Console roles (the list itself is shared/access.ts ROLES). */
export const RoleSchema = z.enum(ROLES).meta({
  id: 'ConsoleRole',
  description:
    'admin: everything; billing: statements and invoices, read-only elsewhere; developer: keys, usage and request log of the accounts the user is a member of',
});
export type Role = z.infer<typeof RoleSchema>;

/** An instant as an ISO 8601 string in UTC, e.g. "2031-03-14T10:00:00.000Z". */
export const IsoDateTimeSchema = z.iso.datetime().meta({ example: '2031-03-14T10:00:00.000Z' });

/** A database id in a path (`/users/:id`): a positive integer given as digits. */
export const IdParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});
export type IdParams = z.infer<typeof IdParamsSchema>;

export const DEFAULT_PAGE_SIZE = 25;
export const MAX_PAGE_SIZE = 200;

/** `?page=1&pageSize=25` (page is 1-based). */
export const PageQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(MAX_PAGE_SIZE).default(DEFAULT_PAGE_SIZE),
});
export type PageQuery = z.infer<typeof PageQuerySchema>;

/** A page of a server-side paged list. */
export function pagedSchema<T extends z.ZodType>(item: T) {
  return z.object({
    items: z.array(item),
    total: z.int().min(0).meta({ description: 'Number of items matching the filters, all pages' }),
    page: z.int().min(1),
    pageSize: z.int().min(1),
  });
}
export interface Paged<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

/** The user behind a console session (GET /auth/me, lists, audit). */
export const UserSummarySchema = z
  .object({
    id: z.int(),
    email: z.string(),
    name: z.string().nullable(),
    role: RoleSchema,
    active: z.boolean(),
    /** Accounts the user is a member of (developers see only these). */
    accountIds: z.array(z.int()),
    createdAt: IsoDateTimeSchema,
    /** Set while sign-in is refused after repeated failures. */
    lockedUntil: IsoDateTimeSchema.nullable(),
  })
  .meta({ id: 'ConsoleUser' });
export type UserSummary = z.infer<typeof UserSummarySchema>;

export const ProblemFieldErrorSchema = z.object({
  field: z.string(),
  message: z.string(),
  value: z.unknown().optional(),
});

/** RFC 9457 problem details as the console API sends them. */
export const ConsoleProblemSchema = z
  .object({
    type: z.string().meta({ example: '/problems/validation-failed' }),
    title: z.string(),
    status: z.int(),
    detail: z.string().optional(),
    instance: z.string().optional(),
    requestId: z.string().optional(),
    errors: z.array(ProblemFieldErrorSchema).optional(),
  })
  .meta({ id: 'ConsoleProblem', description: 'RFC 9457 problem details (application/problem+json)' });
export type ConsoleProblem = z.infer<typeof ConsoleProblemSchema>;

/** A body for calls that answer with nothing but success. */
export const OkSchema = z.object({ ok: z.literal(true) });
export type Ok = z.infer<typeof OkSchema>;

/** Cookie and header names of the console session and CSRF protection. */
export const CSRF_COOKIE = 'ebullio_csrf';
export const CSRF_HEADER = 'X-CSRF-Token';
export const ACCESS_COOKIE = 'ebullio_access';
export const REFRESH_COOKIE = 'ebullio_refresh';
