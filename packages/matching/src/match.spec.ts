import { greatCircleDistanceKm } from '@evalon/scheduling';

import { DEFAULT_MATCHING_SETTINGS, matchProctors, resolveMatchingSettings } from './match';
import {
  CHICAGO,
  JFK_CAMPUS,
  LAX,
  MUNICH,
  NOW,
  everyDay,
  licence,
  proctor,
  request,
  weekdays,
} from './test-support';
import type { Proctor, ProctorMatch, VisitRequest } from './types';

function matchOne(p: Proctor, r: VisitRequest = request(), settings = {}): ProctorMatch {
  const [result] = matchProctors(r, [p], NOW, settings);
  return result as ProctorMatch;
}

/** A proctor at LAX (the Aviation Formulary point) licensed in New York, for the JFK campus. */
function laxProctor(overrides: Partial<Proctor> = {}): Proctor {
  return proctor({
    id: 'proctor-lax',
    home: { ...LAX, zone: 'America/Los_Angeles', country: 'US' },
    travelRadiusKm: 5000,
    credentials: [licence('US-NY', '2025-01-01', '2027-12-31')],
    availability: { rules: [weekdays('America/Los_Angeles')], exceptions: [], blackouts: [] },
    ...overrides,
  });
}
const jfkRequest = request({ site: JFK_CAMPUS });

describe('an eligible proctor', () => {
  it('has no exclusions, a score and a reason for each part', () => {
    const result = matchOne(proctor());
    // Milwaukee → Chicago campus by the scheduling package's great-circle distance.
    const km = Math.round(greatCircleDistanceKm(proctor().home, CHICAGO) * 10) / 10;
    expect(km).toBeGreaterThan(100);
    expect(km).toBeLessThan(500);
    expect(result).toMatchObject({
      proctorId: 'proctor-a',
      eligible: true,
      exclusions: [],
      distanceKm: km,
      travelDays: 0,
      footprint: { from: '2027-06-08', to: '2027-06-10' },
      feeEstimate: { amount: 600_000, currency: 'USD' },
    });
    expect(result.reasons).toEqual([
      'Licensed in US-IL until 31 Dec 2027',
      'Available on all 3 visit days',
      `${Math.round(km)} km, same-day travel`,
      '38 supervised cases on this model',
      'Estimated fee $6,000.00: 3 visit days × $2,000.00',
      'Not offered a visit before',
    ]);
    expect(result.score).not.toBeNull();
  });

  it('from LAX to the JFK campus gets travel days, a wider footprint and the travel fee', () => {
    // Aviation Formulary LAX–JFK worked example: 3,972.86 km (IUGG mean radius), above 500 km.
    const result = matchOne(laxProctor(), jfkRequest);
    expect(result).toMatchObject({
      eligible: true,
      distanceKm: 3972.9,
      travelDays: 2,
      footprint: { from: '2027-06-07', to: '2027-06-11' },
      // 3 × 200,000 + 2 × 75,000 minor units.
      feeEstimate: { amount: 750_000, currency: 'USD' },
    });
    expect(result.reasons).toContain('3,973 km, travel day before and after');
    expect(result.reasons).toContain(
      'Estimated fee $7,500.00: 3 visit days × $2,000.00 + 2 travel days × $750.00',
    );
  });

  it('with a national licence in a country that licenses nationally (DE covers DE-BY)', () => {
    const result = matchOne(
      proctor({
        home: { lat: 48.4, lng: 11.7, zone: 'Europe/Berlin', country: 'DE' },
        languages: ['de-DE'],
        dayRate: { amount: 150_000, currency: 'EUR' },
        travelDayRate: { amount: 50_000, currency: 'EUR' },
        credentials: [licence('DE', '2020-01-01', '2030-12-31')],
        availability: { rules: [weekdays('Europe/Berlin')], exceptions: [], blackouts: [] },
      }),
      request({ site: MUNICH, language: 'de' }),
    );
    expect(result.eligible).toBe(true);
    expect(result.reasons).toContain('Licensed in DE (covers DE-BY) until 31 Dec 2030');
    expect(result.reasons).toContain('Speaks de');
    expect(result.reasons).toContain('Estimated fee €4,500.00: 3 visit days × €1,500.00');
  });

  it('shows other credentials and the time since the last offer', () => {
    const result = matchOne(
      proctor({
        credentials: [
          licence('US-IL', '2025-01-01', '2027-12-31'),
          {
            kind: 'privileges',
            jurisdiction: 'US-IL',
            validFrom: '2027-01-01',
            validTo: '2027-09-30',
          },
          {
            kind: 'certificate',
            jurisdiction: 'US',
            validFrom: '2027-01-01',
            validTo: '2027-09-30',
          },
        ],
        lastOfferedAt: '2027-05-20T09:00:00Z',
      }),
    );
    expect(result.reasons).toContain('Privileges recorded for US-IL until 30 Sep 2027');
    // A country-level US certificate does not cover a state (per-state rule, common practice).
    expect(result.reasons.some((r) => r.startsWith('Certificate'))).toBe(false);
    // 2027-05-20T09:00Z → 2027-06-01T12:00Z is 12 days and 3 hours.
    expect(result.reasons).toContain('Last offered a visit 12 days ago');
  });
});

describe('exclusions: one sentence per failed hard constraint', () => {
  it('no licence at all', () => {
    const result = matchOne(proctor({ credentials: [] }));
    expect(result).toMatchObject({ eligible: false, score: null, scoreParts: null });
    expect(result.exclusions).toEqual(['No licence for US-IL']);
  });

  it('a country-level US licence does not cover an Illinois campus', () => {
    // US licensing is per state (common practice); the setting holds US and CA by default.
    expect(DEFAULT_MATCHING_SETTINGS.subnationalLicensingCountries).toContain('US');
    const result = matchOne(proctor({ credentials: [licence('US', '2020-01-01', '2030-12-31')] }));
    expect(result.exclusions).toEqual([
      'No licence for US-IL (a US licence does not cover US-IL: US licences are granted per state)',
    ]);
  });

  it('a licence for another state does not cover the campus', () => {
    const result = matchOne(
      proctor({ credentials: [licence('US-NY', '2020-01-01', '2030-12-31')] }),
    );
    expect(result.exclusions).toEqual(['No licence for US-IL']);
  });

  it('a US campus without its state cannot be checked', () => {
    const result = matchOne(proctor(), request({ site: { ...CHICAGO, subdivision: undefined } }));
    expect(result.exclusions).toEqual([
      'No licence can be checked: the campus has no state or province code, and US licences are ' +
        'granted per state or province',
    ]);
  });

  it('a licence that lapses during the visit', () => {
    const result = matchOne(
      proctor({ credentials: [licence('US-IL', '2025-01-01', '2027-06-09')] }),
    );
    expect(result.exclusions).toEqual(['Licence for US-IL not valid on 10 Jun 2027']);
  });

  it('a licence ending on the last visit day leaves the travel day after uncovered', () => {
    const endsOnLastDay = [licence('US-NY', '2025-01-01', '2027-06-10')];
    const far = matchOne(laxProctor({ credentials: endsOnLastDay }), jfkRequest);
    expect(far.exclusions).toEqual([
      'Licence for US-NY not valid on 11 Jun 2027 (travel day after the visit)',
    ]);
    // The same licence is enough without travel days (a proctor within 500 km of the campus).
    const near = matchOne(
      laxProctor({
        credentials: endsOnLastDay,
        home: { lat: 40.9, lng: -74.2, zone: 'America/New_York', country: 'US' },
      }),
      jfkRequest,
    );
    expect(near).toMatchObject({ eligible: true, travelDays: 0 });
    expect(near.reasons).toContain('Licensed in US-NY until 10 Jun 2027');
  });

  it('a licence starting on the first visit day leaves the travel day before uncovered', () => {
    const result = matchOne(
      laxProctor({ credentials: [licence('US-NY', '2027-06-08', '2029-06-07')] }),
      jfkRequest,
    );
    expect(result.exclusions).toEqual([
      'Licence for US-NY not valid on 7 Jun 2027 (travel day before the visit)',
    ]);
  });

  it('a visit day outside the weekly pattern, an exception or a blackout', () => {
    // Fri 11 – Mon 14 Jun 2027 against a Mon–Fri pattern.
    const weekend = request({ visit: { from: '2027-06-11', to: '2027-06-14' } });
    expect(matchOne(proctor(), weekend).exclusions).toEqual([
      'Not available on 12 Jun 2027 (not in the availability pattern) and ' +
        '13 Jun 2027 (not in the availability pattern)',
    ]);
    const withException = proctor({
      availability: {
        rules: [weekdays('America/Chicago')],
        exceptions: [{ kind: 'date', date: '2027-06-09' }],
        blackouts: [{ from: '2027-06-10', to: '2027-06-20' }],
      },
    });
    expect(matchOne(withException).exclusions).toEqual([
      'Not available on 9 Jun 2027 (exception) and 10 Jun 2027 (blackout)',
    ]);
  });

  it('a blackout on a travel day', () => {
    const result = matchOne(
      laxProctor({
        availability: {
          rules: [weekdays('America/Los_Angeles')],
          exceptions: [],
          blackouts: [{ from: '2027-06-01', to: '2027-06-07' }],
        },
      }),
      jfkRequest,
    );
    expect(result.exclusions).toEqual(['Blackout on 7 Jun 2027 (travel day before the visit)']);
  });

  it('an availability rule that cannot be read excludes only that proctor', () => {
    const broken = proctor({
      id: 'proctor-b',
      availability: { rules: ['RRULE:FREQ=WEEKLY;BYDAY=MO'], exceptions: [], blackouts: [] },
    });
    const results = matchProctors(request(), [broken, proctor()], NOW);
    expect(results.map((r) => [r.proctorId, r.eligible])).toEqual([
      ['proctor-a', true],
      ['proctor-b', false],
    ]);
    expect(results[1]?.exclusions).toEqual([
      'Availability rule 1 cannot be read: The rule needs a DTSTART line giving the first day ' +
        'and time, e.g. DTSTART;TZID=Europe/Berlin:20270104T080000 and RRULE:FREQ=WEEKLY;BYDAY=MO,TU',
    ]);
  });

  it('an accepted visit sharing a footprint day, travel days included', () => {
    const accepted = [{ from: '2027-06-11', to: '2027-06-13', visitId: 'visit-9' }];
    const far = matchOne(laxProctor({ acceptedVisits: accepted }), jfkRequest);
    expect(far.exclusions).toEqual([
      'Already booked 11 Jun 2027 to 13 Jun 2027 for another visit (visit-9)',
    ]);
    // Without travel days the footprint ends on 10 Jun: no clash.
    expect(matchOne(proctor({ acceptedVisits: accepted })).eligible).toBe(true);
  });

  it('a campus beyond the travel radius', () => {
    const result = matchOne(laxProctor({ travelRadiusKm: 3000 }), jfkRequest);
    expect(result.exclusions).toEqual(['3,973 km away, beyond the 3,000 km travel radius']);
  });

  it('a requested language the proctor does not speak (primary subtags compared)', () => {
    const german = request({ language: 'de' });
    expect(matchOne(proctor({ languages: ['en-US', 'fr'] }), german).exclusions).toEqual([
      'Does not speak de (speaks en-US, fr)',
    ]);
    expect(matchOne(proctor({ languages: ['en-US', 'DE-at'] }), german).reasons).toContain(
      'Speaks de',
    );
    expect(matchOne(proctor({ languages: ['de'] }), request({ language: 'de-CH' })).eligible).toBe(
      true,
    );
  });

  it('too few supervised cases on the model, with the minimum as a setting', () => {
    const twelve = proctor({ experience: { 'model-a': 12 } });
    expect(matchOne(twelve).exclusions).toEqual(['12 supervised cases on this model; 20 required']);
    expect(matchOne(twelve, request(), { minSupervisedCases: 10 }).eligible).toBe(true);
    expect(matchOne(proctor({ experience: {} })).exclusions).toEqual([
      'No supervised cases on this model; 20 required',
    ]);
    // A model id that is also an Object.prototype key must not read the prototype.
    expect(matchOne(proctor(), request({ modelId: 'constructor' })).exclusions).toEqual([
      'No supervised cases on this model; 20 required',
    ]);
  });

  it('lists every failed constraint, not just the first', () => {
    const result = matchOne(
      proctor({ credentials: [], experience: {}, travelRadiusKm: 10 }),
      request({ language: 'ja' }),
    );
    expect(result.exclusions).toHaveLength(4);
  });
});

describe('visits across the 2027 daylight-saving changes', () => {
  // DST 2027 (docs/references.md): New York 2027-03-14 07:00Z, Berlin 2027-03-28 01:00Z.

  it('New York campus, 12–16 Mar: 5 visit days, a travel day either side, availability intact', () => {
    const fromBerlin = proctor({
      id: 'proctor-berlin',
      home: { lat: 52.52, lng: 13.4, zone: 'Europe/Berlin', country: 'DE' },
      travelRadiusKm: 8000,
      credentials: [licence('US-NY', '2025-01-01', '2027-12-31')],
      // Every day at 00:30 Berlin time: a one-hour slip would move it to the day before.
      availability: {
        rules: ['DTSTART;TZID=Europe/Berlin:20270101T003000\nRRULE:FREQ=DAILY'],
        exceptions: [],
        blackouts: [],
      },
    });
    const result = matchOne(
      fromBerlin,
      request({ site: JFK_CAMPUS, visit: { from: '2027-03-12', to: '2027-03-16' } }),
    );
    expect(result).toMatchObject({
      eligible: true,
      travelDays: 2,
      footprint: { from: '2027-03-11', to: '2027-03-17' },
      feeEstimate: { amount: 5 * 200_000 + 2 * 75_000, currency: 'USD' },
    });
    expect(result.reasons).toContain('Available on all 5 visit days');
  });

  it('Munich campus, 26–30 Mar: the unavailable day is exactly Sun 28 Mar', () => {
    const fromNewYork = proctor({
      id: 'proctor-ny',
      home: { lat: 40.71, lng: -74.01, zone: 'America/New_York', country: 'US' },
      travelRadiusKm: 8000,
      credentials: [licence('DE', '2025-01-01', '2027-12-31')],
      // Every day but Sunday at 23:30 New York time.
      availability: {
        rules: [
          'DTSTART;TZID=America/New_York:20270301T233000\nRRULE:FREQ=WEEKLY;BYDAY=MO,TU,WE,TH,FR,SA',
        ],
        exceptions: [],
        blackouts: [],
      },
    });
    const visit = request({ site: MUNICH, visit: { from: '2027-03-26', to: '2027-03-30' } });
    const result = matchOne(fromNewYork, visit);
    expect(result.exclusions).toEqual([
      'Not available on 28 Mar 2027 (not in the availability pattern)',
    ]);
    expect(result.footprint).toEqual({ from: '2027-03-25', to: '2027-03-31' });
    expect(
      matchOne(
        {
          ...fromNewYork,
          availability: { ...fromNewYork.availability, rules: [everyDay('America/New_York')] },
        },
        visit,
      ).eligible,
    ).toBe(true);
  });
});

describe('ranking', () => {
  const near = proctor({ id: 'near' });
  // Atlanta area: about 950 km from the Chicago campus, so travel days apply.
  const far = proctor({
    id: 'far',
    home: { lat: 33.75, lng: -84.39, zone: 'America/New_York', country: 'US' },
    experience: { 'model-a': 120 },
    availability: { rules: [weekdays('America/New_York')], exceptions: [], blackouts: [] },
  });
  const offered = proctor({ id: 'offered', lastOfferedAt: '2027-05-31T12:00:00Z' });

  it('follows the documented formula', () => {
    const [result] = matchProctors(request(), [far], NOW);
    // Score = 100 × (0.35·500/(500+km) + 0.30·n/(n+50) + 0.20·fee part + 0.15·recency part),
    // one decimal; alone in its currency the fee part is 1; never offered, recency is 1.
    const km = result!.distanceKm;
    expect(km).toBeGreaterThan(500);
    const expected =
      Math.round(1000 * (0.35 * (500 / (500 + km)) + 0.3 * (120 / 170) + 0.2 + 0.15)) / 10;
    expect(result!.score).toBe(expected);
    expect(result!.scoreParts).toEqual({
      distance: 500 / (500 + km),
      experience: 120 / 170,
      fee: 1,
      recency: 1,
    });
  });

  it('compares fees with the cheapest eligible fee in the same currency', () => {
    const results = matchProctors(request(), [near, far], NOW);
    const byId = Object.fromEntries(results.map((r) => [r.proctorId, r]));
    // near: 3 × 2,000.00 = 6,000.00; far travels: 3 × 2,000.00 + 2 × 750.00 = 7,500.00.
    expect(byId.near?.scoreParts?.fee).toBe(1);
    expect(byId.far?.scoreParts?.fee).toBe(600_000 / 750_000);
  });

  it('puts a proctor offered a visit yesterday below an equal one never offered', () => {
    const results = matchProctors(request(), [offered, near], NOW);
    expect(results.map((r) => r.proctorId)).toEqual(['near', 'offered']);
    expect(results[1]?.scoreParts?.recency).toBeCloseTo(1 / 30, 12);
    expect(results[1]?.reasons).toContain('Last offered a visit 1 day ago');
  });

  it('breaks ties by id and puts the ineligible last, fewest exclusions first', () => {
    const twinB = proctor({ id: 'twin-b' });
    const twinA = proctor({ id: 'twin-a' });
    const oneProblem = proctor({ id: 'x-one', experience: {} });
    const twoProblems = proctor({ id: 'a-two', experience: {}, credentials: [] });
    const results = matchProctors(request(), [twoProblems, twinB, oneProblem, twinA], NOW);
    expect(results.map((r) => r.proctorId)).toEqual(['twin-a', 'twin-b', 'x-one', 'a-two']);
    expect(results[0]?.score).toBe(results[1]?.score);
  });

  it('gives the same result for every input order', () => {
    const list = [near, far, offered, proctor({ id: 'none', credentials: [] })];
    const reference = matchProctors(request(), list, NOW);
    const orders = [
      [3, 2, 1, 0],
      [1, 3, 0, 2],
      [2, 0, 3, 1],
    ];
    for (const order of orders) {
      expect(
        matchProctors(
          request(),
          order.map((i) => list[i]!),
          NOW,
        ),
      ).toEqual(reference);
    }
  });

  it('uses the weights from the settings', () => {
    const [onlyDistance] = matchProctors(request(), [far], NOW, {
      weights: { distance: 1, experience: 0, fee: 0, recency: 0 },
    });
    const km = onlyDistance!.distanceKm;
    expect(onlyDistance!.score).toBe(Math.round(1000 * (500 / (500 + km))) / 10);
  });
});

describe('input checks', () => {
  it('rejects duplicate ids, bad settings and bad requests', () => {
    expect(() => matchProctors(request(), [proctor(), proctor()], NOW)).toThrow(/twice/);
    expect(() => resolveMatchingSettings({ minSupervisedCases: -1 })).toThrow(RangeError);
    expect(() =>
      resolveMatchingSettings({ weights: { distance: 0, experience: 0, fee: 0, recency: 0 } }),
    ).toThrow(/weight/);
    expect(() =>
      matchProctors(request({ site: { ...CHICAGO, subdivision: 'DE-BY' } }), [], NOW),
    ).toThrow(/not in US/);
    expect(() => matchProctors(request({ cases: 0 }), [], NOW)).toThrow(RangeError);
    expect(() => matchProctors(request({ language: 'not a tag!' }), [], NOW)).toThrow(RangeError);
    expect(() =>
      matchProctors(request({ visit: { from: '2027-06-10', to: '2027-06-08' } }), [], NOW),
    ).toThrow(RangeError);
    expect(() => matchProctors(request(), [], '2027-06-01T12:00:00')).toThrow(/offset/);
  });
});
