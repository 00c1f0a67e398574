/**
 * Console users (admin only): list users and pending invitations, invite a user by e-mail (a
 * single-use link valid 72 h), change a user's role, deactivate or reactivate (deactivation
 * revokes every session at once), and set account memberships (the scope of a developer).
 * At least one active admin always remains (409 otherwise). The work is the users service's
 * (server/accounts/users.ts); these routes parse, call it, audit and answer.
 */
import { IdParamsSchema, UserSummarySchema } from '../../shared/console/common.js';
import {
  InvitationCreatedSchema,
  InvitationCreateSchema,
  InvitationSummarySchema,
  UserListSchema,
  UserPatchSchema,
} from '../../shared/console/users.js';
import { recordAudit } from '../accounts/audit.js';
import { inviteUser, listUsers, updateUser, withdrawInvitation } from '../accounts/users.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

export const usersRouteModule: ConsoleRouteModule = {
  register(router) {
    consoleRoute(router, {
      method: 'get',
      path: '/users',
      roles: ['admin'],
      summary: 'Console users and pending invitations',
      response: UserListSchema,
      handler: ({ deps }) => listUsers(deps),
    });

    consoleRoute(router, {
      method: 'post',
      path: '/users/invitations',
      roles: ['admin'],
      summary: 'Invite a user by e-mail (single-use link, valid 72 hours)',
      request: { body: InvitationCreateSchema },
      response: InvitationCreatedSchema,
      status: 201,
      handler: async ({ deps, req, res, body, user }) => {
        const { email, invitation, mailStatus } = await inviteUser(deps, {
          email: body.email,
          role: body.role,
          accountIds: body.accountIds,
          invitedBy: { id: user.id, email: user.email },
        });
        await recordAudit(deps, req, res, {
          action: 'user.invite',
          targetType: 'invitation',
          targetId: invitation.id,
          detail: { email, role: body.role, accountIds: body.accountIds, mailStatus },
        });
        return { invitation, mailStatus };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/users/invitations/:id/withdraw',
      roles: ['admin'],
      summary: 'Withdraw a pending invitation: its link stops working at once',
      request: { params: IdParamsSchema },
      response: InvitationSummarySchema,
      handler: async ({ deps, req, res, params }) => {
        const { invitation, token } = await withdrawInvitation(deps, params.id);
        await recordAudit(deps, req, res, {
          action: 'user.invitation.withdraw',
          targetType: 'invitation',
          targetId: token.id,
          detail: { email: token.email, role: token.role },
        });
        return invitation;
      },
    });

    consoleRoute(router, {
      method: 'patch',
      path: '/users/:id',
      roles: ['admin'],
      summary: "Change a user's role, activity or account memberships",
      description:
        'Deactivating a user revokes all of their console sessions at once. At least one active admin remains.',
      request: { params: IdParamsSchema, body: UserPatchSchema },
      response: UserSummarySchema,
      handler: async ({ deps, req, res, params, body }) => {
        const { before, after, deactivated, sessionsRevoked } = await updateUser(deps, params.id, body);
        await recordAudit(deps, req, res, {
          action: deactivated ? 'user.deactivate' : 'user.update',
          targetType: 'user',
          targetId: after.id,
          detail: {
            email: before.email,
            before: { role: before.role, active: before.active, accountIds: before.accountIds },
            after: { role: after.role, active: after.active, accountIds: after.accountIds },
            sessionsRevoked,
          },
        });
        return after;
      },
    });
  },
};
