import type { EntityManager } from 'typeorm';
import { findSiteWithOrganisation, type SiteWithOrganisation } from '../../catalog';

/**
 * A short-lived, per-process cache of sites for the availability search, which looks up the
 * caller's campus on every request. A site's organisation never changes; its address, zone or
 * country may, and a search sees such a change within `ttlMs`. Booking reads the site fresh.
 */
export class SiteCache {
  private readonly entries = new Map<
    number,
    { at: number; value: Promise<SiteWithOrganisation | null> }
  >();

  constructor(
    private readonly ttlMs = 30_000,
    private readonly maxEntries = 10_000,
  ) {}

  /** The site with its organisation, or null when there is none. */
  get(m: EntityManager, siteId: number): Promise<SiteWithOrganisation | null> {
    const now = Date.now();
    const hit = this.entries.get(siteId);
    if (hit && now - hit.at < this.ttlMs) return hit.value;
    if (this.entries.size >= this.maxEntries) this.entries.clear();
    const value = findSiteWithOrganisation(m, siteId);
    this.entries.set(siteId, { at: now, value });
    value.catch(() => this.entries.delete(siteId));
    return value;
  }
}
