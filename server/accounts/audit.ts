/**
 * Recording the audit log: every admin (and billing) mutation and every security event (sign-in
 * success and failure, lock-out, refresh-token replay, payment webhooks), with who, what, when and
 * from where. The console lists it (server/console/audit.ts).
 *
 *   await recordAudit(deps, req, res, { action: 'key.revoke', targetType: 'api-key', targetId: String(id) });
 *
 * The actor is res.locals.user unless `actor` is given (e.g. a failed sign-in names the e-mail
 * that was tried). Time comes from deps.clock, the address from req.ip (honours trust proxy).
 */
import type { auditLog } from '../db/schema.js';
import type { Store } from '../db/store.js';
import type { AppDeps } from '../deps.js';

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

/** What the audit reads of a request: its client address (an Express request fits). */
export interface AuditRequest {
  ip?: string | undefined;
}

/** What the audit reads of a response: the signed-in user, if any (an Express response fits). */
export interface AuditResponse {
  locals: { user?: { id: number; email: string } | undefined };
}

export async function recordAudit(
  deps: AppDeps,
  req: AuditRequest,
  res: AuditResponse,
  input: AuditInput,
  /** The transaction to write in, when the audited change is in one (default: `deps.store`). */
  store: Store = deps.store,
): Promise<AuditRow> {
  const { auditLog } = store.t;
  const user = res.locals.user;
  const actor =
    input.actor ?? (user ? { id: user.id, email: user.email } : { id: null, email: '(anonymous)' });
  const [row] = await store.db
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
    .returning();
  return row!;
}
