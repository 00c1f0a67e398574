/**
 * Console contracts: sign-in, session, CSRF, password reset, invitations (shared by server and
 * console; zod only).
 */
import { z } from 'zod';
import { IsoDateTimeSchema, RoleSchema, UserSummarySchema } from './common.js';

export const PASSWORD_MIN_LENGTH = 12;
export const PASSWORD_MAX_LENGTH = 200;

/**
 * A new password: 12 to 200 characters, any characters (length over composition rules, per
 * NIST SP 800-63B §5.1.1.2, which asks for at least 8 and allowing at least 64; 12 is our choice).
 */
export const NewPasswordSchema = z
  .string()
  .min(PASSWORD_MIN_LENGTH, { error: `must be at least ${PASSWORD_MIN_LENGTH} characters` })
  .max(PASSWORD_MAX_LENGTH, { error: `must be at most ${PASSWORD_MAX_LENGTH} characters` });

export const EmailSchema = z.email({ error: 'must be an e-mail address' }).max(254);

export const CsrfResponseSchema = z.object({ csrfToken: z.string() }).meta({ id: 'ConsoleCsrf' });
export type CsrfResponse = z.infer<typeof CsrfResponseSchema>;

export const SignInRequestSchema = z
  .object({
    email: z.string().min(1).max(254),
    password: z.string().min(1).max(PASSWORD_MAX_LENGTH),
  })
  .meta({ id: 'ConsoleSignIn' });
export type SignInRequest = z.infer<typeof SignInRequestSchema>;

/** Answer of sign-in, refresh, invitation accept and GET /auth/me. */
export const SessionResponseSchema = z
  .object({
    user: UserSummarySchema,
    /** When the access cookie expires: refresh before (POST /auth/refresh). */
    accessExpiresAt: IsoDateTimeSchema.nullable(),
    /** When the session ends: sign in again after. */
    sessionExpiresAt: IsoDateTimeSchema.nullable(),
  })
  .meta({ id: 'ConsoleSession' });
export type SessionResponse = z.infer<typeof SessionResponseSchema>;

export const PasswordResetRequestSchema = z.object({ email: z.string().min(1).max(254) });
export type PasswordResetRequest = z.infer<typeof PasswordResetRequestSchema>;

export const AcceptedSchema = z.object({
  accepted: z.literal(true),
  detail: z.string(),
});
export type Accepted = z.infer<typeof AcceptedSchema>;

export const PasswordResetConfirmSchema = z.object({
  token: z.string().min(1).max(200),
  password: NewPasswordSchema,
});
export type PasswordResetConfirm = z.infer<typeof PasswordResetConfirmSchema>;

export const InvitationTokenParamsSchema = z.object({ token: z.string().min(1).max(200) });

/** What an invitation link shows before it is accepted. */
export const InvitationInfoSchema = z
  .object({
    email: z.string(),
    role: RoleSchema,
    expiresAt: IsoDateTimeSchema,
  })
  .meta({ id: 'ConsoleInvitationInfo' });
export type InvitationInfo = z.infer<typeof InvitationInfoSchema>;

export const InvitationAcceptSchema = z.object({
  token: z.string().min(1).max(200),
  name: z.string().trim().min(1).max(120),
  password: NewPasswordSchema,
});
export type InvitationAccept = z.infer<typeof InvitationAcceptSchema>;
