import { availabilityDays } from '@evalon/matching';
import { addCalendarDays, toSiteDate } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { findBusyRanges, findProfile } from '../data-access/proctor-repository';
import type { ProctorDeps } from './deps';
import { proctorOrganisation } from './profile';

/** Weeks the availability preview shows. */
export const previewWeeks = 8;

/**
 * The next {@link previewWeeks} weeks of the signed-in proctor, day by day in their zone, read
 * by the matching package (the same reading the candidate search uses), with accepted visits
 * (and their travel days) marked as taken.
 */
export async function previewMyAvailability(
  deps: ProctorDeps,
  auth: AuthContext,
  /** `YYYY-MM`: that calendar month instead of the next 8 weeks (the proctor's calendar). */
  month?: string,
): Promise<{
  timeZone: string;
  days: { date: string; available: boolean; why: string | null }[];
}> {
  proctorOrganisation(auth);
  const m = deps.dataSource.manager;
  const profile = await findProfile(m, auth.user.id);
  if (!profile) throw AppError.notFound('profile_not_found', 'Save your proctor profile first.');
  let from = toSiteDate(deps.now(), profile.homeTimeZone);
  let to = addCalendarDays(from, previewWeeks * 7 - 1);
  if (month) {
    from = `${month}-01`;
    // The last day: the day before the first of the next month.
    const [y, mo] = month.split('-').map(Number) as [number, number];
    const next = mo === 12 ? `${y + 1}-01-01` : `${y}-${String(mo + 1).padStart(2, '0')}-01`;
    to = addCalendarDays(next, -1);
  }
  const busy = await findBusyRanges(m, [auth.user.id]);
  const days = availabilityDays(profile.availability, profile.homeTimeZone, { from, to });
  return {
    timeZone: profile.homeTimeZone,
    days: days.map((d) => {
      const visit = busy.find((b) => b.from <= d.date && d.date <= b.to);
      if (visit) return { date: d.date, available: false, why: 'visit' };
      return {
        date: d.date,
        available: d.status === 'available',
        why: d.status === 'available' ? null : d.status,
      };
    }),
  };
}
