import type { EntityManager } from 'typeorm';
import {
  unavailableReasonLabels,
  type CreateLoanRequest,
  type Loan,
  type LoanConflict,
  type Milestones,
  type UnavailableReason,
  type UnitUnavailableDetails,
} from '@evalon/contracts';
import { DepositError, depositForLoan } from '@evalon/deposits';
import { intervalsOverlap, type DateInterval } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  lockUnits,
  findHoldsForUnits,
  insertHolds,
  isBuyerOf,
  toSchedulingSettings,
} from '../../catalog';
import {
  findCandidates,
  type CandidateUnit,
  alternativesFor,
  checkUseWindow,
  evaluateForWindow,
  holdsByUnit,
  resolveCampus,
  type Campus,
} from '../../availability';
import { bumpBookingVersions, insertLoan, insertLoanUnits } from '../data-access/loan-repository';
import type { LoanDeps } from './deps';
import { toLoan } from './queries';
import { applyLoanTransition } from './transitions';

/** A unit that blocks the request, decided under the lock. */
interface Blocked {
  unit: CandidateUnit;
  reasonCode: UnavailableReason;
}

type BookingOutcome = { kind: 'booked'; loan: Loan } | { kind: 'blocked'; blocked: Blocked[] };

/** MariaDB errors after which the whole transaction may simply run again. */
const retryableErrors = new Set(['ER_LOCK_DEADLOCK', 'ER_LOCK_WAIT_TIMEOUT']);
const maxAttempts = 3;

function errorCode(error: unknown): string | undefined {
  const e = error as { code?: string; driverError?: { code?: string } };
  return e.driverError?.code ?? e.code;
}

/** The overall milestones of a loan: earliest outbound dates, latest return dates. */
function overallMilestones(all: readonly Milestones[]): Milestones {
  const min = (k: keyof Milestones) => all.map((m) => m[k]).reduce((a, b) => (b < a ? b : a));
  const max = (k: keyof Milestones) => all.map((m) => m[k]).reduce((a, b) => (b > a ? b : a));
  return {
    shipBy: min('shipBy'),
    deliverBy: min('deliverBy'),
    useFrom: all[0]!.useFrom,
    useTo: all[0]!.useTo,
    returnShipBy: max('returnShipBy'),
    backAtDepot: max('backAtDepot'),
    readyAgain: max('readyAgain'),
  };
}

function unknownUnits(ids: readonly number[]): AppError {
  return AppError.field(
    'unknown_units',
    'unitIds',
    `${ids.length === 1 ? 'This unit does' : 'These units do'} not exist: ${ids.join(', ')}.`,
  );
}

/**
 * Everything from the lock to the last insert, in one READ COMMITTED transaction:
 * 1. lock the units' rows in ascending id order (`SELECT ... FOR UPDATE`);
 * 2. read their models and depots with the hospital's first-loan facts, and the lender's
 *    settings (READ COMMITTED: each read sees what committed before it, so after the lock it
 *    sees every hold written by whoever held the lock before us);
 * 3. compute each unit's footprint (`@evalon/scheduling`), check it against the unit's holds
 *    and the depot cut-off; any unit that does not fit → nothing is written;
 * 4. write the loan, its units, one loan hold per unit `[shipBy, readyAgain]` carrying the
 *    unit's next booking version (unique per unit: the second guard), bump the versions, record
 *    the event and call the notification hook.
 */
async function bookInTransaction(
  deps: LoanDeps,
  m: EntityManager,
  auth: AuthContext,
  campus: Campus,
  input: CreateLoanRequest,
): Promise<BookingOutcome> {
  const now = deps.now();
  const locked = await lockUnits(m, input.unitIds);
  const units = await findCandidates(m, {
    unitIds: input.unitIds,
    activeOnly: false,
    hospitalId: campus.hospitalId,
    limit: input.unitIds.length,
  });
  if (locked.length !== input.unitIds.length || units.length !== input.unitIds.length) {
    const known = new Set(units.map((u) => u.unitId));
    throw unknownUnits(input.unitIds.filter((id) => !known.has(id)));
  }
  const lenders = [...new Set(units.map((u) => u.lenderId))];
  if (lenders.length > 1) {
    throw AppError.field(
      'several_lenders',
      'unitIds',
      'All units of one loan must come from one lender; request a separate loan for each lender.',
    );
  }
  const lenderId = lenders[0]!;
  let deposit: { amount: number; currency: string; perUnit: Map<number, number> };
  try {
    const due = depositForLoan(
      units.map((u) => ({
        unitId: String(u.unitId),
        listValue: u.listValue,
        rule: {
          percentBps: u.depositPercentBps,
          min: u.depositMin,
          max: u.depositMax,
          currency: u.currency,
        },
      })),
    );
    if (due.waived) throw new Error('deposits are not waived at request time');
    deposit = {
      amount: due.amount,
      currency: due.currency,
      perUnit: new Map(due.units.map((u) => [Number(u.unitId), u.amount])),
    };
  } catch (error) {
    if (error instanceof DepositError) {
      throw AppError.field('deposit_not_computable', 'unitIds', error.message);
    }
    throw error;
  }

  // The same (briefly cached) settings the search used, so a booking computes the dates the
  // person was shown; a change reaches every process within the cache's lifetime.
  const settings = await deps.settingsCache.get(m, lenderId);
  const borrowed = new Set(units.filter((u) => u.borrowedBefore).map((u) => u.modelId));
  const { site } = campus;
  // Each unit's footprint from the package's planner, through the same memo the search uses
  // (the plan depends only on depot, campus, settings, lead and window, so it is the footprint
  // the person was shown); the cut-off check is the package's wall-clock conversion.
  const footprints = new Map<number, { milestones: Milestones; hold: DateInterval }>();
  const schedulingSettings = toSchedulingSettings(settings.settings);
  for (const unit of units) {
    const plan = deps.plans.plan({
      depot: unit.depot,
      site,
      lenderId,
      settingsVersion: settings.version,
      settings: schedulingSettings,
      firstLoanOfModel: !borrowed.has(unit.modelId),
      useFrom: input.useFrom,
      useTo: input.useTo,
    });
    const milestones = plan.milestones(0);
    footprints.set(unit.unitId, {
      milestones,
      hold: { start: milestones.shipBy, end: milestones.readyAgain },
    });
  }
  const all = [...footprints.values()];
  const from = all.map((f) => f.hold.start).reduce((a, b) => (b < a ? b : a));
  const to = all.map((f) => f.hold.end).reduce((a, b) => (b > a ? b : a));
  const holds = holdsByUnit(await findHoldsForUnits(m, input.unitIds, from, to));

  const blocked: Blocked[] = [];
  for (const unit of units) {
    if (unit.status !== 'active') {
      blocked.push({ unit, reasonCode: 'not_active' });
      continue;
    }
    const footprint = footprints.get(unit.unitId)!;
    const conflicts = (holds.get(unit.unitId) ?? []).filter((h) =>
      intervalsOverlap(footprint.hold, h),
    );
    const tooSoon = deps.plans.cutoffPassed(unit.depot, footprint.hold.start, now);
    if (conflicts.length === 0 && !tooSoon) continue;
    const reasonCode: UnavailableReason = conflicts.some((h) => h.kind === 'maintenance')
      ? 'maintenance'
      : conflicts.length
        ? conflicts.every((h) => h.hospitalId === campus.hospitalId)
          ? 'booked_by_you'
          : 'booked'
        : 'too_soon';
    blocked.push({ unit, reasonCode });
  }
  if (blocked.length) return { kind: 'blocked', blocked };

  const byId = new Map(units.map((u) => [u.unitId, u]));
  const ordered = [...input.unitIds].sort((a, b) => a - b).map((id) => byId.get(id)!);
  const overall = overallMilestones(ordered.map((u) => footprints.get(u.unitId)!.milestones));
  const { id: loanId, reference } = await insertLoan(
    m,
    {
      hospitalId: campus.hospitalId,
      siteId: site.id,
      siteTimeZone: site.timeZone,
      lenderId,
      milestones: overall,
      depositAmount: deposit.amount,
      depositCurrency: deposit.currency,
      note: input.note?.trim() ? input.note.trim() : null,
      requestedByUserId: auth.user.id,
    },
    now,
  );
  await insertLoanUnits(
    m,
    loanId,
    campus.hospitalId,
    ordered.map((u) => ({
      unitId: u.unitId,
      modelId: u.modelId,
      depotId: u.depot.id,
      depotTimeZone: u.depot.timeZone,
      milestones: footprints.get(u.unitId)!.milestones,
      depositAmount: deposit.perUnit.get(u.unitId) ?? 0,
    })),
  );
  const versions = new Map(locked.map((l) => [l.id, l.bookingVersion]));
  await insertHolds(
    m,
    ordered.map((u) => {
      const fp = footprints.get(u.unitId)!;
      return {
        unitId: u.unitId,
        kind: 'loan' as const,
        start: fp.hold.start,
        end: fp.hold.end,
        loanId,
        hospitalId: campus.hospitalId,
        reason: null,
        sequence: versions.get(u.unitId)! + 1,
        createdByUserId: auth.user.id,
      };
    }),
    now,
  );
  if (!(await bumpBookingVersions(m, locked))) {
    // Only possible if something wrote holds without the lock: refuse rather than double-book.
    throw AppError.conflict('unit_changed', 'A unit changed meanwhile; search again and retry.');
  }
  await applyLoanTransition(
    m,
    { id: loanId, state: null },
    'request',
    { userId: auth.user.id },
    null,
    { now, notifyLoanEvent: deps.notifyLoanEvent, depositWindowMs: deps.depositWindowMs },
  );

  const loan = toLoan(
    auth,
    {
      id: loanId,
      reference,
      state: 'requested',
      hospitalId: campus.hospitalId,
      hospitalName: site.organisationName,
      siteId: site.id,
      siteName: site.name,
      siteTimeZone: site.timeZone,
      lenderId,
      lenderName: ordered[0]!.lenderName,
      milestones: overall,
      depositAmount: deposit.amount,
      depositCurrency: deposit.currency,
      note: input.note?.trim() ? input.note.trim() : null,
      requestedBy: auth.user.name,
      createdAt: now,
    },
    ordered.map((u) => ({
      loanId,
      unitId: u.unitId,
      modelId: u.modelId,
      modelName: u.modelName,
      serialNumber: u.serialNumber,
      depotId: u.depot.id,
      depotName: u.depot.name,
      milestones: footprints.get(u.unitId)!.milestones,
      depositAmount: deposit.perUnit.get(u.unitId) ?? 0,
    })),
    [
      {
        id: 0,
        at: now.toISOString(),
        actorName: auth.user.name,
        fromState: null,
        toState: 'requested',
        reason: null,
      },
    ],
  );
  return { kind: 'booked', loan };
}

/**
 * The 409 for a request some of whose units do not fit, with each blocked unit's reason and
 * earliest fitting window (computed after the transaction, without locks) and stand-ins.
 */
async function unavailableError(
  deps: LoanDeps,
  campus: Campus,
  input: CreateLoanRequest,
  blocked: readonly Blocked[],
): Promise<AppError> {
  const m = deps.dataSource.manager;
  const request = { campus, useFrom: input.useFrom, useTo: input.useTo };
  const [evaluated, alternatives] = await Promise.all([
    evaluateForWindow(
      deps,
      m,
      blocked.map((b) => b.unit),
      request,
    ),
    alternativesFor(
      deps,
      m,
      blocked.map((b) => b.unit),
      input.unitIds,
      request,
    ),
  ]);
  const earliest = new Map(evaluated.map((e) => [e.item.unitId, e.item.earliestUseFrom ?? null]));
  const conflicts: LoanConflict[] = blocked.map((b) => ({
    unitId: b.unit.unitId,
    reasonCode: b.reasonCode,
    reason: unavailableReasonLabels[b.reasonCode],
    earliestUseFrom: b.reasonCode === 'not_active' ? null : (earliest.get(b.unit.unitId) ?? null),
  }));
  const names = blocked.map((b) => `${b.unit.modelName} ${b.unit.serialNumber}`).join(', ');
  const details: UnitUnavailableDetails = { conflicts, alternatives };
  return AppError.conflict(
    'unit_unavailable',
    `Not booked: ${names} ${blocked.length === 1 ? 'is' : 'are'} not available for these dates. ` +
      'Nothing was reserved; see the alternatives or choose other dates.',
    details,
  );
}

/**
 * `POST /api/loans`: a hospital buyer requests a loan of 1–20 units of one lender for a use
 * window at one of the hospital's campuses. All or nothing: either every unit is held for its
 * footprint and the loan is `requested`, or nothing is written and the answer is 409 with the
 * conflicts and alternatives.
 */
export async function requestLoan(
  deps: LoanDeps,
  auth: AuthContext,
  input: CreateLoanRequest,
): Promise<Loan> {
  const campus = await resolveCampus(deps.dataSource.manager, auth, input.siteId, deps.sites);
  if (!isBuyerOf(auth, campus.hospitalId)) {
    throw AppError.forbidden('forbidden', 'Only the hospital’s buyers request loans.');
  }
  checkUseWindow(input.useFrom, input.useTo, campus.site, deps.now());
  let outcome: BookingOutcome | undefined;
  for (let attempt = 1; outcome === undefined; attempt++) {
    try {
      outcome = await deps.dataSource.transaction('READ COMMITTED', (m) =>
        bookInTransaction(deps, m, auth, campus, input),
      );
    } catch (error) {
      const code = errorCode(error);
      if (code === 'ER_DUP_ENTRY' && String(error).includes('uq_holds_unit_sequence')) {
        // The second guard fired: someone else booked one of the units at the same moment.
        throw AppError.conflict(
          'unit_unavailable',
          'Not booked: a unit was booked by someone else at the same moment. Nothing was reserved.',
          { conflicts: [], alternatives: [] },
        );
      }
      if (!code || !retryableErrors.has(code) || attempt >= maxAttempts) throw error;
      deps.logger.info({ code, attempt }, 'loan booking retried after a lock conflict');
    }
  }
  if (outcome.kind === 'blocked')
    throw await unavailableError(deps, campus, input, outcome.blocked);
  return outcome.loan;
}
