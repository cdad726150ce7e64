import { z } from 'zod';
import {
  candidateList,
  candidatesQuery,
  caseRecordInput,
  createVisitRequest,
  declineOfferRequest,
  errorBody,
  id,
  reasonRequest,
  signOffInput,
  trainingRecord,
  visitList,
  visitParams,
  visitQuery,
  visitResponse,
  withdrawVisitRequest,
  lenderVisitSettings,
  modelMinimumRequest,
  hospitalVisitSettings,
  signOffThresholdRequest,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { candidatesJson } from '../domain/candidates';
import type { VisitDeps } from '../domain/deps';
import {
  acceptOffer,
  cancelVisit,
  declineOffer,
  reopenVisit,
  requestVisit,
  withdrawFromVisit,
} from '../domain/offers';
import { assertVisitVisible, getVisit, listVisits } from '../domain/queries';
import { trainingRecordOf } from '../domain/training';
import {
  checkHospitalManager,
  checkModelManager,
  hospitalSettings,
  lenderSettings,
  setHospitalSignOffThreshold,
  setModelMinimumSupervisedCases,
} from '../domain/settings';
import { completeVisit, readSignOffPdf, recordCase, signOffTrainee } from '../domain/records';

const error = (description: string) => ({ description, schema: errorBody });
const reopenBody = z
  .object({ proctorIds: z.array(id).min(1).max(20).optional() })
  .meta({ id: 'ReopenVisitRequest' });

/** `/api/visits`: candidates, requests, offers, answers, cases and sign-offs. */
export function visitRoutes(deps: VisitDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/visits', 'Visits', catalogue);

  api.route(
    {
      method: 'get',
      path: '/candidates',
      summary: 'Every proctor for a visit: eligible ones ranked with reasons, others with why not',
      description:
        'Hard constraints: a licence for the campus’s jurisdiction valid on every day including ' +
        'travel days, available on every visit day, no overlap with accepted visits (with their ' +
        'travel days), within the travel radius, speaks the language, and at least the lender’s ' +
        'minimum supervised cases on the model. Fee estimate = day rate × visit days + travel-day ' +
        'rate × travel days. Evalon records credentials; privileging is the hospital’s decision.',
      access: { roles: ['buyer', 'clinician', 'admin'] },
      query: candidatesQuery,
      responses: {
        200: { description: 'Candidates, best first.', schema: candidateList },
        403: error('Not a buyer or clinician of the campus’s hospital.'),
        404: error('No such campus or model.'),
      },
    },
    async ({ req, res, query }) => {
      // Served from the ranking's cached JSON (see candidates.ts); never cached by the browser.
      const body = await candidatesJson(deps, currentAuth(req), query);
      res.setHeader('Cache-Control', 'no-store');
      res.type('application/json').end(body);
    },
  );

  const settingsErrors = {
    403: error('You do not manage this organisation.'),
    404: error('No such lender, hospital or model.'),
  };

  api.route(
    {
      method: 'get',
      path: '/settings/lenders/:lenderId',
      summary: 'A lender’s models with the minimum supervised cases a proctor needs on each',
      access: { roles: ['fleet_manager', 'admin'] },
      params: z.object({ lenderId: id }),
      responses: {
        200: { description: 'The settings.', schema: lenderVisitSettings },
        ...settingsErrors,
      },
    },
    async ({ req, res, params }) => {
      res.json(await lenderSettings(deps, currentAuth(req), params.lenderId));
    },
  );

  api.route(
    {
      method: 'put',
      path: '/settings/models/:modelId',
      summary: 'Set a model’s minimum supervised cases (0–500; null: the lender’s default)',
      description: 'Used by matching for every new candidate list and offer. Audited.',
      access: { roles: ['fleet_manager', 'admin'] },
      params: z.object({ modelId: id }),
      scope: (req, params) => checkModelManager(deps, currentAuth(req), params.modelId),
      body: modelMinimumRequest,
      responses: {
        200: {
          description: 'The lender’s settings after the change.',
          schema: lenderVisitSettings,
        },
        ...settingsErrors,
        422: error('Not a whole number from 0 to 500.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json(
        await setModelMinimumSupervisedCases(
          deps,
          currentAuth(req),
          params.modelId,
          body.minSupervisedCases,
        ),
      );
    },
  );

  api.route(
    {
      method: 'get',
      path: '/settings/hospitals/:hospitalId',
      summary: 'A hospital’s sign-off threshold',
      access: { roles: ['buyer', 'admin'] },
      params: z.object({ hospitalId: id }),
      responses: {
        200: { description: 'The settings.', schema: hospitalVisitSettings },
        ...settingsErrors,
      },
    },
    async ({ req, res, params }) => {
      res.json(await hospitalSettings(deps, currentAuth(req), params.hospitalId));
    },
  );

  api.route(
    {
      method: 'put',
      path: '/settings/hospitals/:hospitalId',
      summary: 'Set the hospital’s sign-off threshold (1–10 cases performed under supervision)',
      description:
        'Used for every later sign-off; sign-offs already given keep theirs. Audited. The range ' +
        'follows a published survey of 42 hospital policies (1–10 proctored cases, mean 3.24).',
      access: { roles: ['buyer', 'admin'] },
      params: z.object({ hospitalId: id }),
      scope: (req, params) => checkHospitalManager(deps, currentAuth(req), params.hospitalId),
      body: signOffThresholdRequest,
      responses: {
        200: { description: 'The settings after the change.', schema: hospitalVisitSettings },
        ...settingsErrors,
        422: error('Not a whole number from 1 to 10.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json(
        await setHospitalSignOffThreshold(
          deps,
          currentAuth(req),
          params.hospitalId,
          body.signOffThreshold,
        ),
      );
    },
  );

  api.route(
    {
      method: 'get',
      path: '/training-record',
      summary: 'Your own training record as a trainee (clinicians)',
      description:
        'Visits on which you were a trainee with your cases (role, ratings) and sign-offs, and ' +
        'per hospital and model your cases performed under supervision against the hospital’s ' +
        'sign-off threshold. Only your own record. Evalon documents; privileging remains the ' +
        'hospital’s decision.',
      access: { roles: ['clinician'] },
      responses: {
        200: {
          description: 'Your record (empty lists when you have no cases yet).',
          schema: trainingRecord,
        },
        403: error('Not a clinician.'),
      },
    },
    async ({ req, res }) => {
      res.json(await trainingRecordOf(deps.dataSource.manager, currentAuth(req)));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/',
      summary: 'Ask for a proctoring visit; the first candidate is offered at once',
      description:
        '`proctorIds` in the order to ask them (each must be eligible now), or none to let Evalon ' +
        'line up the top-ranked eligible proctors. One proctor holds the offer at a time, with a ' +
        'deadline (default 48 h); a decline or a lapsed deadline moves it to the next.',
      access: { roles: ['buyer', 'clinician'] },
      body: createVisitRequest,
      responses: {
        201: { description: 'Requested and offered.', schema: visitResponse },
        403: error('Not a buyer or clinician of the campus’s hospital.'),
        409: error('`no_eligible_proctor`.'),
        422: error(
          '`validation_failed`, `invalid_site`, `unknown_model`, `unknown_loan`, `loan_not_confirmed`, `invalid_window`, `unknown_proctor`, `proctor_not_eligible`.',
        ),
      },
    },
    async ({ req, res, body }) => {
      res.status(201).json({ visit: await requestVisit(deps, currentAuth(req), body) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Visits you may see, newest first',
      description:
        'Buyers and clinicians: their hospital’s; proctors: the ones offered to them (`role` ' +
        'narrows it to one side when you hold both).',
      access: { authenticated: true },
      query: visitQuery,
      responses: { 200: { description: 'Visits.', schema: visitList } },
    },
    async ({ req, res, query }) => {
      res.json({ items: await listVisits(deps.dataSource.manager, currentAuth(req), query) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id',
      summary: 'One visit with its offers, events, cases and sign-offs',
      access: { authenticated: true },
      params: visitParams,
      responses: {
        200: { description: 'The visit.', schema: visitResponse },
        404: error('No such visit (or not yours).'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ visit: await getVisit(deps.dataSource.manager, currentAuth(req), params.id) });
    },
  );

  const answers = {
    200: { description: 'Done.', schema: visitResponse },
    403: error('`not_offered`: the offer is not yours.'),
    404: error('No such visit (or not yours).'),
    409: error(
      '`offer_closed`, `offer_expired`, `illegal_transition`, `no_longer_eligible` (with the reasons).',
    ),
  };

  api.route(
    {
      method: 'post',
      path: '/:id/accept',
      summary: 'Accept the visit offered to you (every hard constraint is checked again)',
      access: { roles: ['proctor'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      responses: answers,
    },
    async ({ req, res, params }) => {
      res.json({ visit: await acceptOffer(deps, currentAuth(req), params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/decline',
      summary: 'Decline the visit offered to you, with a reason; the next candidate is offered',
      access: { roles: ['proctor'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: declineOfferRequest,
      responses: { ...answers, 422: error('A reason is required.') },
    },
    async ({ req, res, params, body }) => {
      res.json({ visit: await declineOffer(deps, currentAuth(req), params.id, body.reason) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/withdraw',
      summary: 'Withdraw from a visit you accepted, before its first day, with a reason',
      description:
        'Your offer ends as withdrawn and a calendar CANCEL (RFC 5546) goes to you; the ' +
        'hospital is told and the next candidate on its list is offered, as after a decline. ' +
        'From the first visit day (campus time zone) on it is refused with 409 `visit_started`.',
      access: { roles: ['proctor'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: withdrawVisitRequest,
      responses: {
        200: {
          description: 'Withdrawn; the visit is offered again (or unfilled).',
          schema: visitResponse,
        },
        403: error('Not the visit’s proctor.'),
        404: error('No such visit (or not yours).'),
        409: error('`visit_started`, `illegal_transition`.'),
        422: error('A reason of at least 10 characters is required.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ visit: await withdrawFromVisit(deps, currentAuth(req), params.id, body.reason) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/cancel',
      summary: 'Cancel a visit (hospital); an accepted proctor gets a calendar cancellation',
      access: { roles: ['buyer', 'clinician'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: reasonRequest,
      responses: {
        200: { description: 'Cancelled.', schema: visitResponse },
        403: error('Not the hospital’s.'),
        404: error('No such visit (or not yours).'),
        409: error('`illegal_transition`.'),
        422: error('A reason is required.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ visit: await cancelVisit(deps, currentAuth(req), params.id, body.reason) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/offers',
      summary: 'Widen the search of an unfilled visit: more candidates, offered in turn',
      access: { roles: ['buyer', 'clinician'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: reopenBody,
      responses: {
        200: { description: 'Offered again.', schema: visitResponse },
        403: error('Not the hospital’s.'),
        404: error('No such visit (or not yours).'),
        409: error('`illegal_transition`, `no_eligible_proctor`.'),
        422: error('`already_asked`, `unknown_proctor`, `proctor_not_eligible`.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ visit: await reopenVisit(deps, currentAuth(req), params.id, body.proctorIds) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/cases',
      summary: 'Record a supervised case (the visit’s proctor; de-identified)',
      description:
        'Notes are refused (422) when they hold obvious patient identifiers: a name after ' +
        '“patient”, record-like numbers, dates of birth.',
      access: { roles: ['proctor'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: caseRecordInput,
      responses: {
        201: { description: 'Recorded.', schema: visitResponse },
        403: error('Not the visit’s proctor.'),
        404: error('No such visit (or not yours).'),
        409: error('`case_number_taken`, `illegal_transition`.'),
        422: error(
          '`validation_failed` (identifiers in notes), `unknown_trainee`, `invalid_case_number`.',
        ),
      },
    },
    async ({ req, res, params, body }) => {
      res.status(201).json({ visit: await recordCase(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/complete',
      summary: 'Mark the visit done (the visit’s proctor); its cases add to your experience',
      access: { roles: ['proctor'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      responses: {
        200: { description: 'Completed.', schema: visitResponse },
        403: error('Not the visit’s proctor.'),
        404: error('No such visit (or not yours).'),
        409: error('`illegal_transition`.'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ visit: await completeVisit(deps, currentAuth(req), params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/sign-offs',
      summary: 'Sign a trainee off once their supervised cases reach the hospital’s threshold',
      description:
        'A one-page PDF record goes to the hospital’s buyers and the trainee. It states that ' +
        'privileging remains the hospital’s decision.',
      access: { roles: ['proctor'] },
      params: visitParams,
      scope: (req, params) =>
        assertVisitVisible(deps.dataSource.manager, currentAuth(req), params.id),
      body: signOffInput,
      responses: {
        201: { description: 'Signed off.', schema: visitResponse },
        403: error('Not the visit’s proctor.'),
        404: error('No such visit (or not yours).'),
        409: error('`threshold_not_reached`, `already_signed_off`, `illegal_transition`.'),
        422: error('`unknown_trainee`.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.status(201).json({
        visit: await signOffTrainee(deps, currentAuth(req), params.id, body.traineeUserId),
      });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/sign-offs/:signOffId/pdf',
      summary: 'Download the one-page sign-off record (PDF)',
      access: { authenticated: true },
      params: z.object({ id, signOffId: id }),
      responses: { 200: { description: 'The PDF.' }, 404: error('No such sign-off.') },
    },
    async ({ req, res, params }) => {
      const file = await readSignOffPdf(deps, currentAuth(req), params.id, params.signOffId);
      res
        .status(200)
        .set({
          'Content-Type': 'application/pdf',
          'Content-Disposition': `attachment; filename="${file.fileName}"`,
          'X-Content-Type-Options': 'nosniff',
          'Cache-Control': 'private, no-store',
        })
        .send(file.data);
    },
  );
  return api;
}
