import type { EntityManager } from 'typeorm';
import type { Loan, LoanPage, LoanQuery, LoanState } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  isBuyerOf,
  isFleetManagerOf,
  organisationsWithRole,
  worksForHospital,
  worksForLender,
} from '../../catalog';
import {
  countLoansByState,
  findLoanEvents,
  findLoans,
  findLoanUnits,
  type LoanUnitView,
  type LoanView,
} from '../data-access/loan-repository';
import type { LoanDeps } from './deps';
import { allowedActions } from './state-machine';

/** Whether the person may see the loan: its hospital's or lender's people, or the admin. */
export function canSeeLoan(
  auth: AuthContext,
  loan: { hospitalId: number; lenderId: number },
): boolean {
  return (
    auth.isPlatformAdmin ||
    worksForHospital(auth, loan.hospitalId) ||
    worksForLender(auth, loan.lenderId)
  );
}

/**
 * Refuses (404) a loan the person may not see. The scope check of every `/api/loans/:id/...`
 * route that takes a body: it runs before the body is validated, so a stranger learns nothing
 * from validation messages. The use case checks again under its lock.
 */
export async function assertLoanVisible(
  m: EntityManager,
  auth: AuthContext,
  loanId: number,
): Promise<void> {
  const [view] = await findLoans(m, { ids: [loanId], limit: 1 });
  if (!view || !canSeeLoan(auth, view)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
}

/** Builds the API shape of a loan from its row, units and (optionally) events. */
export function toLoan(
  auth: AuthContext,
  view: LoanView,
  units: readonly LoanUnitView[],
  events?: Loan['events'],
): Loan {
  return {
    id: view.id,
    reference: view.reference,
    state: view.state,
    hospitalId: view.hospitalId,
    hospitalName: view.hospitalName,
    siteId: view.siteId,
    siteName: view.siteName,
    siteTimeZone: view.siteTimeZone,
    lenderId: view.lenderId,
    lenderName: view.lenderName,
    useFrom: view.milestones.useFrom,
    useTo: view.milestones.useTo,
    milestones: view.milestones,
    units: units.map((u) => ({
      unitId: u.unitId,
      modelId: u.modelId,
      modelName: u.modelName,
      serialNumber: u.serialNumber,
      depotId: u.depotId,
      depotName: u.depotName,
      milestones: u.milestones,
      deposit: { amount: u.depositAmount, currency: view.depositCurrency },
    })),
    deposit: { amount: view.depositAmount, currency: view.depositCurrency },
    note: view.note,
    requestedBy: view.requestedBy,
    createdAt: view.createdAt.toISOString(),
    ...(events ? { events } : {}),
    allowedActions: allowedActions(view.state, {
      lenderFleetManager: isFleetManagerOf(auth, view.lenderId),
      hospitalBuyer: isBuyerOf(auth, view.hospitalId),
    }),
  };
}

/**
 * Loans the person may see, one page: a hospital's buyers and clinicians see their hospital's
 * loans, a lender's fleet managers and coordinators their lender's, the admin all. A fleet
 * manager's approval queue is `state=requested`. The answer counts the loans matching `q` in each
 * state, so the list can offer its state filter with numbers; `total` is the sum over the
 * states asked for.
 */
export async function listLoans(
  deps: Pick<LoanDeps, 'dataSource'>,
  auth: AuthContext,
  query: LoanQuery,
): Promise<LoanPage> {
  const m = deps.dataSource.manager;
  // `limit` is the older way to ask for the first `limit` loans.
  const page = query.limit ? { ...query, page: 0, size: query.limit } : query;
  const states = query.state ? (query.state.split(',') as LoanState[]) : undefined;
  const filter = {
    scope: auth.isPlatformAdmin
      ? undefined
      : {
          hospitalIds: organisationsWithRole(auth, ['buyer', 'clinician']),
          lenderIds: organisationsWithRole(auth, ['fleet_manager', 'coordinator']),
        },
    q: query.q,
  };
  const [views, stateCounts] = await Promise.all([
    findLoans(m, { ...filter, states, page }),
    countLoansByState(m, filter),
  ]);
  const total = stateCounts
    .filter((c) => !states || states.includes(c.state))
    .reduce((sum, c) => sum + c.count, 0);
  const units = await findLoanUnits(
    m,
    views.map((v) => v.id),
  );
  const byLoan = new Map<number, LoanUnitView[]>();
  for (const u of units) {
    const list = byLoan.get(u.loanId);
    if (list) list.push(u);
    else byLoan.set(u.loanId, [u]);
  }
  return {
    items: views.map((v) => toLoan(auth, v, byLoan.get(v.id) ?? [])),
    total,
    page: page.page,
    size: page.size,
    stateCounts,
  };
}

/**
 * One loan with its events. A loan of an organisation the person does not work for answers 404
 * (not 403), so loan ids of other organisations reveal nothing.
 */
export async function getLoan(m: EntityManager, auth: AuthContext, loanId: number): Promise<Loan> {
  const [view] = await findLoans(m, { ids: [loanId], limit: 1 });
  if (!view || !canSeeLoan(auth, view)) {
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  const [units, events] = await Promise.all([
    findLoanUnits(m, [loanId]),
    findLoanEvents(m, loanId),
  ]);
  return toLoan(auth, view, units, events);
}
