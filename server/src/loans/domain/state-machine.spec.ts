import { loanStates, type LoanState } from '@evalon/contracts';
import {
  allowedActions,
  loanTransitionActions,
  loanTransitionTable,
  planTransition,
  releasesHolds,
  transitions,
  type LoanTransitionAction,
} from './state-machine';

// The table of docs/design/product.md ("loan states"): requested → approved | declined by the lender,
// requested | approved → cancelled by the hospital; declined and cancelled give up the holds.
describe('loan state machine', () => {
  it('approves and declines only requested loans', () => {
    expect(planTransition('requested', 'approve')).toEqual({
      ok: true,
      from: 'requested',
      to: 'approved',
      releasesHolds: false,
    });
    expect(planTransition('requested', 'decline', 'No stock')).toEqual({
      ok: true,
      from: 'requested',
      to: 'declined',
      releasesHolds: true,
    });
    for (const state of loanStates.filter((s) => s !== 'requested')) {
      expect(planTransition(state, 'approve')).toMatchObject({
        ok: false,
        code: 'illegal_transition',
      });
      expect(planTransition(state, 'decline', 'x y z')).toMatchObject({
        ok: false,
        code: 'illegal_transition',
      });
    }
  });

  it('cancels requested and approved loans only', () => {
    const cancellable = loanStates.filter((s) => planTransition(s, 'cancel', 'Plans changed').ok);
    expect(cancellable).toEqual(['requested', 'approved']);
    expect(planTransition('approved', 'cancel', 'Plans changed')).toMatchObject({
      to: 'cancelled',
      releasesHolds: true,
    });
  });

  it('names the current state when it refuses', () => {
    const refused = planTransition('approved', 'approve');
    expect(refused.ok).toBe(false);
    if (!refused.ok) {
      expect(refused.message).toContain('(approved)');
      expect(refused.message).toContain('Approved — deposit due');
      expect(refused.message).toContain('(requested)');
    }
    const shipped = planTransition('shipped', 'cancel', 'Too late');
    expect(!shipped.ok && shipped.message).toMatch(/\(shipped\).*cannot be cancelled/);
  });

  it('wants a reason for declining and cancelling, not for approving', () => {
    expect(planTransition('requested', 'decline')).toMatchObject({
      ok: false,
      code: 'reason_required',
    });
    expect(planTransition('requested', 'decline', '   ')).toMatchObject({
      ok: false,
      code: 'reason_required',
    });
    expect(planTransition('approved', 'cancel', '')).toMatchObject({
      ok: false,
      code: 'reason_required',
    });
    expect(planTransition('requested', 'approve', null)).toMatchObject({ ok: true });
    expect(transitions.approve.reasonRequired).toBe(false);
  });

  it('checks the state before the reason (a wrong state is the more useful message)', () => {
    expect(planTransition('closed', 'decline')).toMatchObject({ code: 'illegal_transition' });
  });

  it('releases holds in the side exits only', () => {
    const released = loanStates.filter((s: LoanState) => releasesHolds(s));
    expect(released).toEqual(['declined', 'cancelled', 'expired']);
  });

  it('offers each side its own actions', () => {
    const lender = { lenderFleetManager: true, hospitalBuyer: false };
    const hospital = { lenderFleetManager: false, hospitalBuyer: true };
    const onlooker = { lenderFleetManager: false, hospitalBuyer: false };
    expect(allowedActions('requested', lender)).toEqual(['approve', 'decline']);
    expect(allowedActions('requested', hospital)).toEqual(['cancel']);
    expect(allowedActions('approved', lender)).toEqual([]);
    expect(allowedActions('approved', hospital)).toEqual(['cancel']);
    expect(allowedActions('requested', onlooker)).toEqual([]);
    expect(allowedActions('cancelled', { lenderFleetManager: true, hospitalBuyer: true })).toEqual(
      [],
    );
  });
});

// The whole table: product flow of a loan from request to close (our own state machine; the
// shipment steps are taken by the shipments component once it exists).
describe('loan transition table', () => {
  it('walks a loan from request to closed, one step at a time', () => {
    const path: [LoanTransitionAction, LoanState][] = [
      ['request', 'requested'],
      ['approve', 'approved'],
      ['confirm', 'confirmed'],
      ['ship', 'shipped'],
      ['deliver', 'delivered'],
      ['start_return', 'returning'],
      ['receive_return', 'returned'],
      ['close', 'closed'],
    ];
    let state: LoanState | null = null;
    for (const [action, to] of path) {
      const plan = planTransition(state, action);
      expect(plan).toEqual({ ok: true, from: state, to, releasesHolds: false });
      state = to;
    }
  });

  it('refuses every step out of order and names the state', () => {
    for (const action of loanTransitionActions) {
      const rule = loanTransitionTable[action];
      for (const state of [null, ...loanStates]) {
        const plan = planTransition(state, action, 'a reason');
        expect(plan.ok).toBe(rule.from.includes(state));
        if (!plan.ok) expect(plan.message).toContain(state ?? 'not yet created');
      }
    }
  });

  it('lets the deposit steps end an approved loan only', () => {
    expect(planTransition('approved', 'expire')).toMatchObject({ ok: true, releasesHolds: true });
    expect(planTransition('requested', 'confirm')).toMatchObject({ code: 'illegal_transition' });
    expect(planTransition('confirmed', 'expire')).toMatchObject({ code: 'illegal_transition' });
  });

  it('offers only approve, decline and cancel as buttons', () => {
    const buttons = loanTransitionActions.filter((a) => loanTransitionTable[a].button !== null);
    expect(buttons).toEqual(['approve', 'decline', 'cancel']);
  });
});
