/**
 * Console contracts: users and invitations (admin), the audit log, the dev-only outbox.
 */
import { z } from 'zod';
import { IsoDateTimeSchema, PageQuerySchema, pagedSchema, RoleSchema, UserSummarySchema } from './common.js';
import { EmailSchema } from './auth.js';

export const InvitationSummarySchema = z
  .object({
    id: z.int(),
    email: z.string(),
    role: RoleSchema,
    accountIds: z.array(z.int()),
    createdAt: IsoDateTimeSchema,
    expiresAt: IsoDateTimeSchema,
    /** Who sent it (e-mail), if still known. */
    invitedBy: z.string().nullable(),
  })
  .meta({ id: 'ConsoleInvitation' });
export type InvitationSummary = z.infer<typeof InvitationSummarySchema>;

export const UserListSchema = z
  .object({
    items: z.array(UserSummarySchema),
    /** Invitations not yet accepted and not expired. */
    invitations: z.array(InvitationSummarySchema),
  })
  .meta({ id: 'ConsoleUserList' });
export type UserList = z.infer<typeof UserListSchema>;

export const InvitationCreateSchema = z.object({
  email: EmailSchema,
  role: RoleSchema,
  accountIds: z.array(z.int().positive()).max(100).default([]),
});
export type InvitationCreate = z.input<typeof InvitationCreateSchema>;

export const InvitationCreatedSchema = z.object({
  invitation: InvitationSummarySchema,
  /** Whether the invitation e-mail was handed to the mail server. */
  mailStatus: z.enum(['sent', 'failed']),
});
export type InvitationCreated = z.infer<typeof InvitationCreatedSchema>;

export const UserPatchSchema = z
  .object({
    role: RoleSchema.optional(),
    active: z.boolean().optional(),
    accountIds: z.array(z.int().positive()).max(100).optional(),
  })
  .strict();
export type UserPatch = z.infer<typeof UserPatchSchema>;

export const AuditEntrySchema = z
  .object({
    id: z.int(),
    at: IsoDateTimeSchema,
    actorUserId: z.int().nullable(),
    actorEmail: z.string(),
    action: z.string(),
    targetType: z.string().nullable(),
    targetId: z.string().nullable(),
    detail: z.record(z.string(), z.unknown()).nullable(),
    ip: z.string().nullable(),
  })
  .meta({ id: 'ConsoleAuditEntry' });
export type AuditEntry = z.infer<typeof AuditEntrySchema>;

export const AuditQuerySchema = PageQuerySchema.extend({
  action: z.string().max(100).optional(),
  actorUserId: z.coerce.number().int().positive().optional(),
  from: z.iso.datetime().optional(),
  to: z.iso.datetime().optional(),
});
export type AuditQuery = z.input<typeof AuditQuerySchema>;

export const AuditPageSchema = pagedSchema(AuditEntrySchema).meta({ id: 'ConsoleAuditPage' });
export type AuditPage = z.infer<typeof AuditPageSchema>;

export const OutboxItemSchema = z
  .object({
    id: z.int(),
    receivedAt: IsoDateTimeSchema,
    from: z.string(),
    to: z.array(z.string()),
    subject: z.string(),
  })
  .meta({ id: 'ConsoleOutboxItem' });
export type OutboxItem = z.infer<typeof OutboxItemSchema>;

export const OutboxDetailSchema = OutboxItemSchema.extend({
  text: z.string().nullable(),
  html: z.string().nullable(),
}).meta({ id: 'ConsoleOutboxMessage' });
export type OutboxDetail = z.infer<typeof OutboxDetailSchema>;

export const OutboxQuerySchema = PageQuerySchema.extend({
  to: z.string().max(254).optional(),
});
export const OutboxPageSchema = pagedSchema(OutboxItemSchema).meta({ id: 'ConsoleOutboxPage' });
export type OutboxPage = z.infer<typeof OutboxPageSchema>;
