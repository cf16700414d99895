import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access, OWNER_ROLES, READ_ROLES } from '../../common/access';
import { errors } from '../../common/errors';
import type { AppContext } from '../../context';
import type { MembersService } from './members.service';
import type { AuthService } from '../auth/auth.service';
import { setSession } from '../../common/session-cookie';
import { mailLinkBase } from '../../common/network';
import { AcceptBody, AcceptNewBody, Invitation, InvitationInfo, InviteBody, People } from '../../../shared/schemas/member';
import { SessionAnswer } from '../../../shared/schemas/user';

const WorkshopParams = z.object({ workshopId: z.string().min(1).max(64) });

/** Members of a workshop and invitations by e-mail. */
export function membersRoutes(routes: ApiRoutes, app: AppContext, members: MembersService, auth: AuthService): void {
  const tag = 'people';

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/people',
    summary: 'The owner, co-facilitators, observers and open invitations of a workshop',
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    response: People,
    handler: ({ params }) => members.people(params.workshopId),
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/invitations',
    summary: 'Invite a co-facilitator or an observer by e-mail',
    tag,
    access: access.workshop(OWNER_ROLES),
    params: WorkshopParams,
    body: InviteBody,
    response: Invitation,
    status: 201,
    handler: ({ params, body, caller }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      return members.invite(params.workshopId, caller.user, body, mailLinkBase(app.config));
    },
  });

  routes.add({
    method: 'delete',
    path: '/workshops/:workshopId/invitations/:invitationId',
    summary: 'Withdraw an open invitation',
    tag,
    access: access.workshop(OWNER_ROLES),
    params: WorkshopParams.extend({ invitationId: z.string().min(1).max(64) }),
    handler: async ({ params }) => {
      await members.revoke(params.workshopId, params.invitationId);
      return undefined;
    },
  });

  routes.add({
    method: 'delete',
    path: '/workshops/:workshopId/members/:membershipId',
    summary: "Take away a co-facilitator's or observer's role",
    tag,
    access: access.workshop(OWNER_ROLES),
    params: WorkshopParams.extend({ membershipId: z.string().min(1).max(64) }),
    handler: async ({ params }) => {
      await members.removeMember(params.workshopId, params.membershipId);
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/invitations/:token',
    summary: 'What an invitation link is for (workshop, role, whether the account exists)',
    tag,
    access: access.public,
    params: z.object({ token: z.string().min(10).max(200) }),
    response: InvitationInfo,
    handler: ({ params }) => members.info(params.token),
  });

  routes.add({
    method: 'post',
    path: '/invitations/accept',
    summary: 'Accept an invitation with the signed-in account',
    tag,
    access: access.signedIn,
    body: AcceptBody,
    response: z.object({ workshopId: z.string() }),
    handler: async ({ body, caller }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      return { workshopId: await members.accept(body.token, caller.user) };
    },
  });

  routes.add({
    method: 'post',
    path: '/invitations/accept-new',
    summary: 'Accept an invitation by creating an account for the invited e-mail',
    tag,
    access: access.public,
    body: AcceptNewBody,
    response: SessionAnswer.extend({ workshopId: z.string() }),
    status: 201,
    handler: async ({ body, req, res }) => {
      const email = await members.emailOf(body.token);
      // The account has the invitation's role on its workshop and nothing more: an admin may make it a facilitator.
      const user = await auth.createUser({ email, name: body.name, password: body.password, role: 'member' });
      const workshopId = await members.accept(body.token, user);
      return { ...setSession(req, res, auth, user), workshopId };
    },
  });
}
