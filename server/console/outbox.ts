/**
 * The dev-only outbox: messages received by the local mail capture server (captured_mail), so
 * invitations and reset links can be followed without a real mailbox. Admins only; answers 404
 * when CONSOLE_OUTBOX is off and always in production (NODE_ENV=production).
 */
import { count, desc, eq, sql } from 'drizzle-orm';
import { IdParamsSchema } from '../../shared/console/common.js';
import { OutboxDetailSchema, OutboxPageSchema, OutboxQuerySchema } from '../../shared/console/users.js';
import { consoleSettings } from '../config.js';
import type { AppDeps } from '../deps.js';
import { problem } from '../http/problem.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

function requireOutbox(deps: AppDeps): void {
  if (!consoleSettings(deps.config).outbox) {
    throw problem('not-found', 'The outbox is a development aid and is switched off here.');
  }
}

export const outboxRouteModule: ConsoleRouteModule = {
  register(router) {
    consoleRoute(router, {
      method: 'get',
      path: '/outbox',
      roles: ['admin'],
      summary: 'Mail received by the local capture server, newest first (development only)',
      request: { query: OutboxQuerySchema },
      response: OutboxPageSchema,
      handler: async ({ deps, query }) => {
        requireOutbox(deps);
        const { capturedMail } = deps.store.t;
        // The recipients are a JSON array (json on PostgreSQL, text on SQLite): searched as text,
        // ignoring ASCII case on both (SQLite's LIKE did; PostgreSQL's does not).
        const where = query.to
          ? sql`lower(cast(${capturedMail.to} as text)) like lower(${`%${query.to.replace(/[%_"]/g, '')}%`})`
          : undefined;
        const [counted] = await deps.store.db.select({ n: count() }).from(capturedMail).where(where);
        const total = counted?.n ?? 0;
        const rows = await deps.store.db
          .select({
            id: capturedMail.id,
            receivedAt: capturedMail.receivedAt,
            from: capturedMail.from,
            to: capturedMail.to,
            subject: capturedMail.subject,
          })
          .from(capturedMail)
          .where(where)
          .orderBy(desc(capturedMail.id))
          .limit(query.pageSize)
          .offset((query.page - 1) * query.pageSize);
        return {
          items: rows.map((r) => ({ ...r, receivedAt: r.receivedAt.toISOString() })),
          total,
          page: query.page,
          pageSize: query.pageSize,
        };
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/outbox/:id',
      roles: ['admin'],
      summary: 'One captured message with its text and HTML parts (development only)',
      request: { params: IdParamsSchema },
      response: OutboxDetailSchema,
      handler: async ({ deps, params }) => {
        requireOutbox(deps);
        const { capturedMail } = deps.store.t;
        const [row] = await deps.store.db
          .select()
          .from(capturedMail)
          .where(eq(capturedMail.id, params.id))
          .limit(1);
        if (!row) throw problem('not-found', `No captured message with id ${params.id}.`);
        return {
          id: row.id,
          receivedAt: row.receivedAt.toISOString(),
          from: row.from,
          to: row.to,
          subject: row.subject,
          text: row.text,
          html: row.html,
        };
      },
    });
  },
};
