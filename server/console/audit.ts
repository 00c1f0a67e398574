/**
 * The audit log: every admin (and billing) mutation and every security event (sign-in success
 * and failure, lock-out, refresh-token replay), with who, what, when and from where.
 *
 *   recordAudit(deps, req, res, { action: 'key.revoke', targetType: 'api-key', targetId: String(id) });
 *
 * The actor is res.locals.user unless `actor` is given (e.g. a failed sign-in names the e-mail
 * that was tried). Time comes from deps.clock, the address from req.ip (honours trust proxy).
 */
import { and, count, desc, eq, gte, lt, type SQL } from 'drizzle-orm';
import type { Request, Response } from 'express';
import { AuditPageSchema, AuditQuerySchema, type AuditEntry } from '../../shared/console/users.js';
import { auditLog } from '../db/schema.js';
import type { AppDeps } from '../http/app.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

export interface AuditInput {
  /** Dotted verb, e.g. "key.create", "account.update", "user.invite", "auth.sign-in". */
  action: string;
  targetType?: string;
  targetId?: string | number;
  detail?: Record<string, unknown>;
  /** Overrides res.locals.user as the actor. */
  actor?: { id: number | null; email: string };
}

export type AuditRow = typeof auditLog.$inferSelect;

export function recordAudit(deps: AppDeps, req: Request, res: Response, input: AuditInput): AuditRow {
  const user = res.locals.user;
  const actor =
    input.actor ?? (user ? { id: user.id, email: user.email } : { id: null, email: '(anonymous)' });
  return deps.db
    .insert(auditLog)
    .values({
      at: deps.clock(),
      actorUserId: actor.id,
      actorEmail: actor.email,
      action: input.action,
      targetType: input.targetType ?? null,
      targetId: input.targetId === undefined ? null : String(input.targetId),
      detail: input.detail ?? null,
      ip: req.ip ?? null,
    })
    .returning()
    .get();
}

export interface AuditFilter {
  action?: string;
  actorUserId?: number;
  from?: Date;
  to?: Date;
}

/** Newest first, paged (page is 1-based). */
export function listAudit(
  deps: AppDeps,
  filter: AuditFilter,
  page: number,
  pageSize: number,
): { items: AuditRow[]; total: number } {
  const conditions: SQL[] = [];
  if (filter.action) conditions.push(eq(auditLog.action, filter.action));
  if (filter.actorUserId !== undefined) conditions.push(eq(auditLog.actorUserId, filter.actorUserId));
  if (filter.from) conditions.push(gte(auditLog.at, filter.from));
  if (filter.to) conditions.push(lt(auditLog.at, filter.to));
  const where = conditions.length > 0 ? and(...conditions) : undefined;
  const total = deps.db.select({ n: count() }).from(auditLog).where(where).get()?.n ?? 0;
  const items = deps.db
    .select()
    .from(auditLog)
    .where(where)
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize)
    .all();
  return { items, total };
}

function auditEntry(row: AuditRow): AuditEntry {
  return {
    id: row.id,
    at: row.at.toISOString(),
    actorUserId: row.actorUserId,
    actorEmail: row.actorEmail,
    action: row.action,
    targetType: row.targetType,
    targetId: row.targetId,
    detail: row.detail ?? null,
    ip: row.ip,
  };
}

/** GET /audit (admins): newest first, filters action, actorUserId, from, to. */
export const auditRouteModule: ConsoleRouteModule = {
  register(router) {
    consoleRoute(router, {
      method: 'get',
      path: '/audit',
      roles: ['admin'],
      summary: 'The audit log: admin actions and security events, newest first',
      request: { query: AuditQuerySchema },
      response: AuditPageSchema,
      handler: ({ deps, query }) => {
        const { items, total } = listAudit(
          deps,
          {
            ...(query.action ? { action: query.action } : {}),
            ...(query.actorUserId !== undefined ? { actorUserId: query.actorUserId } : {}),
            ...(query.from ? { from: new Date(query.from) } : {}),
            ...(query.to ? { to: new Date(query.to) } : {}),
          },
          query.page,
          query.pageSize,
        );
        return { items: items.map(auditEntry), total, page: query.page, pageSize: query.pageSize };
      },
    });
  },
};
