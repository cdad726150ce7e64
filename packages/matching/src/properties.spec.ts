/**
 * Properties of the matching over generated proctors and requests, each checked against a
 * plain oracle written here without the package's helpers (JavaScript Date for weekdays and day
 * arithmetic; only the distance comes from `@evalon/scheduling`, the reference for distances).
 */
import { greatCircleDistanceKm } from '@evalon/scheduling';
import fc from 'fast-check';

import { matchProctors } from './match';
import {
  NOW,
  RUNS,
  daysInclusive,
  eachDay,
  plusDays,
  proctorsArb,
  requestArb,
} from './test-support';
import type { Proctor, ProctorMatch, VisitRequest } from './types';

const WEEK = ['SU', 'MO', 'TU', 'WE', 'TH', 'FR', 'SA'];

/** Oracle of the hard constraints for the generated shapes (weekly rules in the home zone). */
function oracleEligible(request: VisitRequest, p: Proctor): boolean {
  const km = Math.round(greatCircleDistanceKm(p.home, request.site) * 10) / 10;
  const { from, to } = request.visit;
  const footprint = km > 500 ? eachDay(plusDays(from, -1), plusDays(to, 1)) : eachDay(from, to);
  const visitDays = eachDay(from, to);
  const { country, subdivision } = request.site;
  const licensed = footprint.every((day) =>
    p.credentials.some(
      (c) =>
        c.kind === 'licence' &&
        c.validFrom <= day &&
        day <= c.validTo &&
        (c.jurisdiction === subdivision || (c.jurisdiction === country && country !== 'US')),
    ),
  );
  const ruleDays = /BYDAY=([A-Z,]+)/.exec(p.availability.rules[0] as string)?.[1]?.split(',') ?? [];
  const blackout = (day: string) =>
    p.availability.blackouts.some((b) => b.from <= day && day <= b.to);
  const available =
    visitDays.every(
      (day) =>
        ruleDays.includes(WEEK[new Date(`${day}T00:00:00Z`).getUTCDay()] as string) &&
        !p.availability.exceptions.some((e) => e.kind === 'date' && e.date === day) &&
        !blackout(day),
    ) && !footprint.some(blackout);
  const free = !p.acceptedVisits.some((v) => footprint.some((day) => v.from <= day && day <= v.to));
  const speaks =
    request.language === undefined ||
    p.languages.some(
      (l) => l.split('-')[0]?.toLowerCase() === request.language?.split('-')[0]?.toLowerCase(),
    );
  return (
    licensed &&
    available &&
    free &&
    km <= p.travelRadiusKm &&
    speaks &&
    (p.experience['model-a'] ?? 0) >= 20
  );
}

function sortedKeys<T>(list: readonly T[], keys: readonly number[]): T[] {
  return list
    .map((item, i) => ({ item, key: keys[i] ?? 0, i }))
    .sort((a, b) => a.key - b.key || a.i - b.i)
    .map((x) => x.item);
}

describe('matchProctors properties', () => {
  // About half the proctors also get a licence for the campus in 2027, so that eligible
  // proctors are common (the oracle still judges every proctor from scratch).
  const scenario = fc
    .tuple(requestArb, proctorsArb, fc.array(fc.boolean(), { minLength: 8, maxLength: 8 }))
    .map(([request, proctors, boost]): [VisitRequest, Proctor[]] => {
      const code = request.site.subdivision ?? request.site.country;
      return [
        request,
        proctors.map((p, i) =>
          boost[i]
            ? {
                ...p,
                credentials: [
                  ...p.credentials,
                  {
                    kind: 'licence',
                    jurisdiction: code,
                    validFrom: '2027-01-01',
                    validTo: '2027-12-31',
                  },
                ],
              }
            : p,
        ),
      ];
    });

  it('eligible exactly when the oracle finds every hard constraint met, and ⇔ no exclusions', () => {
    let eligibleSeen = 0;
    let ineligibleSeen = 0;
    fc.assert(
      fc.property(scenario, ([request, proctors]) => {
        const results = matchProctors(request, proctors, NOW);
        for (const r of results) {
          const p = proctors.find((x) => x.id === r.proctorId) as Proctor;
          expect(r.eligible).toBe(oracleEligible(request, p));
          expect(r.eligible).toBe(r.exclusions.length === 0);
          expect(r.score === null).toBe(!r.eligible);
          if (r.eligible) eligibleSeen += 1;
          else ineligibleSeen += 1;
        }
      }),
      { numRuns: RUNS },
    );
    // Both outcomes must actually occur, or the property says little.
    expect(eligibleSeen).toBeGreaterThan(20);
    expect(ineligibleSeen).toBeGreaterThan(20);
  });

  it('scores lie in [0, 100] and the list is ordered: eligible by score desc, then id', () => {
    fc.assert(
      fc.property(scenario, ([request, proctors]) => {
        const results = matchProctors(request, proctors, NOW);
        expect(results).toHaveLength(proctors.length);
        for (const r of results) {
          if (r.score !== null) {
            expect(r.score).toBeGreaterThanOrEqual(0);
            expect(r.score).toBeLessThanOrEqual(100);
            expect(Math.round(r.score * 10)).toBe(r.score * 10);
          }
        }
        for (let i = 1; i < results.length; i += 1) {
          const [a, b] = [results[i - 1] as ProctorMatch, results[i] as ProctorMatch];
          if (a.eligible && b.eligible) {
            expect(a.score! > b.score! || (a.score === b.score && a.proctorId < b.proctorId)).toBe(
              true,
            );
          } else {
            expect(a.eligible || !b.eligible).toBe(true);
          }
        }
      }),
      { numRuns: RUNS },
    );
  });

  it('does not depend on the order of the proctors', () => {
    fc.assert(
      fc.property(
        scenario,
        fc.array(fc.integer(), { minLength: 8, maxLength: 8 }),
        ([request, proctors], keys) => {
          const reference = matchProctors(request, proctors, NOW);
          expect(matchProctors(request, sortedKeys(proctors, keys), NOW)).toEqual(reference);
        },
      ),
      { numRuns: RUNS },
    );
  });

  it('fee = day rate × visit days + travel-day rate × travel days; footprint = visit ± travel days', () => {
    fc.assert(
      fc.property(scenario, ([request, proctors]) => {
        const visitDays = daysInclusive(request.visit.from, request.visit.to);
        for (const r of matchProctors(request, proctors, NOW)) {
          const p = proctors.find((x) => x.id === r.proctorId) as Proctor;
          expect(r.travelDays).toBe(r.distanceKm > 500 ? 2 : 0);
          expect(r.feeEstimate).toEqual({
            amount: p.dayRate.amount * visitDays + p.travelDayRate.amount * r.travelDays,
            currency: p.dayRate.currency,
          });
          expect(daysInclusive(r.footprint.from, r.footprint.to)).toBe(visitDays + r.travelDays);
          expect(r.footprint.from <= request.visit.from && request.visit.to <= r.footprint.to).toBe(
            true,
          );
        }
      }),
      { numRuns: RUNS },
    );
  });

  it('leaving out ineligible proctors changes nothing for the eligible', () => {
    fc.assert(
      fc.property(scenario, ([request, proctors]) => {
        const all = matchProctors(request, proctors, NOW);
        const eligibleIds = new Set(all.filter((r) => r.eligible).map((r) => r.proctorId));
        const again = matchProctors(
          request,
          proctors.filter((p) => eligibleIds.has(p.id)),
          NOW,
        );
        expect(again).toEqual(all.filter((r) => r.eligible));
      }),
      { numRuns: RUNS },
    );
  });
});
