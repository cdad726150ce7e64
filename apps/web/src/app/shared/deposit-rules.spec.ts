import {
  depositCaution as contractCaution,
  depositRequest,
  depositStrategies as contractStrategies,
  depositStrategyLabels as contractStrategyLabels,
  loanDocumentKindLabels as contractKindLabels,
  loanDocumentKinds as contractKinds,
  maxLoanDocumentBytes as contractMaxBytes,
  outboxStatuses as contractOutboxStatuses,
  paymentKinds as contractPaymentKinds,
  paymentStatuses as contractPaymentStatuses,
  refund,
} from '@evalon/contracts';
import {
  depositCaution,
  depositStrategies,
  depositStrategyExplanations,
  depositStrategyLabels,
  loanDocumentKindLabels,
  loanDocumentKinds,
  maxLoanDocumentBytes,
  outboxStatusLabels,
  outboxStatuses,
  paymentKindLabels,
  paymentKinds,
  paymentStatusLooks,
  paymentStatuses,
  purchaseOrderProblem,
  refundReasonLabels,
} from './deposit-rules';

// The client restates a few contract values (see deposit-rules.ts); these checks hold them to
// the contract itself so the two cannot drift apart silently.
describe('deposit rules restated for the browser', () => {
  it('has the same strategies, labels and caution, and explains every strategy', () => {
    expect(depositStrategies).toEqual([...contractStrategies]);
    expect(depositStrategyLabels).toEqual(contractStrategyLabels);
    expect(Object.keys(depositStrategyExplanations).sort()).toEqual([...contractStrategies].sort());
    expect(depositCaution).toBe(contractCaution);
  });

  it('has the same payment kinds and statuses, with a look for each', () => {
    expect(paymentKinds).toEqual([...contractPaymentKinds]);
    expect(paymentStatuses).toEqual([...contractPaymentStatuses]);
    expect(Object.keys(paymentKindLabels).sort()).toEqual([...contractPaymentKinds].sort());
    expect(Object.keys(paymentStatusLooks).sort()).toEqual([...contractPaymentStatuses].sort());
    expect(Object.keys(refundReasonLabels).sort()).toEqual([...refund.shape.reason.options].sort());
  });

  it('has the same document kinds, labels and size limit', () => {
    expect(loanDocumentKinds).toEqual([...contractKinds]);
    expect(loanDocumentKindLabels).toEqual(contractKindLabels);
    expect(maxLoanDocumentBytes).toBe(contractMaxBytes);
  });

  it('has the same outbox statuses, with a label for each', () => {
    expect(outboxStatuses).toEqual([...contractOutboxStatuses]);
    expect(Object.keys(outboxStatusLabels).sort()).toEqual([...contractOutboxStatuses].sort());
  });

  it('accepts and refuses purchase order numbers exactly as the contract does, with its words', () => {
    const samples = [
      'PO-2027-0042',
      '  PO 17/B #3  ',
      'Bestellung_ÄÖÜ.9',
      '',
      '   ',
      'x'.repeat(64),
      'x'.repeat(65),
      'PO;DROP',
      'PO<42>',
      'Ünïcödé-№',
    ];
    for (const sample of samples) {
      const parsed = depositRequest.safeParse({
        method: 'credit_agreement',
        purchaseOrderNumber: sample,
      });
      const problem = purchaseOrderProblem(sample);
      expect({ sample, ok: problem === null }).toEqual({ sample, ok: parsed.success });
      if (!parsed.success) {
        expect(problem).toBe(parsed.error.issues[0]?.message);
      }
    }
  });
});
