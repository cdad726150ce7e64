import { singleUpload } from '../../http/single-upload';
import express, { type RequestHandler } from 'express';
import { z } from 'zod';
import {
  creditAgreementList,
  creditAgreementParams,
  creditAgreementRequest,
  creditAgreementResponse,
  depositRefreshRequest,
  depositRequest,
  depositResponse,
  errorBody,
  lenderParams,
  loanDocumentList,
  loanDocumentParams,
  loanDocumentResponse,
  loanDocumentUpload,
  loanParams,
  loanPayments,
  maxLoanDocumentBytes,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { AppError } from '../../errors';
import { validationError } from '../../http/errors';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { setCreditAgreement, listCreditAgreements } from '../domain/credit-agreements';
import { refreshDeposit, startDeposit } from '../domain/deposit';
import type { PaymentsDeps } from '../domain/deps';
import { listLoanDocuments, readLoanDocument, uploadLoanDocument } from '../domain/documents';
import { assertLoanVisible, getLoanPayments } from '../domain/queries';
import { handleWebhookEvent, verifyWebhook } from '../domain/webhooks';

const error = (description: string) => ({ description, schema: errorBody });
const webhookAnswer = z
  .object({ received: z.literal(true), outcome: z.string() })
  .meta({ id: 'WebhookAnswer' });

/**
 * `/api/webhooks/payments`: the provider's signed event deliveries. Mounted by `createApp`
 * BEFORE the JSON body parser, with `express.raw` for this router only: the signature covers the
 * exact bytes, so the body must reach the verifier unparsed. No session, no CSRF token (the
 * prefix is exempt): the signature is the proof.
 */
export function paymentWebhookRoutes(deps: PaymentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/webhooks', 'Deposits', catalogue);
  api.router.use(express.raw({ type: 'application/json', limit: '1mb' }));
  api.route(
    {
      method: 'post',
      path: '/payments',
      summary: 'Payment provider events (signed webhook)',
      description:
        'Verified with the provider SDK’s `webhooks.constructEvent` against the raw body and the ' +
        '`Stripe-Signature` header (HMAC-SHA256, 300 s tolerance): a missing, tampered or stale ' +
        'signature answers 400 and changes nothing. Each event id is handled once: a repeated ' +
        'delivery answers 200 with outcome `duplicate`. A completed checkout (hold authorised or ' +
        'charge captured, covering the deposit) confirms an approved loan; money for a loan that ' +
        'is no longer approved is given back (hold cancelled, charge refunded). Any 5xx makes ' +
        'the provider deliver again.',
      access: { public: true },
      responses: {
        200: { description: 'Handled (or a duplicate).', schema: webhookAnswer },
        400: error('`invalid_signature` or `invalid_payload`.'),
      },
    },
    async ({ req, res }) => {
      if (!Buffer.isBuffer(req.body)) {
        throw AppError.badRequest('invalid_payload', 'Send the event as application/json.');
      }
      const event = verifyWebhook(deps, req.body, req.get('stripe-signature'));
      const outcome = await handleWebhookEvent(deps, event);
      res.json({ received: true, outcome: outcome.outcome });
    },
  );
  return api;
}

/** One PDF from the multipart field `file` (at most 10 MB). */
function documentUpload(): RequestHandler {
  return singleUpload({
    field: 'file',
    maxBytes: maxLoanDocumentBytes,
    missing: { code: 'file_missing', message: 'Attach the PDF in the form field “file”.' },
    tooLarge: {
      code: 'document_too_large',
      message: 'The file is larger than 10 MB; attach a smaller PDF.',
    },
  });
}

/** `/api/loans/:id/...`: deposit, payments, reconciliation, documents. */
export function loanPaymentRoutes(deps: PaymentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/loans', 'Deposits', catalogue);

  api.route(
    {
      method: 'post',
      path: '/:id/deposit',
      summary: 'Secure the deposit of an approved loan (buyer of the hospital)',
      description:
        '`{method: "card"}` answers the hosted payment page (`checkoutUrl`) of a checkout ' +
        'session for the loan’s deposit: an authorisation hold when the whole footprint ends ' +
        'within the card authorisation window (7 days), else a charge refunded at settlement. ' +
        'An open page of the loan is handed out again rather than a second one. The loan is ' +
        'confirmed when the payment arrives (webhook, or `POST /deposit/refresh`). ' +
        '`{method: "credit_agreement", purchaseOrderNumber}` confirms at once when the hospital ' +
        'has an active credit agreement with the lender (409 `no_credit_agreement` otherwise). ' +
        'A deposit of 0 confirms at once. The hosted page sends the buyer back to ' +
        '`/loans/<id>?deposit=success&session=<id>` or `?deposit=cancelled`.',
      access: { roles: ['buyer'] },
      params: loanParams,
      scope: (req, params) => assertLoanVisible(deps, currentAuth(req), params.id),
      body: depositRequest,
      responses: {
        200: { description: 'Checkout page, or confirmed.', schema: depositResponse },
        403: error('Not a buyer of the loan’s hospital.'),
        404: error('No such loan (or not yours).'),
        409: error(
          '`illegal_transition` (the loan is not approved), `no_credit_agreement`, `deposit_deadline_passed`.',
        ),
        422: error('`validation_failed` / `purchase_order_required`: the purchase order number.'),
        502: error('`payment_provider_refused`.'),
        503: error('`payment_provider_unavailable`: nothing was charged; try again.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json(await startDeposit(deps, currentAuth(req), params.id, body));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/deposit/refresh',
      summary: 'Check the loan’s payment with the provider now (after the payment page)',
      description:
        'Reads the loan’s checkout sessions through the provider and applies them exactly as the ' +
        'webhook would (the same code; whichever comes first makes the one change), so the page ' +
        'the buyer returns to shows the loan confirmed even when the webhook is late.',
      access: { roles: ['buyer', 'clinician', 'fleet_manager', 'coordinator', 'admin'] },
      params: loanParams,
      scope: (req, params) => assertLoanVisible(deps, currentAuth(req), params.id),
      body: depositRefreshRequest,
      responses: {
        200: { description: 'The loan’s payments after the check.', schema: loanPayments },
        404: error('No such loan, or the session is not this loan’s.'),
        503: error('`payment_provider_unavailable`.'),
      },
    },
    async ({ req, res, params, body }) => {
      const auth = currentAuth(req);
      await refreshDeposit(deps, auth, params.id, body.sessionId);
      res.json(await getLoanPayments(deps, auth, params.id));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/payments',
      summary: 'What was held, charged and refunded for a loan',
      description:
        'For the loan’s hospital (buyers, clinicians) and lender (fleet managers, ' +
        'coordinators): payments, refunds, totals, the strategy, the deadline to secure the ' +
        'deposit and whether a credit agreement could waive it. Others get 404.',
      access: { authenticated: true },
      params: loanParams,
      responses: {
        200: { description: 'The loan’s payments.', schema: loanPayments },
        404: error('No such loan (or not yours).'),
      },
    },
    async ({ req, res, params }) => {
      res.json(await getLoanPayments(deps, currentAuth(req), params.id));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/documents',
      summary: 'File the purchase order or signed loan agreement (PDF, ≤ 10 MB)',
      description:
        'multipart/form-data with `file` (a PDF, recognised from its bytes) and `kind` ' +
        '(`purchase_order` or `loan_agreement`). Buyers of the loan’s hospital, while the loan ' +
        'is live. Stored outside the web root under a random name; audited.',
      access: { roles: ['buyer'] },
      params: loanParams,
      // Before the upload is read: a stranger's file never reaches the disk or a validator.
      scope: (req, params) => assertLoanVisible(deps, currentAuth(req), params.id),
      before: [documentUpload()],
      responses: {
        201: { description: 'Filed.', schema: loanDocumentResponse },
        403: error('Not a buyer of the loan’s hospital.'),
        404: error('No such loan (or not yours).'),
        409: error('`loan_not_active`.'),
        413: error('`document_too_large`.'),
        415: error('`unsupported_document_type`: not a PDF.'),
        422: error('`file_missing`, `validation_failed` (kind).'),
      },
    },
    async ({ req, res, params }) => {
      const fields = loanDocumentUpload.safeParse(req.body ?? {});
      if (!fields.success) throw validationError('body', fields.error);
      const document = await uploadLoanDocument(
        deps,
        currentAuth(req),
        params.id,
        fields.data.kind,
        req.file!,
      );
      res.status(201).json({ document });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/documents',
      summary: 'A loan’s documents (both parties)',
      access: { authenticated: true },
      params: loanParams,
      responses: {
        200: { description: 'Newest first.', schema: loanDocumentList },
        404: error('No such loan (or not yours).'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ items: await listLoanDocuments(deps, currentAuth(req), params.id) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/documents/:docId',
      summary: 'Download a loan document (both parties only)',
      description:
        'Served as an attachment (`Content-Disposition: attachment`) of type application/pdf with ' +
        '`X-Content-Type-Options: nosniff`; never cached by shared caches. Audited.',
      access: { authenticated: true },
      params: loanDocumentParams,
      responses: {
        200: { description: 'The PDF.' },
        404: error('No such document (or not yours).'),
      },
    },
    async ({ req, res, params }) => {
      const { data, document } = await readLoanDocument(
        deps,
        currentAuth(req),
        params.id,
        params.docId,
      );
      // attachment() also guesses a type from the name: ours (sniffed at upload) goes after it.
      res.attachment(document.originalName);
      res.setHeader('Content-Type', 'application/pdf');
      res.setHeader('X-Content-Type-Options', 'nosniff');
      res.setHeader('Cache-Control', 'private, no-store');
      res.end(data);
    },
  );
  return api;
}

/** `/api/lenders/:orgId/credit-agreements`: which hospitals may confirm against a purchase order. */
export function creditAgreementRoutes(deps: PaymentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/lenders', 'Deposits', catalogue);

  api.route(
    {
      method: 'get',
      path: '/:orgId/credit-agreements',
      summary: 'A lender’s credit agreements with hospitals',
      access: { roles: ['fleet_manager', 'coordinator', 'admin'], org: 'param:orgId' },
      params: lenderParams,
      responses: {
        200: { description: 'By hospital name.', schema: creditAgreementList },
        404: error('No such lender.'),
      },
    },
    async ({ res, params }) => {
      res.json({ items: await listCreditAgreements(deps, params.orgId) });
    },
  );

  api.route(
    {
      method: 'put',
      path: '/:orgId/credit-agreements/:hospitalId',
      summary: 'Turn a hospital’s credit agreement on or off (fleet manager)',
      description:
        'With an active agreement the hospital’s buyers may confirm this lender’s loans with a ' +
        'purchase order number instead of a card deposit. Loans confirmed already keep their ' +
        'terms. Audited.',
      access: { roles: ['fleet_manager'], org: 'param:orgId' },
      params: creditAgreementParams,
      body: creditAgreementRequest,
      responses: {
        200: { description: 'The agreement now.', schema: creditAgreementResponse },
        404: error('No such lender or hospital.'),
      },
    },
    async ({ req, res, params, body }) => {
      const creditAgreement = await setCreditAgreement(
        deps,
        currentAuth(req),
        params.orgId,
        params.hospitalId,
        body.active,
      );
      res.json({ creditAgreement });
    },
  );
  return api;
}
