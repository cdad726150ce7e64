import {
  availabilityHorizonDays as contractHorizon,
  createLoanRequest,
  loanStateLabels as contractLoanStateLabels,
  loanStates as contractLoanStates,
  maxUnitsPerLoan as contractMaxUnits,
  maxUseWindowDays as contractMaxWindow,
  modelCategories as contractCategories,
  modelCategoryLabels as contractCategoryLabels,
  reasonRequest,
  unavailableReasonLabels as contractReasonLabels,
} from '@evalon/contracts';
import {
  availabilityHorizonDays,
  loanNoteMaxLength,
  loanStateLabels,
  loanStates,
  maxUnitsPerLoan,
  maxUseWindowDays,
  modelCategories,
  modelCategoryLabels,
  reasonRule,
  stoppedLoanStates,
  unavailableReasonLabels,
} from './loan-rules';

// The client restates a few contract values (see loan-rules.ts); these checks hold them to the
// contract itself so the two cannot drift apart silently.
describe('loan rules restated for the browser', () => {
  it('has the same loan states and labels', () => {
    expect(loanStates).toEqual([...contractLoanStates]);
    expect(loanStateLabels).toEqual(contractLoanStateLabels);
    // The side exits are the last three states of the contract's list.
    expect(stoppedLoanStates).toEqual(contractLoanStates.slice(-3));
  });

  it('has the same categories, category labels and unavailability reasons', () => {
    expect(modelCategories).toEqual([...contractCategories]);
    expect(modelCategoryLabels).toEqual(contractCategoryLabels);
    expect(unavailableReasonLabels).toEqual(contractReasonLabels);
  });

  it('has the same limits', () => {
    expect(maxUseWindowDays).toBe(contractMaxWindow);
    expect(maxUnitsPerLoan).toBe(contractMaxUnits);
    expect(availabilityHorizonDays).toBe(contractHorizon);
  });

  it('accepts and refuses notes and reasons at the same lengths as the contract', () => {
    const base = { siteId: 1, unitIds: [1], useFrom: '2027-03-01', useTo: '2027-03-02' };
    expect(
      createLoanRequest.safeParse({ ...base, note: 'x'.repeat(loanNoteMaxLength) }).success,
    ).toBe(true);
    expect(
      createLoanRequest.safeParse({ ...base, note: 'x'.repeat(loanNoteMaxLength + 1) }).success,
    ).toBe(false);
    expect(reasonRequest.safeParse({ reason: 'x'.repeat(reasonRule.minLength) }).success).toBe(
      true,
    );
    const short = reasonRequest.safeParse({ reason: 'x'.repeat(reasonRule.minLength - 1) });
    expect(short.success).toBe(false);
    expect(short.error?.issues[0]?.message).toBe(reasonRule.tooShort);
    expect(reasonRequest.safeParse({ reason: 'x'.repeat(reasonRule.maxLength + 1) }).success).toBe(
      false,
    );
  });
});
