import {
  caseInput,
  caseList,
  caseParams,
  casePatch,
  caseResponse,
  decisionInput,
  errorBody,
  evaluationReport,
  evidenceSharing,
  sharingInput,
  evaluationDecision,
  feedback,
  feedbackInput,
  loanMetricsResponse,
  loanParams,
} from '@evalon/contracts';
import { z } from 'zod';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { evidenceAccess } from '../domain/access';
import { changeCase, listCases, recordCase, removeCase } from '../domain/cases';
import type { EvidenceDeps } from '../domain/deps';
import { recordDecision, recordFeedback } from '../domain/feedback';
import { getMetrics } from '../domain/metrics';
import { casesCsv } from '../domain/cases-csv';
import { getReport, setSharing } from '../domain/report';
import { renderReportPdf } from '../domain/report-pdf';

const error = (description: string) => ({ description, schema: errorBody });
const seeing = error('No such loan, or not one of yours.');
const notShared = error('`evidence_not_shared` (the lender’s people), or not allowed to write.');
const identifiers =
  'Free text (note, device issues, comments) is refused (422) when it holds identifier-like ' +
  'text: e-mail addresses, phone numbers, calendar dates, record-number-like digit runs, names ' +
  'after title words, ages over 89 (HIPAA Safe Harbor kinds); the field message says what was ' +
  'found and at which character.';

/** `/api/loans/:id/cases`, `/metrics`, `/feedback`, `/decision`: the evaluation evidence. */
export function evidenceRoutes(deps: EvidenceDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/loans', 'Evidence', catalogue);
  const scope = (req: Parameters<typeof currentAuth>[0], loanId: number) =>
    evidenceAccess(deps.dataSource.manager, currentAuth(req), loanId).then(() => undefined);
  // The report, its PDF and the cases CSV are also the lender's to read once the hospital shares.
  const reportScope = (req: Parameters<typeof currentAuth>[0], loanId: number) =>
    evidenceAccess(deps.dataSource.manager, currentAuth(req), loanId, false, true).then(
      () => undefined,
    );
  const readers = {
    roles: ['buyer', 'clinician', 'proctor', 'admin', 'fleet_manager', 'coordinator'] as const,
  };
  const notSharedYet = error(
    '`evidence_not_shared`: the lender’s people, while the hospital has not shared the report.',
  );

  api.route(
    {
      method: 'get',
      path: '/:id/cases',
      summary: 'The loan’s de-identified case records, with what the case form offers',
      description:
        'For the hospital’s buyers and clinicians, the proctors of visits linked to the loan ' +
        'and the admin. Each case adds `targetVolumeMm3` (π/6·L·W·H) and ' +
        '`ablationRateMm3PerMin` (volume ÷ energy-on minutes).',
      access: { roles: ['buyer', 'clinician', 'proctor', 'admin'] },
      params: loanParams,
      scope: (req, params) => scope(req, params.id),
      responses: {
        200: { description: 'The cases.', schema: caseList },
        403: notShared,
        404: seeing,
      },
    },
    async ({ req, res, params }) => {
      res.json(await listCases(deps, currentAuth(req), params.id));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/cases',
      summary: 'Record one de-identified case of the evaluation',
      description:
        'Clinicians of the loan’s hospital and proctors of visits linked to the loan, while ' +
        'the loan is delivered, returning or returned. A proctor’s case is linked to their ' +
        'visit (a proctored case). ' +
        identifiers,
      access: { roles: ['clinician', 'proctor'] },
      params: loanParams,
      scope: (req, params) => scope(req, params.id),
      body: caseInput,
      responses: {
        201: { description: 'Recorded.', schema: caseResponse },
        403: notShared,
        404: seeing,
        409: error('`case_number_taken` or `evaluation_not_open` (loan state).'),
        422: error(
          '`validation_failed`, `unknown_units`, `procedure_not_offered`, `clinician_required`, `unknown_clinician`, `unknown_visit`.',
        ),
      },
    },
    async ({ req, res, params, body }) => {
      res.status(201).json({ case: await recordCase(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/:id/cases/:caseId',
      summary: 'Change some fields of a case',
      description: `Same people and checks as recording. ${identifiers}`,
      access: { roles: ['clinician', 'proctor'] },
      params: caseParams,
      scope: (req, params) => scope(req, params.id),
      body: casePatch,
      responses: {
        200: { description: 'Changed.', schema: caseResponse },
        403: notShared,
        404: error('No such loan or case.'),
        409: error('`case_number_taken` or `evaluation_not_open`.'),
        422: error('As for recording.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ case: await changeCase(deps, currentAuth(req), params.id, params.caseId, body) });
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/:id/cases/:caseId',
      summary: 'Remove a case',
      access: { roles: ['clinician', 'proctor'] },
      params: caseParams,
      scope: (req, params) => scope(req, params.id),
      responses: {
        204: { description: 'Removed.' },
        403: notShared,
        404: error('No such loan or case.'),
        409: error('`evaluation_not_open`.'),
      },
    },
    async ({ req, res, params }) => {
      await removeCase(deps, currentAuth(req), params.id, params.caseId);
      res.status(204).end();
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/metrics',
      summary: 'Evaluation figures of the loan',
      description:
        'Case count; set-up and operative minutes as median, quartiles (Hyndman & Fan type 7), ' +
        'mean ± SD; per clinician a power-law learning curve y = a·x^b (log-log least squares) ' +
        'with the first case within 10 % of the fitted time at their last case; target volumes, ' +
        'ablation rates, complications by Clavien–Dindo grade, proctored cases against the ' +
        'hospital’s sign-off threshold, the survey and the decision.',
      access: { roles: ['buyer', 'clinician', 'proctor', 'admin'] },
      params: loanParams,
      scope: (req, params) => scope(req, params.id),
      responses: {
        200: { description: 'The figures.', schema: loanMetricsResponse },
        403: notShared,
        404: seeing,
      },
    },
    async ({ req, res, params }) => {
      res.json(await getMetrics(deps, currentAuth(req), params.id));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/feedback',
      summary: 'Record (or revise) the clinician’s survey on the loan',
      description: `Likert 1–5 per item; one survey per clinician and loan. ${identifiers}`,
      access: { roles: ['clinician'] },
      params: loanParams,
      scope: (req, params) => scope(req, params.id),
      body: feedbackInput,
      responses: {
        200: { description: 'Recorded.', schema: z.object({ feedback }) },
        403: notShared,
        404: seeing,
        409: error('`evaluation_not_open`.'),
        422: error('`validation_failed`.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ feedback: await recordFeedback(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/decision',
      summary: 'Record (or revise) the hospital’s decision: buy, not now or no, with reasons',
      description: `For the hospital’s buyers, once the platform was delivered. ${identifiers}`,
      access: { roles: ['buyer'] },
      params: loanParams,
      scope: (req, params) => scope(req, params.id),
      body: decisionInput,
      responses: {
        200: { description: 'Recorded.', schema: z.object({ decision: evaluationDecision }) },
        403: notShared,
        404: seeing,
        409: error('`evaluation_not_open`.'),
        422: error('`validation_failed`.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ decision: await recordDecision(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/report',
      summary: 'The evaluation report: figures, charts with their text, costs and the decision',
      description:
        'For the hospital’s buyers and clinicians, the loan’s proctors and the admin; for the ' +
        'lender’s fleet managers and coordinators once a buyer shared it (clinicians then read ' +
        'as “Clinician 1”, “Clinician 2”, …). Each chart comes as chart options with a summary ' +
        'sentence and a table of the same numbers. Costs are the deposit, the settlement ' +
        'charges and the proctor fees recorded in Evalon.',
      access: { roles: [...readers.roles] },
      params: loanParams,
      scope: (req, params) => reportScope(req, params.id),
      responses: {
        200: { description: 'The report.', schema: evaluationReport },
        403: notSharedYet,
        404: seeing,
      },
    },
    async ({ req, res, params }) => {
      res.json((await getReport(deps, currentAuth(req), params.id)).report);
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/report.pdf',
      summary: 'Download the evaluation report as PDF (charts as vector graphics)',
      description: 'Same readers as the report. Carries the report’s caution on the first page.',
      access: { roles: [...readers.roles] },
      params: loanParams,
      scope: (req, params) => reportScope(req, params.id),
      responses: { 200: { description: 'The PDF.' }, 403: notSharedYet, 404: seeing },
    },
    async ({ req, res, params }) => {
      const { report } = await getReport(deps, currentAuth(req), params.id);
      const pdf = await renderReportPdf(report, deps.now());
      res
        .status(200)
        .set({
          'Content-Type': 'application/pdf',
          'Content-Disposition': `attachment; filename="evaluation-${report.loan.reference}.pdf"`,
          'X-Content-Type-Options': 'nosniff',
          'Cache-Control': 'private, no-store',
        })
        .send(pdf);
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/cases.csv',
      summary: 'Download the de-identified cases as CSV',
      description:
        'Same readers as the report. One row per case; cells that start with = + - @ are ' +
        'prefixed with a single quote so a spreadsheet shows them as text.',
      access: { roles: [...readers.roles] },
      params: loanParams,
      scope: (req, params) => reportScope(req, params.id),
      responses: { 200: { description: 'The CSV.' }, 403: notSharedYet, 404: seeing },
    },
    async ({ req, res, params }) => {
      const { report, cases } = await getReport(deps, currentAuth(req), params.id);
      res
        .status(200)
        .set({
          'Content-Type': 'text/csv; charset=utf-8',
          'Content-Disposition': `attachment; filename="cases-${report.loan.reference}.csv"`,
          'X-Content-Type-Options': 'nosniff',
          'Cache-Control': 'private, no-store',
        })
        .send(casesCsv(report, cases));
    },
  );

  api.route(
    {
      method: 'put',
      path: '/:id/evidence-sharing',
      summary: 'Share the evaluation report with the lender, or stop sharing it',
      description:
        'For the hospital’s buyers only; each change is in the audit trail. Sharing lets the ' +
        'lender’s fleet managers and coordinators read the report, its PDF and the cases CSV.',
      access: { roles: ['buyer'] },
      params: loanParams,
      scope: (req, params) => scope(req, params.id),
      body: sharingInput,
      responses: {
        200: { description: 'The consent now.', schema: z.object({ sharing: evidenceSharing }) },
        403: error('Not a buyer of the loan’s hospital.'),
        404: seeing,
        422: error('`validation_failed`.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ sharing: await setSharing(deps, currentAuth(req), params.id, body) });
    },
  );

  return api;
}
