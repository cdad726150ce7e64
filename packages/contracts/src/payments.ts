import { z } from 'zod';
import {
  depositStrategies,
  paymentKinds,
  paymentStatuses,
  loanDocumentKinds,
  purchaseOrderRule,
} from './values/payments';
import { id, listOf } from './common';
import { money } from './catalog';
import { loanState } from './loans';

export * from './values/payments';

export const depositStrategy = z.enum(depositStrategies);

export const paymentKind = z.enum(paymentKinds);

export const paymentStatus = z.enum(paymentStatuses);

/** `POST /api/loans/:id/deposit`. */
export const depositRequest = z
  .discriminatedUnion('method', [
    z.object({ method: z.literal('card') }),
    z.object({
      method: z.literal('credit_agreement'),
      purchaseOrderNumber: z
        .string({ error: purchaseOrderRule.required })
        .trim()
        .min(1, purchaseOrderRule.required)
        .max(purchaseOrderRule.maxLength, purchaseOrderRule.tooLong)
        .regex(purchaseOrderRule.pattern, purchaseOrderRule.badCharacters),
    }),
  ])
  .meta({ id: 'DepositRequest' });
export type DepositRequest = z.infer<typeof depositRequest>;

/** What happened when the buyer asked to secure the deposit. */
export const depositOutcomes = ['checkout', 'waived', 'no_deposit', 'already_confirmed'] as const;

export const depositResponse = z
  .object({
    /**
     * `checkout`: open `checkoutUrl` (the provider's hosted payment page); `waived`: confirmed
     * under the credit agreement; `no_deposit`: confirmed, nothing to pay; `already_confirmed`:
     * the payment had already gone through (the loan is confirmed).
     */
    outcome: z.enum(depositOutcomes),
    /** The hosted payment page, for `checkout` only. */
    checkoutUrl: z.string().nullable(),
    /** Whether the deposit was waived under the credit agreement. */
    waived: z.boolean(),
    strategy: depositStrategy.nullable(),
    deposit: money,
    /** Deadline to secure the deposit (ISO instant), if the loan has one. */
    depositDueAt: z.string().nullable(),
    loanState,
  })
  .meta({ id: 'DepositResponse' });
export type DepositResponse = z.infer<typeof depositResponse>;

/** `POST /api/loans/:id/deposit/refresh` (after the hosted page sends the buyer back). */
export const depositRefreshRequest = z
  .object({
    /** The `session` query parameter of the success redirect, if the page has it. */
    sessionId: z
      .string()
      .regex(/^cs_[A-Za-z0-9_]{1,250}$/, 'Not a payment page reference.')
      .optional(),
  })
  .meta({ id: 'DepositRefreshRequest' });

export const payment = z
  .object({
    id: z.number().int(),
    kind: paymentKind,
    status: paymentStatus,
    /** What was asked for. */
    amount: money,
    /** Held on the card and not captured or released yet. */
    held: z.number().int(),
    /** Captured (charged). */
    captured: z.number().int(),
    /** Refunded from what was captured. */
    refunded: z.number().int(),
    /** Whether this is the payment that confirmed the loan. */
    securesLoan: z.boolean(),
    purchaseOrderNumber: z.string().nullable(),
    checkoutSessionId: z.string().nullable(),
    paymentIntentId: z.string().nullable(),
    failureMessage: z.string().nullable(),
    settledAt: z.string().nullable(),
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: 'Payment' });
export type Payment = z.infer<typeof payment>;

export const refund = z
  .object({
    id: z.number().int(),
    paymentId: z.number().int(),
    amount: money,
    /** `loan_not_active`: money that arrived for a cancelled or expired loan; `settlement`. */
    reason: z.enum(['loan_not_active', 'duplicate', 'settlement']),
    createdAt: z.string(),
  })
  .meta({ id: 'Refund' });
export type Refund = z.infer<typeof refund>;

/** `GET /api/loans/:id/payments`: what was held, charged and refunded for a loan. */
export const loanPayments = z
  .object({
    loanId: z.number().int(),
    reference: z.string(),
    loanState,
    deposit: money,
    strategy: depositStrategy.nullable(),
    depositDueAt: z.string().nullable(),
    confirmedAt: z.string().nullable(),
    purchaseOrderNumber: z.string().nullable(),
    /** Whether the hospital has an active credit agreement with the lender (deposit waivable). */
    creditAgreementActive: z.boolean(),
    /** Totals over every payment of the loan, in the deposit's currency. */
    totals: z.object({
      held: z.number().int(),
      charged: z.number().int(),
      refunded: z.number().int(),
    }),
    payments: z.array(payment),
    refunds: z.array(refund),
    caution: z.string(),
  })
  .meta({ id: 'LoanPayments' });
export type LoanPayments = z.infer<typeof loanPayments>;

/** `PUT /api/lenders/:orgId/credit-agreements/:hospitalId`. */
export const creditAgreementRequest = z
  .object({ active: z.boolean() })
  .meta({ id: 'CreditAgreementRequest' });
export const creditAgreementParams = z.object({ orgId: id, hospitalId: id });

export const creditAgreement = z
  .object({
    lenderId: z.number().int(),
    hospitalId: z.number().int(),
    hospitalName: z.string(),
    active: z.boolean(),
    /** Who last turned it on, and when (kept when it is turned off, for the record). */
    approvedBy: z.string().nullable(),
    approvedAt: z.string().nullable(),
    updatedAt: z.string(),
  })
  .meta({ id: 'CreditAgreement' });
export type CreditAgreement = z.infer<typeof creditAgreement>;
export const creditAgreementList = listOf(creditAgreement).meta({ id: 'CreditAgreementList' });
export const creditAgreementResponse = z
  .object({ creditAgreement })
  .meta({ id: 'CreditAgreementResponse' });

export const loanDocumentKind = z.enum(loanDocumentKinds);

/** The multipart form fields of `POST /api/loans/:id/documents` besides the `file`. */
export const loanDocumentUpload = z.object({ kind: loanDocumentKind });

export const loanDocument = z
  .object({
    id: z.number().int(),
    loanId: z.number().int(),
    kind: loanDocumentKind,
    originalName: z.string(),
    sizeBytes: z.number().int(),
    /** SHA-256 of the bytes, hex: lets both sides check they hold the same file. */
    sha256: z.string(),
    uploadedBy: z.string(),
    uploadedAt: z.string(),
    downloadUrl: z.string(),
  })
  .meta({ id: 'LoanDocument' });
export type LoanDocument = z.infer<typeof loanDocument>;
export const loanDocumentList = listOf(loanDocument).meta({ id: 'LoanDocumentList' });
export const loanDocumentResponse = z
  .object({ document: loanDocument })
  .meta({ id: 'LoanDocumentResponse' });
export const loanDocumentParams = z.object({ id, docId: id });
