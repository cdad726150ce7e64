import { z } from 'zod';
import {
  createLoanRequest,
  errorBody,
  loanPage,
  loanParams,
  loanQuery,
  loanResponse,
  reasonRequest,
  unitUnavailableDetails,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { requestLoan } from '../domain/booking';
import type { LoanDeps } from '../domain/deps';
import { assertLoanVisible, getLoan, listLoans } from '../domain/queries';
import { transitionLoan } from '../domain/transitions';

const error = (description: string) => ({ description, schema: errorBody });
const unavailable = z
  .object({
    error: z.object({
      code: z.literal('unit_unavailable'),
      message: z.string(),
      details: unitUnavailableDetails,
    }),
  })
  .meta({ id: 'UnitUnavailableError' });
const approveBody = z
  .object({ reason: z.string().trim().max(1000).optional() })
  .meta({ id: 'ApproveRequest' });

/** `/api/loans`: request, list, read, approve, decline, cancel. */
export function loanRoutes(deps: LoanDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/loans', 'Loans', catalogue);

  api.route(
    {
      method: 'post',
      path: '/',
      summary: 'Request a loan of 1–20 units of one lender (all or nothing)',
      description:
        'The units are locked, their footprints computed with the lender’s settings and the ' +
        'campus, and checked against every hold and the depots’ cut-offs; then the loan, one ' +
        'hold per unit and the first event are written in one transaction. If any unit does not ' +
        'fit nothing is written and the answer is 409 `unit_unavailable` with the conflicts ' +
        '(reason, earliest fitting first case day) and alternatives (other units of the same ' +
        'model, then of compatible models). Dates and the deposit are estimates until the ' +
        'lender confirms.',
      access: { roles: ['buyer'] },
      body: createLoanRequest,
      responses: {
        201: { description: 'Requested.', schema: loanResponse },
        403: error('Not a buyer of the campus’s hospital.'),
        409: { description: 'A unit does not fit; nothing written.', schema: unavailable },
        422: error(
          'Bad input (`validation_failed`, `invalid_site`, `invalid_window`, `unknown_units`, `several_lenders`).',
        ),
      },
    },
    async ({ req, res, body }) => {
      res.status(201).json({ loan: await requestLoan(deps, currentAuth(req), body) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Loans you may see, one page (newest first unless `sort` says otherwise)',
      description:
        'Hospital buyers and clinicians: their hospital’s loans; fleet managers and ' +
        'coordinators: their lender’s; the admin: all. Filter by `state` (the approval queue ' +
        'is `state=requested`; several states separated by commas) and `q` (reference, hospital, ' +
        'campus, model or serial number); page with `page`, `size` and `sort=field,dir`. ' +
        'A unit’s calendar is `GET /api/units/:id/holds`.',
      access: { authenticated: true },
      query: loanQuery,
      responses: { 200: { description: 'One page of loans.', schema: loanPage } },
    },
    async ({ req, res, query }) => {
      res.json(await listLoans(deps, currentAuth(req), query));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id',
      summary: 'One loan with its events',
      description: 'A loan of an organisation you do not work for answers 404.',
      access: { authenticated: true },
      params: loanParams,
      responses: {
        200: { description: 'The loan.', schema: loanResponse },
        404: error('No such loan (or not yours).'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ loan: await getLoan(deps.dataSource.manager, currentAuth(req), params.id) });
    },
  );

  const transitionResponses = {
    200: { description: 'Done.', schema: loanResponse },
    403: error('The action belongs to the other side or another role.'),
    404: error('No such loan (or not yours).'),
    409: error('`illegal_transition`: the message names the loan’s current state.'),
  };

  api.route(
    {
      method: 'post',
      path: '/:id/approve',
      summary: 'Approve a requested loan (fleet manager of the lender)',
      access: { roles: ['fleet_manager'] },
      params: loanParams,
      scope: (req, params) =>
        assertLoanVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: approveBody,
      responses: transitionResponses,
    },
    async ({ req, res, params, body }) => {
      const loan = await transitionLoan(
        deps,
        currentAuth(req),
        params.id,
        'approve',
        body.reason ?? null,
      );
      res.json({ loan });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/decline',
      summary: 'Decline a requested loan (fleet manager of the lender); releases its holds',
      access: { roles: ['fleet_manager'] },
      params: loanParams,
      scope: (req, params) =>
        assertLoanVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: reasonRequest,
      responses: { ...transitionResponses, 422: error('A reason is required.') },
    },
    async ({ req, res, params, body }) => {
      const loan = await transitionLoan(deps, currentAuth(req), params.id, 'decline', body.reason);
      res.json({ loan });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/cancel',
      summary: 'Cancel a requested or approved loan (buyer of the hospital); releases its holds',
      access: { roles: ['buyer'] },
      params: loanParams,
      scope: (req, params) =>
        assertLoanVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: reasonRequest,
      responses: { ...transitionResponses, 422: error('A reason is required.') },
    },
    async ({ req, res, params, body }) => {
      const loan = await transitionLoan(deps, currentAuth(req), params.id, 'cancel', body.reason);
      res.json({ loan });
    },
  );
  return api;
}
