import {
  changeRoleRequest,
  errorBody,
  inviteRequest,
  memberPage,
  memberQuery,
  memberManagingRoles,
  memberResponse,
  membershipParams,
  organisationParams,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import type { IdentityDeps } from '../domain/deps';
import {
  changeMemberRole,
  inviteMember,
  listOrganisationMembers,
  resendInvitation,
  setMemberActive,
} from '../domain/members';
import { requestContext } from './auth-routes';

const error = (description: string) => ({ description, schema: errorBody });
/** Managing members of the organisation in the path, or the platform admin. */
const managers = { roles: memberManagingRoles, org: 'param:orgId' } as const;

/** `/api/organisations/:orgId/...`: members and invitations of one organisation. */
export function memberRoutes(deps: IdentityDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/organisations', 'Members', catalogue);

  api.route(
    {
      method: 'get',
      path: '/:orgId/members',
      summary: 'Members of an organisation, one page',
      description:
        '`q` matches name, e-mail, or the words of a role or a status; one page (`page`, ' +
        '`size`, `sort=field,dir`), by name unless `sort` says otherwise.',
      access: managers,
      params: organisationParams,
      query: memberQuery,
      responses: {
        200: { description: 'One page of members.', schema: memberPage },
        403: error('Not a manager here.'),
      },
    },
    async ({ res, params, query }) => {
      res.json(await listOrganisationMembers(deps, params.orgId, query));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:orgId/invitations',
      summary: 'Invite someone by e-mail',
      description: 'New people get a one-time link (7 days) to choose a password.',
      access: managers,
      params: organisationParams,
      body: inviteRequest,
      responses: {
        201: { description: 'Invited.', schema: memberResponse },
        403: error('`role_not_allowed`: you cannot hand out that role.'),
        409: error('`already_member` or `account_deactivated`.'),
        422: error('The body is not valid.'),
      },
    },
    async ({ req, res, params, body }) => {
      const member = await inviteMember(
        deps,
        currentAuth(req),
        params.orgId,
        body,
        requestContext(req),
      );
      res.status(201).json({ member });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/:orgId/members/:membershipId',
      summary: 'Change a member’s role',
      access: managers,
      params: membershipParams,
      body: changeRoleRequest,
      responses: {
        200: { description: 'Changed.', schema: memberResponse },
        409: error('`last_manager` or `already_member`.'),
      },
    },
    async ({ req, res, params, body }) => {
      const member = await changeMemberRole(
        deps,
        currentAuth(req),
        params.orgId,
        params.membershipId,
        body.role,
        requestContext(req),
      );
      res.json({ member });
    },
  );

  for (const [action, active] of [
    ['deactivate', false],
    ['reactivate', true],
  ] as const) {
    api.route(
      {
        method: 'post',
        path: `/:orgId/members/:membershipId/${action}`,
        summary: active
          ? 'Let a deactivated member sign in again'
          : 'Deactivate a member (ends their sessions)',
        access: managers,
        params: membershipParams,
        responses: {
          200: { description: 'Done.', schema: memberResponse },
          409: error(
            '`cannot_deactivate_self`, `last_manager` or `member_of_other_organisations`.',
          ),
        },
      },
      async ({ req, res, params }) => {
        const member = await setMemberActive(
          deps,
          currentAuth(req),
          params.orgId,
          params.membershipId,
          active,
          requestContext(req),
        );
        res.json({ member });
      },
    );
  }

  api.route(
    {
      method: 'post',
      path: '/:orgId/members/:membershipId/resend-invitation',
      summary: 'Send a fresh invitation link to someone who has not accepted yet',
      access: managers,
      params: membershipParams,
      responses: {
        200: { description: 'Sent.', schema: memberResponse },
        409: error('`not_pending`: already accepted.'),
      },
    },
    async ({ req, res, params }) => {
      const member = await resendInvitation(
        deps,
        currentAuth(req),
        params.orgId,
        params.membershipId,
        requestContext(req),
      );
      res.json({ member });
    },
  );

  return api;
}
