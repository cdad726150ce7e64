import { addCalendarDays } from '@evalon/scheduling';
import { createLogger } from '../src/logger';
import { createVisitDeps, runOfferDeadlines } from '../src/visits';
import { credentialNotifierFromConfig, visitNotifierFromConfig } from '../src/notifications';
import { runCredentialWarnings } from '../src/proctors';
import { startTestApp, type TestApp } from './helpers/app';
import {
  countRows,
  makeHospital,
  makeLender,
  makeModel,
  mondayAfter,
  places,
  type TestHospital,
} from './helpers/catalog';
import { jsonColumn, makePerson } from './helpers/factories';
import { signedInClient, type Client } from './helpers/http';
import { homes, makeProctor, setSubdivision, type TestProctor } from './helpers/proctors';

let t: TestApp;
/**
 * The same app and database with its clock set to a chosen instant (`clockAt`): cases are
 * recorded only on a visit's days, so steps taken "on the day" go through this one.
 */
let onTheDay: TestApp;
let clockAt = new Date();
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
  onTheDay = await startTestApp({}, { outboxWorker: false, now: () => clockAt });
});
afterAll(async () => {
  await onTheDay.close();
  await t.close();
});

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);
/** Signed in to the app whose clock reads `clockAt`. */
const signOnTheDay = (person: { email: string; password: string }) =>
  signedInClient(onTheDay.app, person.email, person.password);
/** 10:00 in Boston (UTC−5 in winter, −4 in summer: 14:00Z is 09:00 or 10:00 there) on `date`. */
const bostonMorning = (date: string) => new Date(`${date}T14:00:00Z`);
const post = (client: Client, path: string, body: object = {}) =>
  client.agent.post(path).set('X-XSRF-TOKEN', client.csrf).send(body);

interface World {
  hospital: TestHospital;
  buyer: Client;
  modelId: number;
  from: string;
  to: string;
}

/** A Boston-like campus in US-MA and a model of a lender; visit days two months ahead. */
async function world(offsetDays = 60): Promise<World> {
  const lender = await makeLender(t.dataSource, places.eastDepot);
  const hospital = await makeHospital(t.dataSource, places.bostonCampus);
  await setSubdivision(t.dataSource, hospital.campusId, 'US-MA');
  const modelId = await makeModel(t.dataSource, lender.id);
  const from = mondayAfter(offsetDays);
  return {
    hospital,
    buyer: await sign(hospital.buyer),
    modelId,
    from,
    to: addCalendarDays(from, 1),
  };
}

const visitBody = (w: World, extra: object = {}) => ({
  siteId: w.hospital.campusId,
  modelId: w.modelId,
  from: w.from,
  to: w.to,
  cases: 3,
  ...extra,
});

const outbox = (visitId: number) =>
  t.dataSource.query(
    'SELECT to_addresses, subject, text, attachments, dedupe_key FROM outbox_messages WHERE dedupe_key LIKE ? ORDER BY id',
    [`visit:${visitId}:%`],
  ) as Promise<
    {
      to_addresses: unknown;
      subject: string;
      text: string;
      attachments: unknown;
      dedupe_key: string;
    }[]
  >;

const icsOf = (row: { attachments: unknown }) => {
  const list = (jsonColumn(row.attachments) ?? []) as {
    contentType: string;
    contentBase64: string;
  }[];
  const ics = list.find((a) => a.contentType.startsWith('text/calendar'));
  return ics ? Buffer.from(ics.contentBase64, 'base64').toString('utf8') : null;
};

describe('proctor profile, credentials and availability', () => {
  it('creates and reads the profile; unknown models and non-proctors are refused', async () => {
    const w = await world();
    const proctor = await makePerson(
      t.dataSource,
      (await makeProctor(t.dataSource)).organisationId,
      'proctor',
    );
    const client = await sign(proctor);
    expect((await client.agent.get('/api/proctors/me').expect(200)).body.profile).toBeNull();
    const body = {
      displayName: 'Dr Test Proctor',
      homeLatitude: 41.824,
      homeLongitude: -71.4128,
      homeTimeZone: 'America/New_York',
      homeCountry: 'us',
      travelRadiusKm: 800,
      languages: ['en-US', 'es'],
      dayRate: 250_000,
      travelDayRate: 80_000,
      currency: 'usd',
      specialties: ['Urology'],
      experience: [{ modelId: w.modelId, declaredCases: 42 }],
      bio: 'Invented for a test.',
    };
    const bad = await client.agent
      .put('/api/proctors/me')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ ...body, experience: [{ modelId: 999_999_999, declaredCases: 1 }] });
    expect(bad.status).toBe(422);
    expect(bad.body.error.details.fieldErrors).toHaveProperty(['experience.0.modelId']);
    expect(await countRows(t.dataSource, 'proctor_profiles', 'user_id = ?', [proctor.userId])).toBe(
      0,
    );

    const res = await client.agent
      .put('/api/proctors/me')
      .set('X-XSRF-TOKEN', client.csrf)
      .send(body);
    expect(res.status).toBe(200);
    expect(res.body.profile).toMatchObject({
      displayName: 'Dr Test Proctor',
      homeCountry: 'US',
      currency: 'USD',
      languages: ['en-US', 'es'],
      experience: [{ modelId: w.modelId, declaredCases: 42, recordedCases: 0 }],
    });
    const buyer = await w.buyer.agent.get('/api/proctors/me');
    expect(buyer.status).toBe(403);
  });

  it('availability: RFC 5545 rules are read by the matching package; bad ones are named', async () => {
    const p = await makeProctor(t.dataSource);
    const client = await sign(p);
    const bad = await client.agent
      .put('/api/proctors/me/availability')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({
        rules: ['DTSTART;TZID=America/New_York:20270104T080000\nRRULE:FREQ=HOURLY'],
        exceptions: [],
        blackouts: [],
      });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.details.fieldErrors)).toEqual(['rules.0']);

    // Mondays, Wednesdays and Fridays in the proctor's zone.
    const ok = await client.agent
      .put('/api/proctors/me/availability')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({
        rules: ['DTSTART;TZID=America/New_York:20260105T080000\nRRULE:FREQ=WEEKLY;BYDAY=MO,WE,FR'],
        exceptions: [],
        blackouts: [],
      });
    expect(ok.status).toBe(200);
    const preview = await client.agent.get('/api/proctors/me/availability/preview').expect(200);
    expect(preview.body.days).toHaveLength(56);
    for (const d of preview.body.days as { date: string; available: boolean }[]) {
      const weekday = new Date(`${d.date}T12:00:00Z`).getUTCDay();
      expect(d.available).toBe([1, 3, 5].includes(weekday));
    }
  });

  it('availability exceptions: days out, one-off extra days, blackouts; contradictions are named', async () => {
    const p = await makeProctor(t.dataSource);
    const client = await sign(p);
    const put = (body: object) =>
      client.agent.put('/api/proctors/me/availability').set('X-XSRF-TOKEN', client.csrf).send(body);
    const rule = 'DTSTART;TZID=America/New_York:20260105T080000\nRRULE:FREQ=WEEKLY;BYDAY=MO,WE,FR';
    // Days two to three weeks ahead (preview days are in the proctor's zone; whole days apart).
    const today = (await client.agent.get('/api/proctors/me/availability/preview').expect(200)).body
      .days[0].date as string;
    const next = (weekday: number, after: number) => {
      let d = addCalendarDays(today, after);
      while (new Date(`${d}T12:00:00Z`).getUTCDay() !== weekday) d = addCalendarDays(d, 1);
      return d;
    };
    const saturday = next(6, 14);
    const monday = next(1, 14);
    const friday = next(5, 21);

    const contradictions = await put({
      rules: [rule],
      exceptions: [
        { kind: 'extra', date: saturday },
        { kind: 'date', date: saturday },
        { kind: 'extra', date: friday },
      ],
      blackouts: [{ from: friday, to: friday }],
    });
    expect(contradictions.status).toBe(422);
    expect(contradictions.body.error.details.fieldErrors).toEqual({
      'exceptions.1.date': [`${saturday} is both taken out and added; keep one of the two.`],
      'exceptions.2.date': [
        `${friday} falls in blackout 1 (${friday} to ${friday}); remove one of them.`,
      ],
    });

    await put({
      rules: [rule],
      exceptions: [
        { kind: 'extra', date: saturday },
        { kind: 'date', date: monday },
      ],
      blackouts: [{ from: friday, to: friday }],
    }).expect(200);
    const days = (await client.agent.get('/api/proctors/me/availability/preview').expect(200)).body
      .days as { date: string; available: boolean; why: string | null }[];
    const on = (date: string) => days.find((d) => d.date === date)!;
    expect(on(saturday)).toMatchObject({ available: true });
    expect(on(monday)).toMatchObject({ available: false, why: 'exception' });
    expect(on(friday)).toMatchObject({ available: false, why: 'blackout' });
    expect(on(addCalendarDays(saturday, 7))).toMatchObject({ available: false });

    // One calendar month for the proctor's calendar: February 2028 has 29 days (a leap year,
    // Gregorian rule: divisible by 4 and not a century); a bad month is named.
    const feb = await client.agent
      .get('/api/proctors/me/availability/preview?month=2028-02')
      .expect(200);
    expect(feb.body.days.map((d: { date: string }) => d.date)).toEqual(
      Array.from({ length: 29 }, (_, i) => `2028-02-${String(i + 1).padStart(2, '0')}`),
    );
    // 2 February 2028 is a Wednesday (derived): in the pattern.
    expect(feb.body.days[1]).toMatchObject({ date: '2028-02-02', available: true });
    const badMonth = await client.agent.get('/api/proctors/me/availability/preview?month=2028-13');
    // A bad address (query) answers 400, as for every route; the message says the format.
    expect(badMonth.status).toBe(400);
    expect(JSON.stringify(badMonth.body.error)).toContain('YYYY-MM');
  });

  it('credentials: a PDF is stored and downloadable by its owner only; other files are refused', async () => {
    const p = await makeProctor(t.dataSource);
    const other = await makeProctor(t.dataSource);
    const client = await sign(p);
    const before = await countRows(t.dataSource, 'proctor_credentials', 'proctor_user_id = ?', [
      p.userId,
    ]);
    const notPdf = await client.agent
      .post('/api/proctors/me/credentials')
      .set('X-XSRF-TOKEN', client.csrf)
      .field('kind', 'licence')
      .field('title', 'Licence')
      .field('jurisdiction', 'US-IL')
      .field('validFrom', '2026-01-01')
      .field('validTo', '2028-06-30')
      .attach('file', Buffer.from('hello, not a pdf'), 'licence.pdf');
    expect(notPdf.status).toBe(415);
    const badDates = await client.agent
      .post('/api/proctors/me/credentials')
      .set('X-XSRF-TOKEN', client.csrf)
      .field('kind', 'licence')
      .field('title', 'Licence')
      .field('jurisdiction', 'US-IL')
      .field('validFrom', '2028-01-01')
      .field('validTo', '2026-06-30')
      .attach('file', (await import('./helpers/proctors')).tinyPdf(), 'licence.pdf');
    expect(badDates.status).toBe(422);
    expect(badDates.body.error.details.fieldErrors).toHaveProperty('validTo');
    expect(
      await countRows(t.dataSource, 'proctor_credentials', 'proctor_user_id = ?', [p.userId]),
    ).toBe(before);

    const ok = await client.agent
      .post('/api/proctors/me/credentials')
      .set('X-XSRF-TOKEN', client.csrf)
      .field('kind', 'licence')
      .field('title', 'Illinois medical licence')
      .field('jurisdiction', 'us-il')
      .field('validFrom', '2026-01-01')
      .field('validTo', '2099-06-30')
      .attach('file', (await import('./helpers/proctors')).tinyPdf(), 'licence.pdf');
    expect(ok.status).toBe(201);
    expect(ok.body.credential).toMatchObject({
      jurisdiction: 'US-IL',
      status: 'valid',
      hasFile: true,
    });
    const file = await client.agent.get(
      `/api/proctors/me/credentials/${ok.body.credential.id}/file`,
    );
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('application/pdf');
    const theirs = await sign(other);
    await theirs.agent
      .get(`/api/proctors/me/credentials/${ok.body.credential.id}/file`)
      .expect(404);
  });
});

describe('candidates', () => {
  it('ranks eligible proctors with reasons and lists the excluded with why', async () => {
    const w = await world();
    const near = await makeProctor(t.dataSource, { experience: { [w.modelId]: 38 } });
    const far = await makeProctor(t.dataSource, {
      home: homes.chicago,
      experience: { [w.modelId]: 120 },
      dayRate: 300_000,
      travelDayRate: 100_000,
    });
    const unlicensed = await makeProctor(t.dataSource, {
      experience: { [w.modelId]: 50 },
      licences: [{ jurisdiction: 'US-IL', validFrom: '2020-01-01', validTo: '2035-12-31' }],
    });
    const novice = await makeProctor(t.dataSource, { experience: { [w.modelId]: 5 } });
    const res = await w.buyer.agent
      .get(
        `/api/visits/candidates?siteId=${w.hospital.campusId}&modelId=${w.modelId}&from=${w.from}&to=${w.to}`,
      )
      .expect(200);
    const items = res.body.items as {
      proctorId: number;
      eligible: boolean;
      reasons: string[];
      exclusions: string[];
      travelDays: number;
      feeEstimate: { amount: number; currency: string };
      distanceKm: number;
    }[];
    const byId = (id: number) => items.find((i) => i.proctorId === id)!;
    expect(byId(near.userId)).toMatchObject({ eligible: true, travelDays: 0 });
    // Fee estimate = day rate × visit days + travel-day rate × travel days (issue 7).
    expect(byId(near.userId).feeEstimate).toEqual({ amount: 2 * 250_000, currency: 'USD' });
    expect(byId(far.userId)).toMatchObject({ eligible: true, travelDays: 2 });
    expect(byId(far.userId).feeEstimate.amount).toBe(2 * 300_000 + 2 * 100_000);
    expect(byId(near.userId).reasons.join(' ')).toMatch(/38 supervised cases/);
    expect(byId(unlicensed.userId).eligible).toBe(false);
    expect(byId(unlicensed.userId).exclusions.join(' ')).toMatch(/US-MA/);
    expect(byId(novice.userId).eligible).toBe(false);
    // Eligible ones come first.
    const firstIneligible = items.findIndex((i) => !i.eligible);
    expect(items.slice(firstIneligible).every((i) => !i.eligible)).toBe(true);

    const other = await makeHospital(t.dataSource);
    const stranger = await sign(other.buyer);
    await stranger.agent
      .get(
        `/api/visits/candidates?siteId=${w.hospital.campusId}&modelId=${w.modelId}&from=${w.from}&to=${w.to}`,
      )
      .expect(403);
    await w.buyer.agent
      .get(
        `/api/visits/candidates?siteId=${w.hospital.campusId}&modelId=${w.modelId}&from=${w.to}&to=${w.from}`,
      )
      .expect(400);
  });
});

describe('candidates after a change', () => {
  it('a repeated search sees a proctor’s new availability at once', async () => {
    const w = await world(200);
    const p = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const url = `/api/visits/candidates?siteId=${w.hospital.campusId}&modelId=${w.modelId}&from=${w.from}&to=${w.to}`;
    const before = await w.buyer.agent.get(url).expect(200);
    const mine = (r: {
      body: { items: { proctorId: number; eligible: boolean; exclusions: string[] }[] };
    }) => r.body.items.find((i) => i.proctorId === p.userId)!;
    expect(mine(before).eligible).toBe(true);
    const client = await sign(p);
    await client.agent
      .put('/api/proctors/me/availability')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({
        rules: [`DTSTART;TZID=America/New_York:20260103T080000\nRRULE:FREQ=WEEKLY;BYDAY=SA`],
        exceptions: [],
        blackouts: [],
      })
      .expect(200);
    const after = await w.buyer.agent.get(url).expect(200);
    expect(mine(after).eligible).toBe(false);
    expect(mine(after).exclusions.join(' ')).toMatch(/not in the availability pattern/);
  });
});

describe('request → offer → decline → next → accept', () => {
  it('offers one proctor at a time; a decline offers the next; accepting sends REQUEST invites', async () => {
    const w = await world();
    const first = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const second = await makeProctor(t.dataSource, { experience: { [w.modelId]: 30 } });
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [first.userId, second.userId] }),
    );
    expect(created.status).toBe(201);
    const visitId = created.body.visit.id as number;
    expect(created.body.visit.state).toBe('offered');
    expect(created.body.visit.currentOffer.proctorId).toBe(first.userId);
    expect(created.body.visit.reference).toMatch(/^PV-\d{4}-\d{6}$/);
    const deadline = Date.parse(created.body.visit.currentOffer.deadlineAt);
    const offeredAt = Date.parse(created.body.visit.currentOffer.offeredAt);
    expect(deadline - offeredAt).toBe(48 * 3_600_000);

    const secondClient = await sign(second);
    // The second proctor is queued: the visit is not theirs to see or answer yet.
    await secondClient.agent.get(`/api/visits/${visitId}`).expect(404);
    expect((await post(secondClient, `/api/visits/${visitId}/accept`)).status).toBe(404);

    const firstClient = await sign(first);
    const noReason = await post(firstClient, `/api/visits/${visitId}/decline`, {});
    expect(noReason.status).toBe(422);
    const declined = await post(firstClient, `/api/visits/${visitId}/decline`, {
      reason: 'Teaching that week.',
    });
    expect(declined.status).toBe(200);
    const afterDecline = await w.buyer.agent.get(`/api/visits/${visitId}`).expect(200);
    expect(afterDecline.body.visit.state).toBe('offered');
    expect(afterDecline.body.visit.currentOffer.proctorId).toBe(second.userId);
    expect(afterDecline.body.visit.offers.map((o: { state: string }) => o.state)).toEqual([
      'declined',
      'offered',
    ]);
    expect(afterDecline.body.visit.offers[0].reason).toBe('Teaching that week.');
    // A second answer from the first proctor is refused.
    expect((await post(firstClient, `/api/visits/${visitId}/accept`)).status).toBe(409);

    const accepted = await post(secondClient, `/api/visits/${visitId}/accept`);
    expect(accepted.status).toBe(200);
    expect(accepted.body.visit).toMatchObject({
      state: 'accepted',
      proctorId: second.userId,
      busyFrom: w.from,
      busyTo: w.to,
      travelDays: 0,
      feeEstimate: { amount: 500_000, currency: 'USD' },
    });
    // The hospital sees the whole trail; the accepting proctor only their own part of it.
    const trail = await w.buyer.agent.get(`/api/visits/${visitId}`).expect(200);
    const kinds = trail.body.visit.events.map((e: { kind: string }) => e.kind);
    expect(kinds).toEqual(['requested', 'offered', 'declined', 'offered', 'accepted']);
    const own = accepted.body.visit.events.map((e: { kind: string }) => e.kind);
    expect(own).toEqual(['requested', 'offered', 'accepted']);
    expect(accepted.body.visit.offers).toHaveLength(1);

    const mail = await outbox(visitId);
    const subjects = mail.map((m) => m.subject);
    expect(subjects.filter((s) => /offered to you/.test(s))).toHaveLength(2);
    expect(subjects.some((s) => /proctor declined/.test(s))).toBe(true);
    const invites = mail.filter((m) => m.dedupe_key.includes(':accepted:'));
    const to = invites.map((m) => (jsonColumn(m.to_addresses) as string[])[0]).sort();
    expect(to).toEqual([w.hospital.buyer.email, second.email].sort());
    for (const m of invites) {
      const ics = icsOf(m)!;
      // RFC 5546 §3.2.2: METHOD:REQUEST with ORGANIZER, ATTENDEE, DTSTAMP, DTSTART, SUMMARY, UID.
      expect(ics).toMatch(/METHOD:REQUEST/);
      for (const p of ['ORGANIZER', 'ATTENDEE', 'DTSTAMP', 'DTSTART', 'SUMMARY', 'UID:visit-'])
        expect(ics).toContain(p);
      expect(ics).toContain(`DTSTART;VALUE=DATE:${w.from.replaceAll('-', '')}`);
      // RFC 5545 §3.6.1: an all-day DTEND is exclusive (the day after the last day).
      expect(ics).toContain(`DTEND;VALUE=DATE:${addCalendarDays(w.to, 1).replaceAll('-', '')}`);
    }

    // Cancelling the accepted visit sends a CANCEL with a higher SEQUENCE.
    const cancelled = await post(w.buyer, `/api/visits/${visitId}/cancel`, {
      reason: 'Cases moved.',
    });
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.visit.state).toBe('cancelled');
    const cancels = (await outbox(visitId)).filter((m) => m.dedupe_key.includes(':cancelled:'));
    expect(cancels.length).toBe(2);
    for (const m of cancels) {
      const ics = icsOf(m)!;
      expect(ics).toMatch(/METHOD:CANCEL/);
      expect(ics).toMatch(/SEQUENCE:1/);
      expect(ics).toMatch(/STATUS:CANCELLED/);
    }
  });

  it('without picks Evalon lines up the top-ranked; all declining leaves it unfilled; the search widens', async () => {
    const w = await world(75);
    const a = await makeProctor(t.dataSource, { experience: { [w.modelId]: 60 } });
    const created = await post(w.buyer, '/api/visits', visitBody(w, { proctorIds: [a.userId] }));
    expect(created.status).toBe(201);
    const id = created.body.visit.id;
    const aClient = await sign(a);
    await post(aClient, `/api/visits/${id}/decline`, { reason: 'Away.' }).expect(200);
    const unfilled = await w.buyer.agent.get(`/api/visits/${id}`).expect(200);
    expect(unfilled.body.visit.state).toBe('unfilled');
    expect((await outbox(id)).some((m) => /no proctor could take it/.test(m.subject))).toBe(true);

    const b = await makeProctor(t.dataSource, { experience: { [w.modelId]: 25 } });
    const again = await post(w.buyer, `/api/visits/${id}/offers`, { proctorIds: [a.userId] });
    expect(again.status).toBe(422);
    const widened = await post(w.buyer, `/api/visits/${id}/offers`, { proctorIds: [b.userId] });
    expect(widened.status).toBe(200);
    expect(widened.body.visit.state).toBe('offered');
    expect(widened.body.visit.currentOffer.proctorId).toBe(b.userId);
  });

  it('bad input answers 4xx with field messages and writes nothing', async () => {
    const w = await world(90);
    const ok = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const novice = await makeProctor(t.dataSource, { experience: { [w.modelId]: 2 } });
    const visits = () => countRows(t.dataSource, 'visits', 'hospital_id = ?', [w.hospital.id]);
    const cases: [object, number, string?][] = [
      [{ to: addCalendarDays(w.from, -1) }, 422, 'to'],
      [{ proctorIds: [novice.userId] }, 422, 'proctorIds.0'],
      [{ proctorIds: [999_999_999] }, 422, 'proctorIds.0'],
      [{ proctorIds: [ok.userId, ok.userId] }, 422, 'proctorIds.1'],
      [{ modelId: 999_999_999 }, 422, 'modelId'],
      [{ loanId: 999_999_999 }, 422, 'loanId'],
      [{ from: '2020-01-06', to: '2020-01-07' }, 422, 'from'],
      [{ cases: 0 }, 422, 'cases'],
    ];
    for (const [extra, status, field] of cases) {
      const res = await post(w.buyer, '/api/visits', visitBody(w, extra));
      expect([res.status, extra]).toEqual([status, extra]);
      if (field) expect(Object.keys(res.body.error.details.fieldErrors)).toContain(field);
    }
    const other = await makeHospital(t.dataSource);
    const stranger = await sign(other.buyer);
    expect((await post(stranger, '/api/visits', visitBody(w))).status).toBe(403);
    expect(await visits()).toBe(0);

    // Another hospital's visit is not found; a proctor who is not offered cannot answer.
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [ok.userId] }),
    ).expect(201);
    await stranger.agent.get(`/api/visits/${created.body.visit.id}`).expect(404);
    expect(
      (await post(stranger, `/api/visits/${created.body.visit.id}/cancel`, { reason: 'Not mine.' }))
        .status,
    ).toBe(404);
    // The offered proctor sees the visit but the cancel belongs to the hospital.
    const okClient = await sign(ok);
    const proctorCancel = await post(okClient, `/api/visits/${created.body.visit.id}/cancel`, {
      reason: 'Not mine either.',
    });
    expect(proctorCancel.status).toBe(403);
    const noviceClient = await sign(novice);
    expect((await post(noviceClient, `/api/visits/${created.body.visit.id}/accept`)).status).toBe(
      404,
    );
  });
});

describe('correctness under contention', () => {
  it('20 simultaneous accepts of 20 overlapping offers: exactly 1 accepted, 19 × 409, 0 × 5xx', async () => {
    const w = await world(120);
    const p = await makeProctor(t.dataSource, { experience: { [w.modelId]: 80 } });
    const ids: number[] = [];
    for (let i = 0; i < 20; i++) {
      // Each visit starts 0–3 days after the first and lasts two days: all overlap the first.
      const from = addCalendarDays(w.from, i % 2);
      const res = await post(
        w.buyer,
        '/api/visits',
        visitBody(w, { from, to: addCalendarDays(from, 1), proctorIds: [p.userId] }),
      );
      expect(res.status).toBe(201);
      ids.push(res.body.visit.id);
    }
    const client = await sign(p);
    const answers = await Promise.all(ids.map((id) => post(client, `/api/visits/${id}/accept`)));
    const statuses = answers.map((r) => r.status);
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
    expect(statuses.filter((s) => s === 409)).toHaveLength(19);
    expect(statuses.filter((s) => s >= 500)).toHaveLength(0);
    const refused = answers.find((r) => r.status === 409)!;
    expect(refused.body.error.code).toBe('no_longer_eligible');
    expect(refused.body.error.message).toMatch(/already booked/i);
    expect(
      await countRows(t.dataSource, 'visits', "proctor_user_id = ? AND state = 'accepted'", [
        p.userId,
      ]),
    ).toBe(1);
  });

  it('the deadline job expires a lapsed offer once and offers the next, even with two runners', async () => {
    const w = await world(150);
    const a = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const b = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [a.userId, b.userId] }),
    ).expect(201);
    const id = created.body.visit.id as number;
    await t.dataSource.query(
      "UPDATE visit_offers SET deadline_at = ? WHERE visit_id = ? AND state = 'offered'",
      [new Date(Date.now() - 1000), id],
    );
    const deps = createVisitDeps({
      dataSource: t.dataSource,
      logger: createLogger('silent'),
      notifyVisitEvent: visitNotifierFromConfig(t.config),
    });
    const [one, two] = await Promise.all([runOfferDeadlines(deps), runOfferDeadlines(deps)]);
    expect(one + two).toBeGreaterThanOrEqual(1);
    const offers: { proctor_user_id: number; state: string }[] = await t.dataSource.query(
      'SELECT proctor_user_id, state FROM visit_offers WHERE visit_id = ? ORDER BY position',
      [id],
    );
    expect(offers.map((o) => o.state)).toEqual(['expired', 'offered']);
    expect(
      await countRows(t.dataSource, 'visit_events', "visit_id = ? AND kind = 'expired'", [id]),
    ).toBe(1);
    // A's late accept is refused; B can accept.
    expect((await post(await sign(a), `/api/visits/${id}/accept`)).status).toBe(409);
    expect((await post(await sign(b), `/api/visits/${id}/accept`)).status).toBe(200);
  });
});

describe('cases and sign-off', () => {
  /** A visit accepted today; `proctor` acts on the first visit day (the clock of `onTheDay`). */
  async function acceptedVisit(): Promise<{
    w: World;
    p: TestProctor;
    proctor: Client;
    id: number;
  }> {
    const w = await world(45);
    const p = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [p.userId] }),
    ).expect(201);
    await post(await sign(p), `/api/visits/${created.body.visit.id}/accept`).expect(200);
    clockAt = bostonMorning(w.from);
    return { w, p, proctor: await signOnTheDay(p), id: created.body.visit.id };
  }
  const ratings = {
    setup: 4,
    docking: 3,
    instrument_handling: 4,
    troubleshooting: 3,
    team_communication: 5,
  };

  it('refuses case notes with obvious patient identifiers (422, nothing written)', async () => {
    const { w, proctor, id } = await acceptedVisit();
    const trainee = w.hospital.clinician.userId;
    // HIPAA Safe Harbor, 45 CFR 164.514(b)(2): names, record numbers and dates tied to a person.
    for (const notes of [
      'Patient Smith tolerated the procedure.',
      'MRN 48213377, smooth docking.',
      'DOB 04/12/1961; port placement fine.',
    ]) {
      const res = await post(proctor, `/api/visits/${id}/cases`, {
        caseNumber: 1,
        traineeUserId: trainee,
        traineeRole: 'performed_supervised',
        ratings,
        notes,
      });
      expect(res.status).toBe(422);
      expect(res.body.error.details.fieldErrors).toHaveProperty('notes');
    }
    const notClinician = await post(proctor, `/api/visits/${id}/cases`, {
      caseNumber: 1,
      traineeUserId: w.hospital.buyer.userId,
      traineeRole: 'assisted',
      ratings,
    });
    expect(notClinician.status).toBe(422);
    const tooMany = await post(proctor, `/api/visits/${id}/cases`, {
      caseNumber: 4,
      traineeUserId: trainee,
      traineeRole: 'assisted',
      ratings,
    });
    expect(tooMany.status).toBe(422);
    expect(await countRows(t.dataSource, 'visit_cases', 'visit_id = ?', [id])).toBe(0);
    // The hospital cannot record cases.
    expect(
      (
        await post(w.buyer, `/api/visits/${id}/cases`, {
          caseNumber: 1,
          traineeUserId: trainee,
          traineeRole: 'assisted',
          ratings,
        })
      ).status,
    ).toBe(403);
  });

  it('three supervised cases, then the sign-off with a one-page PDF to the hospital', async () => {
    const { w, p, proctor, id } = await acceptedVisit();
    const trainee = w.hospital.clinician.userId;
    for (const caseNumber of [1, 2]) {
      await post(proctor, `/api/visits/${id}/cases`, {
        caseNumber,
        traineeUserId: trainee,
        traineeRole: 'performed_supervised',
        ratings,
        notes: 'Docking took two attempts; good team communication.',
      }).expect(201);
    }
    const duplicate = await post(proctor, `/api/visits/${id}/cases`, {
      caseNumber: 2,
      traineeUserId: trainee,
      traineeRole: 'performed_supervised',
      ratings,
    });
    expect(duplicate.status).toBe(409);
    const early = await post(proctor, `/api/visits/${id}/sign-offs`, { traineeUserId: trainee });
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe('threshold_not_reached');
    expect(early.body.error.message).toMatch(/2 of 3/);

    await post(proctor, `/api/visits/${id}/cases`, {
      caseNumber: 3,
      traineeUserId: trainee,
      traineeRole: 'performed_supervised',
      ratings,
    }).expect(201);
    const signed = await post(proctor, `/api/visits/${id}/sign-offs`, { traineeUserId: trainee });
    expect(signed.status).toBe(201);
    expect(signed.body.visit.state).toBe('signed_off');
    expect(signed.body.visit.signOffs).toHaveLength(1);
    expect(signed.body.visit.signOffs[0]).toMatchObject({ proctoredCases: 3, threshold: 3 });
    expect(signed.body.visit.signOffs[0].statement).toMatch(/Privileging remains the hospital/);
    const kinds = signed.body.visit.events.map((e: { kind: string }) => e.kind);
    expect(kinds.slice(-2)).toEqual(['completed', 'signed_off']);

    // The completed visit's cases feed the proctor's experience.
    const [exp] = await t.dataSource.query(
      'SELECT recorded_cases FROM proctor_experience WHERE proctor_user_id = ? AND model_id = ?',
      [p.userId, w.modelId],
    );
    expect(Number(exp.recorded_cases)).toBe(3);

    const pdf = await w.buyer.agent
      .get(`/api/visits/${id}/sign-offs/${signed.body.visit.signOffs[0].id}/pdf`)
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    const bytes = pdf.body as Buffer;
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    // One page: exactly one page object (ISO 32000-1 §7.7.3.3, /Type /Page).
    expect(bytes.toString('latin1').match(/\/Type \/Page\b/g)).toHaveLength(1);

    const mails = (await outbox(id)).filter((m) => m.dedupe_key.includes(':signed_off:'));
    const recipients = mails.map((m) => (jsonColumn(m.to_addresses) as string[])[0]);
    expect(recipients).toEqual(
      expect.arrayContaining([w.hospital.buyer.email, w.hospital.clinician.email]),
    );
    const attachments = jsonColumn(mails[0]!.attachments) as { contentType: string }[];
    expect(attachments.map((a) => a.contentType)).toContain('application/pdf');

    const again = await post(proctor, `/api/visits/${id}/sign-offs`, { traineeUserId: trainee });
    expect(again.status).toBe(409);
  });
});

describe('a proctor withdraws from an accepted visit', () => {
  it('before the first day: offer withdrawn, CANCEL to them, hospital told, the next one offered', async () => {
    const w = await world(50);
    const first = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const second = await makeProctor(t.dataSource, { experience: { [w.modelId]: 30 } });
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [first.userId, second.userId] }),
    ).expect(201);
    const id = created.body.visit.id as number;
    const firstClient = await sign(first);
    await post(firstClient, `/api/visits/${id}/accept`).expect(200);

    // A reason is required, at least 10 characters; nothing changes without one.
    const short = await post(firstClient, `/api/visits/${id}/withdraw`, { reason: 'Sorry.' });
    expect(short.status).toBe(422);
    expect(short.body.error.details.fieldErrors).toHaveProperty('reason');
    // The passed-over candidate (their offer closed as skipped) is not the visit's proctor.
    const secondClient = await sign(second);
    expect(
      (await post(secondClient, `/api/visits/${id}/withdraw`, { reason: 'Not my visit at all.' }))
        .status,
    ).toBe(403);
    const [still] = await t.dataSource.query(
      'SELECT state, proctor_user_id FROM visits WHERE id = ?',
      [id],
    );
    expect([still.state, Number(still.proctor_user_id)]).toEqual(['accepted', first.userId]);

    const reason = 'A family emergency keeps me at home that week.';
    const res = await post(firstClient, `/api/visits/${id}/withdraw`, { reason });
    expect(res.status).toBe(200);
    expect(res.body.visit.state).toBe('offered');

    // The hospital sees the next candidate offered, the withdrawn offer with its reason.
    const seen = (await w.buyer.agent.get(`/api/visits/${id}`).expect(200)).body.visit;
    expect(seen.currentOffer.proctorId).toBe(second.userId);
    expect(seen.offers.map((o: { state: string }) => o.state)).toEqual(['withdrawn', 'offered']);
    expect(seen.offers[0].reason).toBe(reason);
    expect(seen.events.map((e: { kind: string }) => e.kind)).toEqual([
      'requested',
      'offered',
      'accepted',
      'withdrawn',
      'offered',
    ]);
    const [row] = await t.dataSource.query(
      'SELECT state, proctor_user_id, busy_from, invite_sequence FROM visits WHERE id = ?',
      [id],
    );
    expect(row).toMatchObject({ state: 'offered', proctor_user_id: null, busy_from: null });
    expect(Number(row.invite_sequence)).toBe(1);

    // E-mail: the proctor gets the CANCEL naming only them; the requester the reason, no invite.
    const mail = await outbox(id);
    const withdrawn = mail.filter((m) => m.dedupe_key.includes(':withdrawn:'));
    const toProctor = withdrawn.find(
      (m) => (jsonColumn(m.to_addresses) as string[])[0] === first.email,
    )!;
    const ics = icsOf(toProctor)!;
    // RFC 5546 §3.2.5: METHOD:CANCEL, STATUS:CANCELLED, same UID, SEQUENCE above the REQUEST's.
    expect(ics).toMatch(/METHOD:CANCEL/);
    expect(ics).toMatch(/STATUS:CANCELLED/);
    expect(ics).toMatch(/SEQUENCE:1/);
    expect(ics).toContain(`UID:visit-${id}@`);
    expect(ics.match(/^ATTENDEE/gm)).toHaveLength(1);
    const toBuyer = withdrawn.find(
      (m) => (jsonColumn(m.to_addresses) as string[])[0] === w.hospital.buyer.email,
    )!;
    expect(toBuyer.subject).toMatch(/withdrew/);
    expect(toBuyer.text).toContain(reason);
    expect(icsOf(toBuyer)).toBeNull();
    expect(mail.some((m) => m.dedupe_key.startsWith(`visit:${id}:offered:${second.userId}:`))).toBe(
      true,
    );
    // In-app notice to the requester; an audit event in the hospital's trail.
    const notices = await t.dataSource.query(
      'SELECT title FROM notifications WHERE user_id = ? AND kind = ?',
      [w.hospital.buyer.userId, 'visit.withdrawn'],
    );
    expect(notices).toHaveLength(1);
    const audit = await t.dataSource.query(
      'SELECT actor_user_id, organisation_id, detail FROM audit_events WHERE action = ? AND subject = ?',
      ['visit.proctor_withdrew', `visit:${id}`],
    );
    expect(audit).toHaveLength(1);
    expect(Number(audit[0].organisation_id)).toBe(w.hospital.id);
    expect(Number(audit[0].actor_user_id)).toBe(first.userId);

    // The next proctor accepts: their REQUEST supersedes the CANCEL (SEQUENCE 2, RFC 5545
    // §3.8.7.4), and the requester hears of this acceptance too.
    await post(secondClient, `/api/visits/${id}/accept`).expect(200);
    const accepted = (await outbox(id)).filter((m) =>
      m.dedupe_key.startsWith(`visit:${id}:accepted:${second.userId}:`),
    );
    expect(accepted.map((m) => (jsonColumn(m.to_addresses) as string[])[0]).sort()).toEqual(
      [w.hospital.buyer.email, second.email].sort(),
    );
    for (const m of accepted) expect(icsOf(m)).toMatch(/SEQUENCE:2/);
    // The first proctor is no longer the visit's: a second withdrawal is refused.
    expect((await post(firstClient, `/api/visits/${id}/withdraw`, { reason })).status).toBe(403);
  });

  it('with nobody left the visit is unfilled; from the first visit day on it is refused (409)', async () => {
    const w = await world(55);
    const only = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const a = await post(w.buyer, '/api/visits', visitBody(w, { proctorIds: [only.userId] }));
    const id = a.body.visit.id as number;
    await post(await sign(only), `/api/visits/${id}/accept`).expect(200);

    // On the first visit day (Boston morning) the withdrawal is refused and nothing changes.
    clockAt = bostonMorning(w.from);
    const onDay = await post(await signOnTheDay(only), `/api/visits/${id}/withdraw`, {
      reason: 'My flight was cancelled this morning.',
    });
    expect(onDay.status).toBe(409);
    expect(onDay.body.error.code).toBe('visit_started');
    expect(onDay.body.error.message).toContain(`started on ${w.from}`);
    // The evening before (23:30 in Boston, already the first day in UTC) is still before it.
    clockAt = new Date(`${w.from}T04:30:00Z`);
    const eve = await post(await signOnTheDay(only), `/api/visits/${id}/withdraw`, {
      reason: 'My flight was cancelled this evening.',
    });
    expect(eve.status).toBe(200);
    expect(eve.body.visit.state).toBe('unfilled');
    const [offer] = await t.dataSource.query(
      'SELECT state FROM visit_offers WHERE visit_id = ? AND proctor_user_id = ?',
      [id, only.userId],
    );
    expect(offer.state).toBe('withdrawn');
    expect((await outbox(id)).some((m) => /no proctor could take it/.test(m.subject))).toBe(true);
  });
});

describe('cases only on visit days', () => {
  it('before the first day 422 naming the day; on it 201; after cancellation 409', async () => {
    const w = await world(40);
    const p = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [p.userId] }),
    ).expect(201);
    const id = created.body.visit.id as number;
    await post(await sign(p), `/api/visits/${id}/accept`).expect(200);
    const caseBody = (caseNumber: number) => ({
      caseNumber,
      traineeUserId: w.hospital.clinician.userId,
      traineeRole: 'observed',
      ratings: {
        setup: 3,
        docking: 3,
        instrument_handling: 3,
        troubleshooting: 3,
        team_communication: 3,
      },
    });

    // The day before the first visit day, at 18:00 in Boston.
    clockAt = new Date(`${addCalendarDays(w.from, -1)}T23:00:00Z`);
    const early = await post(await signOnTheDay(p), `/api/visits/${id}/cases`, caseBody(1));
    expect(early.status).toBe(422);
    expect(early.body.error.code).toBe('before_visit');
    expect(early.body.error.message).toBe(
      `Cases can be recorded from ${w.from}, the visit’s first day (America/New_York).`,
    );
    expect(await countRows(t.dataSource, 'visit_cases', 'visit_id = ?', [id])).toBe(0);

    clockAt = bostonMorning(w.from);
    const onDay = await signOnTheDay(p);
    await post(onDay, `/api/visits/${id}/cases`, caseBody(1)).expect(201);
    await post(w.buyer, `/api/visits/${id}/cancel`, { reason: 'The loan was called off.' }).expect(
      200,
    );
    const after = await post(onDay, `/api/visits/${id}/cases`, caseBody(2));
    expect(after.status).toBe(409);
    expect(after.body.error.code).toBe('visit_cancelled');
    expect(await countRows(t.dataSource, 'visit_cases', 'visit_id = ?', [id])).toBe(1);
  });
});

describe('a clinician’s training record', () => {
  it('shows only their own cases, the count against the threshold and the sign-off PDF', async () => {
    const w = await world(42);
    const p = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const peer = await makePerson(t.dataSource, w.hospital.id, 'clinician');
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [p.userId], cases: 5 }),
    ).expect(201);
    const id = created.body.visit.id as number;
    await post(await sign(p), `/api/visits/${id}/accept`).expect(200);
    const me = w.hospital.clinician;
    const clinician = await sign(me);

    // No cases yet: an empty record, not an error.
    const empty = await clinician.agent.get('/api/visits/training-record').expect(200);
    expect(empty.body).toEqual({
      trainee: { userId: me.userId, name: expect.any(String) },
      progress: [],
      visits: [],
    });

    clockAt = bostonMorning(w.from);
    const proctor = await signOnTheDay(p);
    const record = (caseNumber: number, traineeUserId: number, traineeRole: string) =>
      post(proctor, `/api/visits/${id}/cases`, {
        caseNumber,
        traineeUserId,
        traineeRole,
        ratings: {
          setup: caseNumber,
          docking: 3,
          instrument_handling: 4,
          troubleshooting: 3,
          team_communication: 5,
        },
      }).expect(201);
    await record(1, me.userId, 'observed');
    await record(2, peer.userId, 'performed_supervised');
    await record(3, me.userId, 'performed_supervised');
    await record(4, me.userId, 'performed_supervised');

    const mid = (await clinician.agent.get('/api/visits/training-record').expect(200)).body;
    expect(mid.visits).toHaveLength(1);
    expect(mid.visits[0]).toMatchObject({ visitId: id, state: 'accepted', signOff: null });
    // Only their own cases: 1, 3 and 4, never the peer's case 2.
    expect(mid.visits[0].cases.map((c: { caseNumber: number }) => c.caseNumber)).toEqual([1, 3, 4]);
    expect(mid.visits[0].cases[0]).toMatchObject({
      traineeRole: 'observed',
      ratings: { setup: 1, team_communication: 5 },
    });
    // Observed cases do not count; the hospital's default threshold is 3 (survey mean 3.24,
    // docs/references.md).
    expect(mid.progress).toEqual([
      expect.objectContaining({
        hospitalId: w.hospital.id,
        modelId: w.modelId,
        supervisedCases: 2,
        threshold: 3,
        signedOff: false,
      }),
    ]);

    await record(5, me.userId, 'performed_supervised');
    const signed = await post(proctor, `/api/visits/${id}/sign-offs`, {
      traineeUserId: me.userId,
    }).expect(201);
    const after = (await clinician.agent.get('/api/visits/training-record').expect(200)).body;
    expect(after.progress[0]).toMatchObject({ supervisedCases: 3, signedOff: true });
    const signOff = after.visits[0].signOff;
    expect(signOff).toMatchObject({ proctoredCases: 3, threshold: 3 });
    expect(signOff.id).toBe(signed.body.visit.signOffs[0].id);
    const pdf = await clinician.agent.get(signOff.pdfUrl).buffer(true);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');

    // The peer sees their own single case; buyers and proctors have no training record.
    const peerRecord = (await (await sign(peer)).agent.get('/api/visits/training-record')).body;
    expect(peerRecord.visits[0].cases.map((c: { caseNumber: number }) => c.caseNumber)).toEqual([
      2,
    ]);
    expect(peerRecord.progress[0]).toMatchObject({ supervisedCases: 1, signedOff: false });
    await w.buyer.agent.get('/api/visits/training-record').expect(403);
    await (await sign(p)).agent.get('/api/visits/training-record').expect(403);
  });
});

describe('visit settings', () => {
  it('a lender sets a model’s minimum supervised cases; matching uses it; bad values are refused', async () => {
    const lender = await makeLender(t.dataSource, places.eastDepot);
    const other = await makeLender(t.dataSource, places.eastDepot);
    const hospital = await makeHospital(t.dataSource, places.bostonCampus);
    await setSubdivision(t.dataSource, hospital.campusId, 'US-MA');
    const modelId = await makeModel(t.dataSource, lender.id);
    const p = await makeProctor(t.dataSource, { experience: { [modelId]: 15 } });
    const fleet = await sign(lender.fleet);
    const buyer = await sign(hospital.buyer);
    const from = mondayAfter(65);
    const candidate = async () => {
      const res = await buyer.agent
        .get('/api/visits/candidates')
        .query({ siteId: hospital.campusId, modelId, from, to: addCalendarDays(from, 1) })
        .expect(200);
      return (
        res.body.items as { proctorId: number; eligible: boolean; exclusions: string[] }[]
      ).find((c) => c.proctorId === p.userId)!;
    };
    // Default 20 (product assumption, docs/references.md): 15 cases are not enough.
    const before = await candidate();
    expect(before.eligible).toBe(false);
    expect(before.exclusions.join(' ')).toMatch(/20/);
    const settings = await fleet.agent.get(`/api/visits/settings/lenders/${lender.id}`).expect(200);
    expect(settings.body.lenderDefault).toBe(20);
    expect(settings.body.models).toEqual([
      expect.objectContaining({ modelId, minSupervisedCases: null, effective: 20 }),
    ]);

    const put = (client: Client, path: string, body: object) =>
      client.agent.put(path).set('X-XSRF-TOKEN', client.csrf).send(body);
    const path = `/api/visits/settings/models/${modelId}`;
    for (const bad of [10.5, -1, 501, 'ten']) {
      const res = await put(fleet, path, { minSupervisedCases: bad });
      expect([bad, res.status]).toEqual([bad, 422]);
      expect(res.body.error.details.fieldErrors.minSupervisedCases[0]).toMatch(
        /whole number|from 0 to 500/,
      );
    }
    expect(await countRows(t.dataSource, 'visit_model_settings', 'model_id = ?', [modelId])).toBe(
      0,
    );
    // Another lender's fleet manager: 403 before the body is read; unknown model 404.
    expect((await put(await sign(other.fleet), path, { minSupervisedCases: 'x' })).status).toBe(
      403,
    );
    expect(
      (await put(fleet, '/api/visits/settings/models/999999999', { minSupervisedCases: 5 })).status,
    ).toBe(404);
    expect((await put(buyer, path, { minSupervisedCases: 5 })).status).toBe(403);

    const ok = await put(fleet, path, { minSupervisedCases: 10 });
    expect(ok.status).toBe(200);
    expect(ok.body.models[0]).toMatchObject({ minSupervisedCases: 10, effective: 10 });
    expect((await candidate()).eligible).toBe(true);
    const [audit] = await t.dataSource.query(
      'SELECT organisation_id, detail FROM audit_events WHERE action = ? AND subject = ?',
      ['visit_settings.min_supervised_cases', `model:${modelId}`],
    );
    expect(Number(audit.organisation_id)).toBe(lender.id);
    expect(jsonColumn(audit.detail)).toMatchObject({ from: null, to: 10 });

    // Null returns the model to the lender's default.
    const reset = await put(fleet, path, { minSupervisedCases: null });
    expect(reset.body.models[0]).toMatchObject({ minSupervisedCases: null, effective: 20 });
    expect((await candidate()).eligible).toBe(false);
  });

  it('a hospital sets its sign-off threshold (1–10); the next sign-off uses it', async () => {
    const w = await world(47);
    const other = await makeHospital(t.dataSource);
    const put = (client: Client, body: object, id = w.hospital.id) =>
      client.agent
        .put(`/api/visits/settings/hospitals/${id}`)
        .set('X-XSRF-TOKEN', client.csrf)
        .send(body);
    const got = await w.buyer.agent
      .get(`/api/visits/settings/hospitals/${w.hospital.id}`)
      .expect(200);
    // Default 3 (policy default; survey mean 3.24 ± 1.69, range 1–10, docs/references.md).
    expect(got.body.signOffThreshold).toBe(3);
    for (const bad of [0, 11, 2.5]) {
      const res = await put(w.buyer, { signOffThreshold: bad });
      expect([bad, res.status]).toEqual([bad, 422]);
      expect(res.body.error.details.fieldErrors.signOffThreshold[0]).toMatch(
        /whole number|from 1 to 10/,
      );
    }
    expect((await put(await sign(other.buyer), { signOffThreshold: 2 })).status).toBe(403);
    expect((await put(await sign(w.hospital.clinician), { signOffThreshold: 2 })).status).toBe(403);
    const [unchanged] = await t.dataSource.query(
      'SELECT sign_off_threshold AS n FROM organisations WHERE id = ?',
      [w.hospital.id],
    );
    expect(Number(unchanged.n)).toBe(3);

    const ok = await put(w.buyer, { signOffThreshold: 2 });
    expect(ok.status).toBe(200);
    expect(ok.body.signOffThreshold).toBe(2);
    const audits = await t.dataSource.query(
      'SELECT detail FROM audit_events WHERE action = ? AND organisation_id = ?',
      ['visit_settings.sign_off_threshold', w.hospital.id],
    );
    expect(audits.map((a: { detail: unknown }) => jsonColumn(a.detail))).toEqual([
      { from: 3, to: 2 },
    ]);

    // Two cases performed under supervision now suffice for a sign-off.
    const p = await makeProctor(t.dataSource, { experience: { [w.modelId]: 40 } });
    const created = await post(
      w.buyer,
      '/api/visits',
      visitBody(w, { proctorIds: [p.userId] }),
    ).expect(201);
    const id = created.body.visit.id as number;
    await post(await sign(p), `/api/visits/${id}/accept`).expect(200);
    clockAt = bostonMorning(w.from);
    const proctor = await signOnTheDay(p);
    for (const caseNumber of [1, 2]) {
      await post(proctor, `/api/visits/${id}/cases`, {
        caseNumber,
        traineeUserId: w.hospital.clinician.userId,
        traineeRole: 'performed_supervised',
        ratings: {
          setup: 4,
          docking: 4,
          instrument_handling: 4,
          troubleshooting: 4,
          team_communication: 4,
        },
      }).expect(201);
    }
    const signed = await post(proctor, `/api/visits/${id}/sign-offs`, {
      traineeUserId: w.hospital.clinician.userId,
    });
    expect(signed.status).toBe(201);
    expect(signed.body.visit.signOffs[0]).toMatchObject({ proctoredCases: 2, threshold: 2 });
  });
});

describe('credential warnings', () => {
  it('warns once, 60 days ahead, by e-mail and in-app; the profile shows the credential as expiring', async () => {
    const soon = addCalendarDays(new Date().toISOString().slice(0, 10), 30);
    const later = addCalendarDays(new Date().toISOString().slice(0, 10), 90);
    const p = await makeProctor(t.dataSource, {
      licences: [
        { jurisdiction: 'US-MA', validFrom: '2020-01-01', validTo: soon },
        { jurisdiction: 'US-NY', validFrom: '2020-01-01', validTo: later },
      ],
    });
    const deps = {
      dataSource: t.dataSource,
      now: () => new Date(),
      notify: credentialNotifierFromConfig(t.config),
    };
    await runCredentialWarnings(deps);
    await runCredentialWarnings(deps);
    const mails: { subject: string }[] = await t.dataSource.query(
      'SELECT subject FROM outbox_messages WHERE to_addresses LIKE ?',
      [`%${p.email}%`],
    );
    expect(mails).toHaveLength(1);
    expect(mails[0]!.subject).toContain(soon);
    expect(
      await countRows(
        t.dataSource,
        'notifications',
        "user_id = ? AND kind = 'credential.expiring'",
        [p.userId],
      ),
    ).toBe(1);
    const profile = await (await sign(p)).agent.get('/api/proctors/me').expect(200);
    const statuses = profile.body.profile.credentials.map(
      (c: { jurisdiction: string; status: string }) => [c.jurisdiction, c.status],
    );
    expect(statuses).toEqual([
      ['US-MA', 'expiring'],
      ['US-NY', 'valid'],
    ]);
  });
});
