import {
  unavailableReasonLabels,
  type AvailabilityItem,
  type Milestones,
  type UnavailableReason,
} from '@evalon/contracts';
import { type HoldInterval, unitDeposit } from '../../catalog';
import type { CandidateUnit } from '../data-access/availability-repository';
import type { HospitalPlace, Plan, PlannerCache } from './planner-cache';
import type { SchedulingSettings } from '@evalon/scheduling';

/** A lender's settings as the engine needs them. */
export interface LenderPlanSettings {
  settings: SchedulingSettings;
  version: string;
}

/** What one evaluation shares across its units. */
export interface EvaluationContext {
  site: HospitalPlace;
  /** The hospital asking (its own loans read "already booked by your hospital"). */
  hospitalId: number;
  useFrom: string;
  useTo: string;
  now: Date;
  horizonDays: number;
  settingsByLender: ReadonlyMap<number, LenderPlanSettings>;
  /** Models the hospital has borrowed before (regular lead time). */
  borrowedBefore: ReadonlySet<number>;
  plans: PlannerCache;
  /**
   * Plans already looked up in this evaluation, by lender, depot and lead: within one request
   * the rest of the key is fixed, so units of one depot skip the shared cache's key building.
   */
  local?: Map<string, Plan>;
}

/** The prepared plan of one unit for the context's window. */
export function planFor(unit: CandidateUnit, ctx: EvaluationContext): Plan {
  const firstLoan = !ctx.borrowedBefore.has(unit.modelId);
  const localKey = `${unit.lenderId}|${unit.depot.id}|${firstLoan ? 1 : 0}`;
  const known = ctx.local?.get(localKey);
  if (known) return known;
  const lender = ctx.settingsByLender.get(unit.lenderId);
  if (!lender) throw new Error(`settings of lender ${unit.lenderId} were not loaded`);
  const plan = ctx.plans.plan({
    depot: unit.depot,
    site: ctx.site,
    lenderId: unit.lenderId,
    settingsVersion: lender.version,
    settings: lender.settings,
    firstLoanOfModel: firstLoan,
    useFrom: ctx.useFrom,
    useTo: ctx.useTo,
  });
  ctx.local?.set(localKey, plan);
  return plan;
}

/**
 * The date range whose holds can matter for these plans: from the earliest `shipBy` of the
 * requested window to the latest `readyAgain` of the last window the horizon allows. Milestones
 * only move later as the window moves later, so nothing outside can overlap.
 */
export function holdRange(
  plans: readonly Plan[],
  horizonDays: number,
): { from: string; to: string } {
  let from = '9999-12-31';
  let to = '0000-01-01';
  for (const plan of plans) {
    const first = plan.milestones(0);
    const last = plan.milestones(horizonDays);
    if (first.shipBy < from) from = first.shipBy;
    if (last.readyAgain > to) to = last.readyAgain;
  }
  return { from, to };
}

/**
 * Whether a footprint `[start, end]` and a hold share a day: the rule of `intervalsOverlap` in
 * `@evalon/scheduling` (closed intervals, touching ones overlap; `YYYY-MM-DD` strings compare as
 * the dates they name). The package's function validates both intervals on every call, which
 * dominated the search's profile; here the dates are known good (milestones from the package,
 * holds from DATE columns), so the comparison is made directly. A test checks both agree.
 */
export function overlaps(
  start: string,
  end: string,
  hold: { start: string; end: string },
): boolean {
  return start <= hold.end && hold.start <= end;
}

/** The first hold that overlaps the milestones' hold `[shipBy, readyAgain]`, if any. */
function firstConflict(m: Milestones, holds: readonly HoldInterval[]): HoldInterval | undefined {
  return holds.find((h) => overlaps(m.shipBy, m.readyAgain, h));
}

/** Why a unit does not fit: maintenance first, then a loan, then the cut-off. */
function reasonFor(
  conflicts: readonly HoldInterval[],
  tooSoon: boolean,
  hospitalId: number,
): UnavailableReason {
  if (conflicts.some((h) => h.kind === 'maintenance')) return 'maintenance';
  if (conflicts.length) {
    return conflicts.every((h) => h.hospitalId === hospitalId) ? 'booked_by_you' : 'booked';
  }
  return tooSoon ? 'too_soon' : 'booked';
}

/** Days since 1970-01-01 of a `YYYY-MM-DD` date already known to be valid. */
function dayIndex(date: string): number {
  return Date.parse(`${date}T00:00:00Z`) / 86_400_000;
}

/**
 * The earliest shift (1..horizon) at which the plan fits the holds and the cut-off, or null.
 * Steps one day at a time like `earliestFeasibleWindow` of `@evalon/scheduling`, with one safe
 * jump: while a hold ending on day E blocks, the window's shipBy lies at least lead + transit
 * calendar days before its first case day (those are business days, never fewer calendar
 * days), so no window whose first case day is on or before E + lead + transit can fit; those
 * are skipped. Milestones come from the package's planner.
 */
export function earliestShift(
  plan: Plan,
  unit: CandidateUnit,
  holds: readonly HoldInterval[],
  ctx: Pick<EvaluationContext, 'now' | 'horizonDays' | 'useFrom' | 'plans'>,
  fromShift = 1,
): number | null {
  const firstDay = dayIndex(ctx.useFrom);
  const minimumOffset = plan.leadDays + plan.transitDays;
  let shift = fromShift;
  while (shift <= ctx.horizonDays) {
    const m = plan.milestones(shift);
    if (ctx.plans.cutoffPassed(unit.depot, m.shipBy, ctx.now)) {
      shift += 1;
      continue;
    }
    const blocking = firstConflict(m, holds);
    if (!blocking) return shift;
    const jump = dayIndex(blocking.end) + minimumOffset + 1 - firstDay;
    shift = Math.max(shift + 1, jump);
  }
  return null;
}

/** One unit, evaluated for the context's window. */
export interface UnitEvaluation {
  item: AvailabilityItem;
  plan: Plan;
}

/**
 * Evaluates candidate units for one hospital site and use window: the requested window's
 * milestones, whether they fit the unit's holds and the depot's cut-off, and when not, the
 * earliest window within the horizon and the reason. All in memory; the caller loaded the
 * units and their holds with one query each.
 */
export function evaluateUnits(
  units: readonly CandidateUnit[],
  holdsByUnit: ReadonlyMap<number, readonly HoldInterval[]>,
  ctx: EvaluationContext,
): UnitEvaluation[] {
  const deposits = new Map<number, { amount: number; currency: string }>();
  return units.map((unit) => {
    const plan = planFor(unit, ctx);
    const holds = holdsByUnit.get(unit.unitId) ?? [];
    const m = plan.milestones(0);
    const conflicts = holds.filter((h) => overlaps(m.shipBy, m.readyAgain, h));
    const tooSoon = ctx.plans.cutoffPassed(unit.depot, m.shipBy, ctx.now);
    const notActive = unit.status !== 'active';
    const feasible = !notActive && conflicts.length === 0 && !tooSoon;
    let deposit = deposits.get(unit.modelId);
    if (!deposit) {
      deposit = unitDeposit(unit);
      deposits.set(unit.modelId, deposit);
    }
    const item: AvailabilityItem = {
      unitId: unit.unitId,
      modelId: unit.modelId,
      modelName: unit.modelName,
      category: unit.category,
      lenderId: unit.lenderId,
      lenderName: unit.lenderName,
      serialNumber: unit.serialNumber,
      depotId: unit.depot.id,
      depotName: unit.depot.name,
      depotTimeZone: unit.depot.timeZone,
      feasible,
      milestones: m,
      distanceKm: Math.round(plan.distanceKm * 10) / 10,
      transitDays: plan.transitDays,
      leadDays: plan.leadDays,
      firstLoanOfModel: !ctx.borrowedBefore.has(unit.modelId),
      deposit,
      earliestUseFrom: null,
      earliestUseTo: null,
      reasonCode: null,
      reason: null,
    };
    if (!feasible) {
      const code = notActive ? 'not_active' : reasonFor(conflicts, tooSoon, ctx.hospitalId);
      item.reasonCode = code;
      item.reason = unavailableReasonLabels[code];
      const shift = notActive ? null : earliestShift(plan, unit, holds, ctx);
      if (shift !== null) {
        const earliest = plan.milestones(shift);
        item.earliestUseFrom = earliest.useFrom;
        item.earliestUseTo = earliest.useTo;
      } else {
        item.reason += ` — no free window within ${ctx.horizonDays} days`;
      }
    }
    return { item, plan };
  });
}

/** Orders results for people: fitting units first, then the soonest, the nearest, the serial. */
export function compareItems(a: AvailabilityItem, b: AvailabilityItem): number {
  if (a.feasible !== b.feasible) return a.feasible ? -1 : 1;
  const soonA = a.feasible ? a.milestones.useFrom : (a.earliestUseFrom ?? '9999-12-31');
  const soonB = b.feasible ? b.milestones.useFrom : (b.earliestUseFrom ?? '9999-12-31');
  if (soonA !== soonB) return soonA < soonB ? -1 : 1;
  if (a.distanceKm !== b.distanceKm) return a.distanceKm - b.distanceKm;
  return a.modelName.localeCompare(b.modelName) || a.serialNumber.localeCompare(b.serialNumber);
}
