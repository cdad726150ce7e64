import type { EntityManager } from 'typeorm';
import type { ShippingSettings } from '@evalon/contracts';
import { DEFAULT_SCHEDULING_SETTINGS, type SchedulingSettings } from '@evalon/scheduling';
import { findLenderSettings } from '../data-access/lender-settings-repository';

/**
 * The product defaults as the API shows them: the scheduling package's defaults (lead 2 days,
 * first loan 3, decontamination 1, turnaround 2, distance bands and customs days that are
 * assumptions every lender may change).
 */
export const defaultShippingSettings: ShippingSettings = {
  distanceBands: DEFAULT_SCHEDULING_SETTINGS.distanceBands.map((b) => ({ ...b })),
  customsDays: DEFAULT_SCHEDULING_SETTINGS.customsDays,
  leadDays: DEFAULT_SCHEDULING_SETTINGS.leadDays,
  firstLoanLeadDays: DEFAULT_SCHEDULING_SETTINGS.firstLoanLeadDays,
  decontaminationDays: DEFAULT_SCHEDULING_SETTINGS.decontaminationDays,
  turnaroundDays: DEFAULT_SCHEDULING_SETTINGS.turnaroundDays,
};

/** A lender's settings as loaded, with whether they are still the defaults. */
export interface LoadedSettings {
  settings: ShippingSettings;
  /** Whether the lender has not saved settings of its own. */
  isDefault: boolean;
  updatedAt: Date | null;
  /** Changes whenever the settings change; part of the footprint cache keys. */
  version: string;
}

/** The API shape and the scheduling package's shape are the same fields; copy to be safe. */
export function toSchedulingSettings(s: ShippingSettings): SchedulingSettings {
  return {
    distanceBands: s.distanceBands.map((b) => ({ maxKm: b.maxKm, days: b.days })),
    customsDays: s.customsDays,
    leadDays: s.leadDays,
    firstLoanLeadDays: s.firstLoanLeadDays,
    decontaminationDays: s.decontaminationDays,
    turnaroundDays: s.turnaroundDays,
  };
}

/** Reads a lender's settings (defaults when it has none) straight from the database. */
export async function loadLenderSettings(
  m: EntityManager,
  lenderId: number,
): Promise<LoadedSettings> {
  const row = await findLenderSettings(m, lenderId);
  if (!row) {
    return { settings: defaultShippingSettings, isDefault: true, updatedAt: null, version: 'd' };
  }
  return {
    settings: row.settings,
    isDefault: false,
    updatedAt: row.updatedAt,
    version: String(row.updatedAt.getTime()),
  };
}

/**
 * A short-lived, per-process cache of lender settings for the availability search, which reads
 * them on every request. A change made through this process is seen at once (the PUT clears
 * the entry); another process sees it within `ttlMs`. Booking reads the settings fresh.
 */
export class LenderSettingsCache {
  private readonly entries = new Map<number, { at: number; value: Promise<LoadedSettings> }>();

  constructor(private readonly ttlMs = 30_000) {}

  /** The lender's settings, from the cache when fresh enough. */
  get(m: EntityManager, lenderId: number): Promise<LoadedSettings> {
    const now = Date.now();
    const hit = this.entries.get(lenderId);
    if (hit && now - hit.at < this.ttlMs) return hit.value;
    const value = loadLenderSettings(m, lenderId);
    this.entries.set(lenderId, { at: now, value });
    // A failed read must not stay cached.
    value.catch(() => this.entries.delete(lenderId));
    return value;
  }

  /** Forgets one lender's settings (after a change). */
  invalidate(lenderId: number): void {
    this.entries.delete(lenderId);
  }
}
