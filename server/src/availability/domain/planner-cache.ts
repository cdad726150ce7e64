import {
  createFootprintPlanner,
  wallTimeToInstant,
  type FootprintPlanner,
  type Milestones,
  type SchedulingSettings,
} from '@evalon/scheduling';

/** A depot as the footprint needs it. */
export interface DepotPlace {
  id: number;
  latitude: number;
  longitude: number;
  /** Holiday calendar (ISO country). */
  country: string;
  timeZone: string;
  /** Carrier cut-off `HH:mm` in the depot's zone. */
  cutoffTime: string;
}

/** A hospital site as the footprint needs it. */
export interface HospitalPlace {
  id: number;
  latitude: number;
  longitude: number;
  country: string;
  timeZone: string;
}

/** Everything a footprint depends on, besides the day shift. */
export interface PlanKey {
  depot: DepotPlace;
  site: HospitalPlace;
  lenderId: number;
  /** Changes whenever the lender's settings change. */
  settingsVersion: string;
  settings: SchedulingSettings;
  firstLoanOfModel: boolean;
  useFrom: string;
  useTo: string;
}

/** A prepared plan: the package's planner, its milestones per shift, and the leg facts. */
export interface Plan {
  planner: FootprintPlanner;
  /** Milestones of the window moved `shift` days later, computed once per shift. */
  milestones(shift: number): Milestones;
  distanceKm: number;
  transitDays: number;
  leadDays: number;
}

function keyOf(k: PlanKey): string {
  const d = k.depot;
  const s = k.site;
  return [
    d.id,
    d.latitude,
    d.longitude,
    d.country,
    d.timeZone,
    d.cutoffTime,
    s.id,
    s.latitude,
    s.longitude,
    s.country,
    s.timeZone,
    k.lenderId,
    k.settingsVersion,
    k.firstLoanOfModel ? 1 : 0,
    k.useFrom,
    k.useTo,
  ].join('|');
}

/**
 * Memoises footprint planners (from `@evalon/scheduling`) and their milestones per day shift.
 * The footprint is a pure function of depot, hospital site, settings, lead and window, so units
 * that share a depot share one plan, and repeated searches reuse earlier work. Bounded (least
 * recently used out first) so memory stays flat.
 */
export class PlannerCache {
  private readonly plans = new Map<string, Plan>();
  private readonly cutoffs = new Map<string, number>();
  /** The instant `safelyAhead` was computed for, and the date two UTC days after it. */
  private aheadFor = Number.NaN;
  private safelyAhead = '';

  constructor(
    private readonly maxPlans = 2_000,
    private readonly maxCutoffs = 20_000,
  ) {}

  /** The plan for `key`, prepared on first use. */
  plan(key: PlanKey): Plan {
    const id = keyOf(key);
    const hit = this.plans.get(id);
    if (hit) {
      // Move to the young end of the LRU order.
      this.plans.delete(id);
      this.plans.set(id, hit);
      return hit;
    }
    const planner = createFootprintPlanner({
      useFrom: key.useFrom,
      useTo: key.useTo,
      depot: {
        lat: key.depot.latitude,
        lng: key.depot.longitude,
        country: key.depot.country,
        timeZone: key.depot.timeZone,
        cutoffTime: key.depot.cutoffTime,
      },
      hospital: {
        lat: key.site.latitude,
        lng: key.site.longitude,
        country: key.site.country,
        timeZone: key.site.timeZone,
      },
      firstLoanOfModel: key.firstLoanOfModel,
      settings: key.settings,
    });
    const first = planner.footprint(0);
    const byShift: Milestones[] = [first.milestones];
    const plan: Plan = {
      planner,
      milestones(shift) {
        return (byShift[shift] ??= planner.milestones(shift));
      },
      distanceKm: first.distanceKm,
      transitDays: first.transitDays,
      leadDays: first.leadDays,
    };
    this.plans.set(id, plan);
    if (this.plans.size > this.maxPlans) {
      const oldest = this.plans.keys().next().value;
      if (oldest !== undefined) this.plans.delete(oldest);
    }
    return plan;
  }

  /**
   * Whether the depot's carrier cut-off on `shipBy` is at or before `now` (the package's
   * `wallTimeToInstant`, memoised: it is the one time-zone computation in the hot loop).
   */
  cutoffPassed(depot: DepotPlace, shipBy: string, now: Date): boolean {
    // No zone is more than 14 hours from UTC, so a cut-off two UTC days ahead is still to come.
    const nowMs = now.getTime();
    if (this.aheadFor !== nowMs) {
      this.aheadFor = nowMs;
      this.safelyAhead = new Date(nowMs + 2 * 86_400_000).toISOString().slice(0, 10);
    }
    if (shipBy > this.safelyAhead) return false;
    const id = `${depot.timeZone}|${depot.cutoffTime}|${shipBy}`;
    let at = this.cutoffs.get(id);
    if (at === undefined) {
      at = Date.parse(wallTimeToInstant(shipBy, depot.cutoffTime, depot.timeZone));
      if (this.cutoffs.size >= this.maxCutoffs) this.cutoffs.clear();
      this.cutoffs.set(id, at);
    }
    return now.getTime() >= at;
  }
}
