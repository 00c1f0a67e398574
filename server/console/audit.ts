/**
 * The audit log in the console: GET /audit (admins), newest first, paged and filtered. Rows are
 * written by recordAudit (server/accounts/audit.ts).
 */
import { and, count, desc, eq, gte, lt, type SQL } from 'drizzle-orm';
import { AuditPageSchema, AuditQuerySchema, type AuditEntry } from '../../shared/console/users.js';
import type { AuditRow } from '../accounts/audit.js';
import type { AppDeps } from '../deps.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

export interface AuditFilter {
  action?: string;
  actorUserId?: number;
  from?: Date;
  to?: Date;
}

/** Newest first, paged (page is 1-based). */
export async function listAudit(
  deps: AppDeps,
  filter: AuditFilter,
  page: number,
  pageSize: number,
): Promise<{ items: AuditRow[]; total: number }> {
  const { auditLog } = deps.store.t;
  const conditions: SQL[] = [];
  if (filter.action) conditions.push(eq(auditLog.action, filter.action));
  if (filter.actorUserId !== undefined) conditions.push(eq(auditLog.actorUserId, filter.actorUserId));
  if (filter.from) conditions.push(gte(auditLog.at, filter.from));
  if (filter.to) conditions.push(lt(auditLog.at, filter.to));
  const where = conditions.length > 0 ? and(...conditions) : undefined;
  const [counted] = await deps.store.db.select({ n: count() }).from(auditLog).where(where);
  // count() is bigint on PostgreSQL: Number() either way.
  const total = Number(counted?.n ?? 0);
  const items = await deps.store.db
    .select()
    .from(auditLog)
    .where(where)
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize);
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
      handler: async ({ deps, query }) => {
        const { items, total } = await listAudit(
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
