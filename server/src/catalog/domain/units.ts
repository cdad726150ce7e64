import type { EntityManager } from 'typeorm';
import type {
  Hold,
  HoldsQuery,
  MaintenanceHoldInput,
  Unit,
  UnitInput,
  UnitPage,
  UnitQuery,
  UnitUpdate,
} from '@evalon/contracts';
import { intervalsOverlap } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  bumpBookingVersion,
  countUnitsByStatus,
  insertUnit,
  listUnits,
  lockUnits,
  serialTaken,
  updateUnit,
  type UnitDetails,
} from '../data-access/unit-repository';
import { findDepot } from '../../organisations';
import { findModel } from '../data-access/model-repository';
import {
  deleteHold,
  findHoldsForUnits,
  findUnitHold,
  insertHolds,
  listUnitHolds,
  type HoldWithLoan,
} from '../data-access/hold-repository';
import type { CatalogDeps } from './deps';
import { hospitalsOf, isFleetManagerOf, lendersOf, worksForLender } from './scope';

function toUnit(u: UnitDetails): Unit {
  return {
    id: u.id,
    modelId: u.modelId,
    modelName: u.modelName,
    category: u.category,
    lenderId: u.lenderId,
    serialNumber: u.serialNumber,
    udiDi: u.udiDi,
    homeDepotId: u.homeDepotId,
    homeDepotName: u.homeDepotName,
    homeDepotTimeZone: u.homeDepotTimeZone,
    status: u.status,
  };
}

/**
 * Units for a model or a lender. The lender's own people see every status; everyone else sees
 * units that are not retired (serial numbers are printed on the kit, so they are not secret).
 * Without a filter a person who works for exactly one lender gets that lender's fleet.
 */
export async function listUnitsFor(
  deps: CatalogDeps,
  auth: AuthContext,
  query: UnitQuery,
): Promise<UnitPage> {
  let lenderId = query.lenderId;
  if (query.modelId === undefined && lenderId === undefined) {
    const lenders = lendersOf(auth);
    if (lenders.length !== 1) {
      throw AppError.badRequest(
        'filter_required',
        'Say which units: give a modelId or a lenderId.',
      );
    }
    lenderId = lenders[0];
  }
  const filter = {
    modelId: query.modelId,
    lenderId,
    depotId: query.depotId,
    status: query.status,
    q: query.q,
    // Retired units only for their lender's own people (and the admin).
    retiredVisibleTo: auth.isPlatformAdmin ? undefined : lendersOf(auth),
  };
  const m = deps.dataSource.manager;
  const [rows, statusCounts] = await Promise.all([
    listUnits(m, { ...filter, page: query }),
    countUnitsByStatus(m, filter),
  ]);
  return {
    items: rows.map(toUnit),
    total: statusCounts.reduce((sum, c) => sum + c.count, 0),
    page: query.page,
    size: query.size,
    statusCounts,
  };
}

async function unitDetails(m: EntityManager, unitId: number): Promise<UnitDetails | null> {
  const [unit] = await listUnits(m, { ids: [unitId] });
  return unit ?? null;
}

/** One unit; 404 when there is none (or it is retired and the person is not its lender's). */
export async function getUnit(deps: CatalogDeps, auth: AuthContext, unitId: number): Promise<Unit> {
  const unit = await unitDetails(deps.dataSource.manager, unitId);
  const visible =
    unit &&
    (auth.isPlatformAdmin || worksForLender(auth, unit.lenderId) || unit.status !== 'retired');
  if (!unit || !visible) throw AppError.notFound('unit_not_found', 'There is no such unit.');
  return toUnit(unit);
}

async function checkUnitFields(
  m: EntityManager,
  lenderId: number,
  modelId: number,
  input: UnitUpdate,
  exceptUnitId?: number,
): Promise<void> {
  if (!(await findDepot(m, lenderId, input.homeDepotId))) {
    throw AppError.field(
      'invalid_home_depot',
      'homeDepotId',
      'Choose one of your own depots as the unit’s home.',
    );
  }
  if (await serialTaken(m, modelId, input.serialNumber, exceptUnitId)) {
    throw AppError.conflict(
      'serial_taken',
      `This model already has a unit with serial number ${input.serialNumber}.`,
      { fieldErrors: { serialNumber: ['Already used by another unit of this model.'] } },
    );
  }
}

/** Adds a unit to a model (fleet manager of the model's lender). */
export async function createUnit(
  deps: CatalogDeps,
  auth: AuthContext,
  input: UnitInput,
): Promise<Unit> {
  const id = await deps.dataSource.transaction(async (m) => {
    const model = await findModel(m, input.modelId);
    if (!model) throw AppError.field('model_not_found', 'modelId', 'There is no such model.');
    if (!isFleetManagerOf(auth, model.lenderId)) {
      throw AppError.forbidden('forbidden', 'Only fleet managers of the model’s lender add units.');
    }
    await checkUnitFields(m, model.lenderId, model.id, input);
    return insertUnit(
      m,
      {
        modelId: model.id,
        serialNumber: input.serialNumber,
        udiDi: input.udiDi,
        homeDepotId: input.homeDepotId,
        status: input.status,
      },
      deps.now(),
    );
  });
  return getUnit(deps, auth, id);
}

/**
 * Changes a unit (fleet manager of its lender). A unit set to maintenance or retired drops out
 * of new searches; loans already booked keep their holds and are the lender's to sort out.
 */
export async function changeUnit(
  deps: CatalogDeps,
  auth: AuthContext,
  unitId: number,
  input: UnitUpdate,
): Promise<Unit> {
  await deps.dataSource.transaction(async (m) => {
    const [locked] = await lockUnits(m, [unitId]);
    const unit = locked ? await unitDetails(m, unitId) : null;
    if (!unit) throw AppError.notFound('unit_not_found', 'There is no such unit.');
    if (!isFleetManagerOf(auth, unit.lenderId)) {
      throw AppError.forbidden('forbidden', 'Only fleet managers of the unit’s lender change it.');
    }
    await checkUnitFields(m, unit.lenderId, unit.modelId, input, unitId);
    await updateUnit(
      m,
      unitId,
      {
        serialNumber: input.serialNumber,
        udiDi: input.udiDi,
        homeDepotId: input.homeDepotId,
        status: input.status,
      },
      deps.now(),
    );
  });
  return getUnit(deps, auth, unitId);
}

/** How a hold looks to one person: the lender sees all, a hospital its own loans by name. */
export function holdAsSeenBy(
  hold: HoldWithLoan,
  viewer: { isLender: boolean; hospitalIds: readonly number[] },
): Hold {
  const base = {
    id: hold.id,
    unitId: hold.unitId,
    kind: hold.kind,
    start: hold.start,
    end: hold.end,
  };
  if (hold.kind === 'maintenance') {
    return {
      ...base,
      loanId: null,
      loanReference: null,
      hospitalName: null,
      reason: viewer.isLender ? hold.reason : null,
      label: viewer.isLender && hold.reason ? `In maintenance: ${hold.reason}` : 'In maintenance',
    };
  }
  if (viewer.isLender) {
    return {
      ...base,
      loanId: hold.loanId,
      loanReference: hold.loanReference,
      hospitalName: hold.hospitalName,
      reason: null,
      label: `${hold.loanReference ?? 'Loan'} · ${hold.hospitalName ?? ''}`.trim(),
    };
  }
  const own = hold.hospitalId !== null && viewer.hospitalIds.includes(hold.hospitalId);
  return {
    ...base,
    loanId: own ? hold.loanId : null,
    loanReference: own ? hold.loanReference : null,
    hospitalName: null,
    reason: null,
    label: own ? `${hold.loanReference ?? 'Loan'} (your hospital)` : 'Reserved',
  };
}

/** A unit's calendar between `from` and `to` (both optional), as the person may see it. */
export async function unitHolds(
  deps: CatalogDeps,
  auth: AuthContext,
  unitId: number,
  query: HoldsQuery,
): Promise<Hold[]> {
  const unit = await getUnit(deps, auth, unitId);
  const holds = await listUnitHolds(deps.dataSource.manager, unitId, query.from, query.to);
  const viewer = {
    isLender: auth.isPlatformAdmin || worksForLender(auth, unit.lenderId),
    hospitalIds: hospitalsOf(auth),
  };
  return holds.map((h) => holdAsSeenBy(h, viewer));
}

/**
 * The scope check of `PUT /api/units/:id` (`who: 'fleet'`) and `POST /api/units/:id/holds`
 * (`who: 'lender'`): 404 for an unknown unit, 403 for another lender's, before the body is
 * validated. The use case checks again under its lock.
 */
export async function assertUnitChangeable(
  deps: CatalogDeps,
  auth: AuthContext,
  unitId: number,
  who: 'fleet' | 'lender',
): Promise<void> {
  const unit = await unitDetails(deps.dataSource.manager, unitId);
  if (!unit) throw AppError.notFound('unit_not_found', 'There is no such unit.');
  const allowed =
    who === 'fleet' ? isFleetManagerOf(auth, unit.lenderId) : worksForLender(auth, unit.lenderId);
  if (!allowed) {
    throw AppError.forbidden(
      'forbidden',
      who === 'fleet'
        ? 'Only fleet managers of the unit’s lender change it.'
        : 'Only the unit’s lender can change its maintenance.',
    );
  }
}

/** Locks a unit for a change to its holds by its lender's people; 404 / 403 otherwise. */
async function lockUnitForHolds(m: EntityManager, auth: AuthContext, unitId: number) {
  const [locked] = await lockUnits(m, [unitId]);
  const unit = locked ? await unitDetails(m, unitId) : null;
  if (!locked || !unit) throw AppError.notFound('unit_not_found', 'There is no such unit.');
  if (!worksForLender(auth, unit.lenderId)) {
    throw AppError.forbidden('forbidden', 'Only the unit’s lender can change its maintenance.');
  }
  return { locked, unit };
}

/**
 * Blocks a unit for maintenance (fleet manager or coordinator of its lender). Under the unit's
 * row lock: refused with 409 when it overlaps a loan's footprint or another maintenance hold.
 */
export async function addMaintenanceHold(
  deps: CatalogDeps,
  auth: AuthContext,
  unitId: number,
  input: MaintenanceHoldInput,
): Promise<Hold> {
  const holdId = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const { locked } = await lockUnitForHolds(m, auth, unitId);
    const existing = await findHoldsForUnits(m, [unitId], input.start, input.end);
    const overlapping = existing.filter((h) => intervalsOverlap(h, input));
    const loanHold = overlapping.find((h) => h.kind === 'loan');
    if (loanHold) {
      const [withLoan] = await listUnitHolds(m, unitId, loanHold.start, loanHold.end).then((all) =>
        all.filter((h) => h.id === loanHold.id),
      );
      throw AppError.conflict(
        'hold_conflict',
        `The unit is held for loan ${withLoan?.loanReference ?? loanHold.loanId} from ` +
          `${loanHold.start} to ${loanHold.end}; move the maintenance or settle the loan first.`,
        { holds: overlapping.map((h) => ({ id: h.id, kind: h.kind, start: h.start, end: h.end })) },
      );
    }
    if (overlapping.length) {
      const other = overlapping[0]!;
      throw AppError.conflict(
        'hold_conflict',
        `The unit is already in maintenance from ${other.start} to ${other.end}.`,
        { holds: overlapping.map((h) => ({ id: h.id, kind: h.kind, start: h.start, end: h.end })) },
      );
    }
    if (!(await bumpBookingVersion(m, unitId, locked.bookingVersion))) {
      throw AppError.conflict('unit_changed', 'The unit changed meanwhile; try again.');
    }
    return insertHolds(
      m,
      [
        {
          unitId,
          kind: 'maintenance',
          start: input.start,
          end: input.end,
          loanId: null,
          hospitalId: null,
          reason: input.reason,
          sequence: locked.bookingVersion + 1,
          createdByUserId: auth.user.id,
        },
      ],
      deps.now(),
    );
  });
  const [hold] = (await listUnitHolds(deps.dataSource.manager, unitId, input.start, input.end))
    .filter((h) => h.id === holdId)
    .map((h) => holdAsSeenBy(h, { isLender: true, hospitalIds: [] }));
  return hold!;
}

/** Ends a maintenance hold early or removes it (the unit's lender). Loan holds are refused. */
export async function removeMaintenanceHold(
  deps: CatalogDeps,
  auth: AuthContext,
  unitId: number,
  holdId: number,
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const { locked } = await lockUnitForHolds(m, auth, unitId);
    const hold = await findUnitHold(m, unitId, holdId);
    if (!hold) throw AppError.notFound('hold_not_found', 'This unit has no such hold.');
    if (hold.kind === 'loan') {
      throw AppError.conflict(
        'loan_hold',
        `This hold belongs to loan ${hold.loanReference ?? hold.loanId}; decline or cancel the loan instead.`,
      );
    }
    await deleteHold(m, holdId);
    await bumpBookingVersion(m, unitId, locked.bookingVersion);
  });
}
