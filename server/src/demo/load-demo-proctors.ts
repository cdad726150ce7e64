import type { DataSource } from 'typeorm';
import { addCalendarDays, isoWeekday, wallTimeToInstant } from '@evalon/scheduling';
import { competencies } from '@evalon/contracts';
import {
  insertMembership,
  insertUser,
  loadSessionUser,
  toAuthContext,
  type AuthContext,
} from '../identity';
import { insertOrganisation } from '../organisations';
import { createLogger } from '../logger';
import {
  insertCredential,
  replaceDeclaredExperience,
  updateAvailability,
  upsertProfile,
} from '../proctors';
import {
  acceptOffer,
  cancelVisit,
  completeVisit,
  createVisitDeps,
  declineOffer,
  noVisitNotifications,
  recordCase,
  requestVisit,
  signOffTrainee,
} from '../visits';
import { demoModels } from './demo-catalog';
import { demoProctors, demoVisits, type DemoProctor } from './demo-proctors';

/** What the proctoring part of the demo loaded. */
export interface DemoProctoringSummary {
  proctors: number;
  visits: number;
}

async function idOf(ds: DataSource, sql: string, value: string): Promise<number | null> {
  const rows: { id: number }[] = await ds.query(sql, [value]);
  return rows[0] ? Number(rows[0].id) : null;
}

async function authOf(ds: DataSource, email: string): Promise<AuthContext> {
  const id = await idOf(ds, 'SELECT id FROM users WHERE email = ?', email);
  const loaded = id ? await loadSessionUser(ds.manager, id) : null;
  if (!loaded) throw new Error(`demo person ${email} is missing`);
  return toAuthContext(loaded.user);
}

/** The 15th of the month after `today`. */
function midNextMonth(today: string): string {
  const [y, m] = today.split('-').map(Number) as [number, number];
  const next = m === 12 ? `${y + 1}-01` : `${y}-${String(m + 1).padStart(2, '0')}`;
  return `${next}-15`;
}

/**
 * The first day of a demo rule in the week of Monday 5 January 2026, as `YYYYMMDD`: a DTSTART
 * must be one of the rule's own days (RFC 5545 §3.8.5.3 leaves an unmatched start undefined).
 */
function firstDay(rule: string): string {
  const days = ['MO', 'TU', 'WE', 'TH', 'FR', 'SA', 'SU'];
  const byDay = /BYDAY=([A-Z,]+)/.exec(rule)?.[1]?.split(',') ?? ['MO'];
  const offset = Math.min(...byDay.map((d) => days.indexOf(d)).filter((i) => i >= 0));
  return `202601${String(5 + offset).padStart(2, '0')}`;
}

async function loadProctor(
  ds: DataSource,
  p: DemoProctor,
  passwordHash: string,
  modelIds: Map<string, number>,
  now: Date,
): Promise<void> {
  const today = now.toISOString().slice(0, 10);
  let organisationId = await idOf(ds, 'SELECT id FROM organisations WHERE name = ?', p.practice);
  organisationId ??= await insertOrganisation(
    ds.manager,
    { name: p.practice, kind: 'proctor_practice', country: p.home.country },
    now,
  );
  let userId = await idOf(ds, 'SELECT id FROM users WHERE email = ?', p.email);
  if (userId === null) {
    userId = await insertUser(
      ds.manager,
      { email: p.email, name: p.name, passwordHash, active: true, timeZone: p.home.timeZone },
      now,
    );
    await insertMembership(ds.manager, { userId, organisationId, role: 'proctor' }, now);
  }
  const uid = userId;
  await ds.transaction(async (m) => {
    await upsertProfile(
      m,
      uid,
      organisationId,
      {
        displayName: p.name,
        homeLatitude: p.home.latitude,
        homeLongitude: p.home.longitude,
        homeTimeZone: p.home.timeZone,
        homeCountry: p.home.country,
        travelRadiusKm: p.travelRadiusKm,
        languages: p.languages,
        dayRate: p.dayRate,
        travelDayRate: p.travelDayRate,
        currency: p.currency,
        specialties: p.specialties,
        bio: p.bio,
      },
      now,
    );
    await replaceDeclaredExperience(
      m,
      uid,
      Object.entries(p.experience).map(([key, cases]) => ({
        modelId: modelIds.get(key)!,
        declaredCases: cases,
      })),
    );
    for (const c of p.credentials) {
      await insertCredential(
        m,
        {
          proctorUserId: uid,
          kind: c.kind,
          title: c.title,
          jurisdiction: c.jurisdiction,
          validFrom: c.validFrom,
          validTo: c.validTo === 'mid-next-month' ? midNextMonth(today) : c.validTo,
          storageKey: null,
          fileName: null,
          sizeBytes: null,
          sha256: null,
        },
        now,
      );
    }
    // Patterns start on a Monday in January 2026, 08:00 in the proctor's zone.
    await updateAvailability(
      m,
      uid,
      {
        rules: p.rules.map((r) => `DTSTART;TZID=${p.home.timeZone}:${firstDay(r)}T080000\n${r}`),
        exceptions: [],
        blackouts: (p.blackouts ?? []).map((b) => ({
          from: addCalendarDays(today, b.fromInDays),
          to: addCalendarDays(today, b.fromInDays + b.days - 1),
        })),
      },
      now,
    );
  });
}

/**
 * Loads the eight demo proctors and visits in every state. Visits go through the visit use
 * cases (matching, offers, answers, cases, sign-off) so the demo holds only states the product
 * reaches; past visits are played with the clock set before them.
 */
export async function loadDemoProctoring(
  ds: DataSource,
  now: Date,
  passwordHash: string,
): Promise<DemoProctoringSummary> {
  const modelIds = new Map<string, number>();
  for (const model of demoModels) {
    const id = await idOf(ds, 'SELECT id FROM models WHERE name = ?', model.name);
    if (id) modelIds.set(model.key, id);
  }
  for (const p of demoProctors) await loadProctor(ds, p, passwordHash, modelIds, now);

  const today = now.toISOString().slice(0, 10);
  const proctorIds = new Map<string, number>();
  for (const p of demoProctors) {
    proctorIds.set(p.email, (await idOf(ds, 'SELECT id FROM users WHERE email = ?', p.email))!);
  }
  let visits = 0;
  const hour = 3_600_000;
  for (const [index, v] of demoVisits.entries()) {
    // Each step happens at its own plausible instant, all before `now`, so the visit page's
    // timeline reads like a real one: a past visit was asked for two weeks before its first day,
    // a coming one two to four days ago; answers follow hours later, cases on the visit days.
    let at = now;
    const later = (hours: number) => {
      at = new Date(at.getTime() + hours * hour);
    };
    const deps = createVisitDeps({
      dataSource: ds,
      logger: createLogger('silent'),
      now: () => at,
      notifyVisitEvent: noVisitNotifications,
    });
    const requester = await authOf(ds, v.requester);
    const site = (await ds.query('SELECT id, time_zone AS zone FROM sites WHERE name = ?', [
      v.campus,
    ])) as { id: number; zone: string }[];
    const siteId = Number(site[0]!.id);
    const campusZone = site[0]!.zone;
    // A Tuesday on or after the start; a week later when a biweekly pattern is off that week.
    let from = addCalendarDays(today, v.startInDays);
    while (isoWeekday(from) !== 2) from = addCalendarDays(from, 1);
    // Asked at 09:40 campus time: two weeks before a past visit, two to four days ago for a
    // coming one.
    const askedOn = addCalendarDays(
      v.startInDays < 0 ? from : today,
      v.startInDays < 0 ? -14 : -(2 + (index % 3)),
    );
    at = new Date(wallTimeToInstant(askedOn, '09:40', campusZone));
    // A visit still waiting for an answer was asked this morning, so its offer is still open.
    if (v.outcome === 'offered') at = new Date(now.getTime() - 5 * hour);
    let created: { id: number } | null = null;
    for (let attempt = 0; attempt < 3 && !created; attempt++) {
      try {
        created = await requestVisit(deps, requester, {
          siteId,
          modelId: modelIds.get(v.model)!,
          kind: 'proctoring',
          from,
          to: addCalendarDays(from, v.days - 1),
          cases: v.cases,
          ...(v.language ? { language: v.language } : {}),
          ...(v.note ? { note: v.note } : {}),
          proctorIds: v.proctors.map((e) => proctorIds.get(e)!),
        });
      } catch (error) {
        if (attempt === 2) throw error;
        from = addCalendarDays(from, 7);
      }
    }
    const id = created!.id;
    for (const d of v.declines ?? []) {
      later(2 + (index % 2));
      await declineOffer(deps, await authOf(ds, d.proctor), id, d.reason);
    }
    const accepting = v.proctors.find((e) => !(v.declines ?? []).some((d) => d.proctor === e));
    if (['accepted', 'completed', 'signed_off'].includes(v.outcome) && accepting) {
      const proctor = await authOf(ds, accepting);
      later(1 + (index % 3));
      await acceptOffer(deps, proctor, id);
      if (v.trainee) {
        const trainee = (await idOf(ds, 'SELECT id FROM users WHERE email = ?', v.trainee))!;
        const cases = v.recordedCases ?? 0;
        for (let n = 1; n <= cases; n++) {
          // Case n on the visit's days (spread over them), from 09:30 campus time, two hours apart.
          const day = addCalendarDays(from, Math.floor(((n - 1) * v.days) / Math.max(cases, 1)));
          const perDay = Math.ceil(cases / v.days);
          const slot = (n - 1) % perDay;
          at = new Date(Date.parse(wallTimeToInstant(day, '09:30', campusZone)) + slot * 2 * hour);
          await recordCase(deps, proctor, id, {
            caseNumber: n,
            traineeUserId: trainee,
            traineeRole: 'performed_supervised',
            ratings: Object.fromEntries(
              competencies.map((c, i) => [c, Math.min(5, 2 + n + (i % 2))]),
            ) as Record<(typeof competencies)[number], number>,
            notes:
              n === 1
                ? 'Set-up took longer than planned; docking on the second attempt.'
                : 'Smooth docking; clear communication with the bedside assistant.',
          });
        }
        later(1);
        if (v.outcome === 'signed_off') await signOffTrainee(deps, proctor, id, trainee);
        if (v.outcome === 'completed') await completeVisit(deps, proctor, id);
      }
    }
    if (v.outcome === 'cancelled') {
      later(26);
      await cancelVisit(deps, requester, id, v.reason ?? 'Plans changed.');
    }
    if (at.getTime() > now.getTime()) {
      throw new Error(`demo visit ${index + 1}: a step would lie after the load instant`);
    }
    visits++;
  }
  return { proctors: demoProctors.length, visits };
}
