import ICAL from 'ical.js';
import type { NotifyLoanEvent as LoansHook } from '../src/loans/domain/notifications';
import {
  defaultDepositDueBy,
  loanNotifierFromConfig,
  parseReceivingHours,
  type NotifyLoanEvent,
} from '../src/notifications/domain/loan-notifications';
import { OutboxWorker } from '../src/notifications/domain/outbox-worker';
import { createLogger } from '../src/logger';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson, unique, type TestPerson } from './helpers/factories';
import { RecordingMailer } from './helpers/recording-mailer';

// Loan e-mails and notifications against the real loans tables (rows written with SQL here,
// since the loans component has no factories yet), rendered by @evalon/messages and read back
// with ical.js, a general-purpose iCalendar parser this project did not write.
let t: TestApp;
let notify: NotifyLoanEvent;

beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
  notify = loanNotifierFromConfig(t.config);
});
afterAll(() => t.close());

// The loans component's hook type accepts this notifier as it is (checked by the compiler).
const asLoansHook = (n: NotifyLoanEvent): LoansHook => n;

// An invented loan (demo-data style). Milestones as in packages/messages' test loan, whose
// hospital is in New York; February 2027 is standard time in every zone used here (the 2027
// changes are 2027-03-14 in the US and 2027-03-28 in the EU: docs/references.md).
const M = {
  shipBy: '2027-03-08',
  deliverBy: '2027-03-11',
  useFrom: '2027-03-15',
  useTo: '2027-03-19',
  returnShipBy: '2027-03-22',
  backAtDepot: '2027-03-25',
  readyAgain: '2027-03-29',
};

interface Fixture {
  loanId: number;
  reference: string;
  buyer: TestPerson;
  clinician: TestPerson;
  formerClinician: TestPerson;
  fleetBerlin: TestPerson;
  fleetDefault: TestPerson;
  coordinator: TestPerson;
}

async function makeLoan(
  state: string,
  events: { from: string | null; to: string; at: string }[] = [],
): Promise<Fixture> {
  const q = (sql: string, params: unknown[]) => t.dataSource.query(sql, params);
  const now = new Date();
  const hospital = await makeOrganisation(t.dataSource, 'hospital');
  const lender = await makeOrganisation(t.dataSource, 'lender');
  const site = async (orgId: number, kind: string, zone: string, hours: string | null) =>
    Number(
      (
        await q(
          `INSERT INTO sites (organisation_id, kind, name, address_line, city, postal_code, region, country,
             latitude, longitude, time_zone, receiving_hours, cutoff_time, created_at)
           VALUES (?, ?, ?, '100 Harbor Road', 'Portwell', '10001', 'NY', 'US', 40.7, -74.0, ?, ?, ?, ?)`,
          [orgId, kind, `Site ${unique()}`, zone, hours, kind === 'depot' ? '15:00' : null, now],
        )
      ).insertId,
    );
  const campus = await site(hospital.id, 'campus', 'America/New_York', 'Mon–Fri 07:00–15:00');
  const depot = await site(lender.id, 'depot', 'America/Los_Angeles', null);
  const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
  const clinician = await makePerson(t.dataSource, hospital.id, 'clinician');
  const formerClinician = await makePerson(t.dataSource, hospital.id, 'clinician', {
    active: false,
  });
  const fleetBerlin = await makePerson(t.dataSource, lender.id, 'fleet_manager');
  const fleetDefault = await makePerson(t.dataSource, lender.id, 'fleet_manager');
  const coordinator = await makePerson(t.dataSource, lender.id, 'coordinator');
  await q('UPDATE users SET time_zone = ? WHERE id = ?', ['Europe/Berlin', fleetBerlin.userId]);
  await q('UPDATE users SET time_zone = ? WHERE id = ?', ['America/Chicago', clinician.userId]);

  const modelId = Number(
    (
      await q(
        `INSERT INTO models (lender_id, name, category, description, list_value, currency,
           deposit_percent_bps, deposit_min, deposit_max, created_at, updated_at)
         VALUES (?, ?, 'robotic_platform', 'Invented model.', 100000000, 'USD', 250, 0, 1000000, ?, ?)`,
        [lender.id, `Calder arm ${unique()}`, now, now],
      )
    ).insertId,
  );
  const unitId = Number(
    (
      await q(
        `INSERT INTO units (model_id, serial_number, home_depot_id, status, created_at, updated_at)
         VALUES (?, ?, ?, 'active', ?, ?)`,
        [modelId, `CA-${unique()}`, depot, now, now],
      )
    ).insertId,
  );
  const reference = `EV-${unique()}`.slice(0, 20);
  const loanId = Number(
    (
      await q(
        `INSERT INTO loans (reference, state, hospital_id, site_id, site_time_zone, lender_id,
           use_from, use_to, ship_by, deliver_by, return_ship_by, back_at_depot, ready_again,
           deposit_amount, deposit_currency, note, requested_by_user_id, created_at, updated_at)
         VALUES (?, ?, ?, ?, 'America/New_York', ?, ?, ?, ?, ?, ?, ?, ?, 250000, 'USD', ?, ?, ?, ?)`,
        [
          reference,
          state,
          hospital.id,
          campus,
          lender.id,
          M.useFrom,
          M.useTo,
          M.shipBy,
          M.deliverBy,
          M.returnShipBy,
          M.backAtDepot,
          M.readyAgain,
          'Cases are booked in OR 4.',
          buyer.userId,
          new Date('2027-02-01T14:00:00Z'),
          now,
        ],
      )
    ).insertId,
  );
  await q(
    `INSERT INTO loan_units (loan_id, unit_id, hospital_id, model_id, depot_id, depot_time_zone,
       ship_by, deliver_by, use_from, use_to, return_ship_by, back_at_depot, ready_again, deposit_amount)
     VALUES (?, ?, ?, ?, ?, 'America/Los_Angeles', ?, ?, ?, ?, ?, ?, ?, 250000)`,
    [
      loanId,
      unitId,
      hospital.id,
      modelId,
      depot,
      M.shipBy,
      M.deliverBy,
      M.useFrom,
      M.useTo,
      M.returnShipBy,
      M.backAtDepot,
      M.readyAgain,
    ],
  );
  for (const e of events) {
    await q(
      'INSERT INTO loan_events (loan_id, at, actor_user_id, from_state, to_state) VALUES (?, ?, ?, ?, ?)',
      [loanId, new Date(e.at), buyer.userId, e.from, e.to],
    );
  }
  return {
    loanId,
    reference,
    buyer,
    clinician,
    formerClinician,
    fleetBerlin,
    fleetDefault,
    coordinator,
  };
}

interface OutboxRow {
  to: string;
  subject: string;
  text: string;
  html: string;
  attachments: { filename: string; contentType: string; contentBase64: string }[] | null;
  dedupeKey: string;
}

async function outboxFor(loanId: number): Promise<OutboxRow[]> {
  const rows: {
    to_addresses: string | string[];
    subject: string;
    text: string;
    html: string;
    attachments: string | null;
    dedupe_key: string;
  }[] = await t.dataSource.query(
    'SELECT to_addresses, subject, text, html, attachments, dedupe_key FROM outbox_messages WHERE dedupe_key LIKE ? ORDER BY id',
    [`loan:${loanId}:%`],
  );
  const json = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);
  return rows.map((r) => ({
    to: (json(r.to_addresses) as string[])[0]!,
    subject: r.subject,
    text: r.text,
    html: r.html,
    attachments: json(r.attachments) as OutboxRow['attachments'],
    dedupeKey: r.dedupe_key,
  }));
}

async function notifiedUsers(loanId: number): Promise<{ user_id: number; kind: string }[]> {
  return t.dataSource.query(
    'SELECT user_id, kind, title, link FROM notifications WHERE dedupe_key LIKE ? ORDER BY user_id',
    [`loan:${loanId}:%`],
  );
}

function ics(row: OutboxRow): ICAL.Component {
  const attachment = row.attachments?.[0];
  if (!attachment) throw new Error(`no attachment on the e-mail to ${row.to}`);
  return new ICAL.Component(ICAL.parse(Buffer.from(attachment.contentBase64, 'base64').toString()));
}

function attendeesOf(calendar: ICAL.Component): string[] {
  const event = calendar.getAllSubcomponents('vevent')[0]!;
  return event
    .getAllProperties('attendee')
    .map((p) => String(p.getFirstValue()).replace(/^mailto:/i, ''))
    .sort();
}

describe('notifyLoanEvent', () => {
  it('requested: e-mails each active fleet manager in their own zone (else the depot’s) and notifies them in the app', async () => {
    const f = await makeLoan('requested', [
      { from: null, to: 'requested', at: '2027-02-01T14:00:00Z' },
    ]);
    await t.dataSource.transaction((m) =>
      asLoansHook(notify)(m, { loanId: f.loanId, event: 'requested', actorUserId: f.buyer.userId }),
    );
    const rows = await outboxFor(f.loanId);
    expect(rows.map((r) => r.to).sort()).toEqual(
      [f.fleetBerlin.email, f.fleetDefault.email].sort(),
    );
    for (const r of rows) {
      expect(r.subject).toMatch(new RegExp(`^New loan request ${f.reference} from Test hospital`));
      expect(r.text).toContain(`/loans/${f.loanId}`);
    }
    // "Requested on" 2027-02-01 14:00Z: Berlin is UTC+1 in February (CET), Los Angeles UTC−8
    // (PST) — IANA tz; en-US writes Berlin's short zone name as GMT+1.
    const berlin = rows.find((r) => r.to === f.fleetBerlin.email)!;
    const depotZone = rows.find((r) => r.to === f.fleetDefault.email)!;
    expect(berlin.text).toContain('February 1, 2027 at 3:00 PM GMT+1');
    expect(depotZone.text).toContain('February 1, 2027 at 6:00 AM PST');
    expect(rows.map((r) => r.dedupeKey).sort()).toEqual(
      [
        `loan:${f.loanId}:requested:user:${f.fleetBerlin.userId}`,
        `loan:${f.loanId}:requested:user:${f.fleetDefault.userId}`,
      ].sort(),
    );
    const notified = await notifiedUsers(f.loanId);
    expect(notified).toEqual(
      [f.fleetBerlin.userId, f.fleetDefault.userId]
        .sort((a, b) => a - b)
        .map((id) => ({
          user_id: id,
          kind: 'loan.requested',
          title: `New loan request ${f.reference}`,
          link: `/loans/${f.loanId}`,
        })),
    );
    // The notice writes the first case day as the web app does, not as an ISO date: 2027-03-15
    // is a Monday (the US clocks change on Sunday 2027-03-14, 15 U.S.C. 260a).
    const [body] = await t.dataSource.query(
      'SELECT body FROM notifications WHERE dedupe_key LIKE ? LIMIT 1',
      [`loan:${f.loanId}:%`],
    );
    expect(body.body).toContain('first case day Mon, Mar 15, 2027.');
    expect(body.body).not.toMatch(/\d{4}-\d{2}-\d{2}/);
  });

  it('approved: e-mails the buyers the deposit link and the deadline in their zone (campus zone by default)', async () => {
    const f = await makeLoan('approved', [
      { from: null, to: 'requested', at: '2027-02-01T14:00:00Z' },
      { from: 'requested', to: 'approved', at: '2027-02-02T10:00:00Z' },
    ]);
    await t.dataSource.transaction((m) =>
      notify(m, { loanId: f.loanId, event: 'approved', actorUserId: f.fleetBerlin.userId }),
    );
    const rows = await outboxFor(f.loanId);
    expect(rows.map((r) => r.to)).toEqual([f.buyer.email]);
    const [mail] = rows;
    expect(mail!.text).toContain(`${t.config.http.publicUrl}/loans/${f.loanId}`);
    expect(mail!.html).toContain(`href="${t.config.http.publicUrl}/loans/${f.loanId}"`);
    // Deadline: approval 2027-02-02 10:00Z + 72 h = 2027-02-05 10:00Z (before the ship-by day),
    // shown in New York, UTC−5 in February (EST).
    expect(mail!.text).toContain('February 5, 2027 at 5:00 AM EST');
    expect(mail!.subject).toBe(
      `Loan ${f.reference} approved: deposit of $2,500.00 due by Feb 5, 2027, 5:00 AM EST`,
    );
  });

  it('confirmed: buyers, the campus’s clinicians and the lender’s coordinators get the .ics; a replay adds nothing', async () => {
    const f = await makeLoan('confirmed', [
      { from: 'approved', to: 'confirmed', at: '2027-02-03T09:00:00Z' },
    ]);
    await t.dataSource.transaction((m) => notify(m, { loanId: f.loanId, event: 'confirmed' }));
    const rows = await outboxFor(f.loanId);
    expect(rows.map((r) => r.to).sort()).toEqual(
      [f.buyer.email, f.clinician.email, f.coordinator.email].sort(),
    );
    for (const r of rows) {
      expect(r.attachments).toHaveLength(1);
      expect(r.attachments![0]!.contentType).toBe('text/calendar; charset=utf-8; method=REQUEST');
      const calendar = ics(r);
      expect(calendar.getFirstPropertyValue('method')).toBe('REQUEST');
      const uids = calendar
        .getAllSubcomponents('vevent')
        .map((e) => e.getFirstPropertyValue('uid'))
        .sort();
      expect(uids).toEqual(
        [`loan-${f.loanId}-delivery@evalon.example`, `loan-${f.loanId}-use@evalon.example`].sort(),
      );
      expect(attendeesOf(calendar)).toEqual(
        [f.buyer.email, f.clinician.email, f.coordinator.email].sort(),
      );
      const organizer = calendar
        .getAllSubcomponents('vevent')[0]!
        .getFirstPropertyValue('organizer');
      expect(String(organizer).toLowerCase()).toBe('mailto:no-reply@evalon.example');
      expect(calendar.getAllSubcomponents('vevent')[0]!.getFirstPropertyValue('sequence')).toBe(0);
    }
    // Replay of the same event (e.g. a retried request): no second e-mail, no second notice.
    await t.dataSource.transaction((m) => notify(m, { loanId: f.loanId, event: 'confirmed' }));
    expect(await outboxFor(f.loanId)).toHaveLength(3);
    expect(await notifiedUsers(f.loanId)).toHaveLength(3);
  });

  it('cancelled after confirmation: buyers, fleet managers and every invitee get a METHOD:CANCEL with a higher SEQUENCE', async () => {
    const f = await makeLoan('cancelled', [
      { from: 'approved', to: 'confirmed', at: '2027-02-03T09:00:00Z' },
      { from: 'confirmed', to: 'cancelled', at: '2027-02-04T09:00:00Z' },
    ]);
    await t.dataSource.transaction((m) =>
      notify(m, {
        loanId: f.loanId,
        event: 'cancelled',
        actorUserId: f.buyer.userId,
        reason: 'Surgeon unavailable that week.',
      }),
    );
    const rows = await outboxFor(f.loanId);
    expect(rows.map((r) => r.to).sort()).toEqual(
      [
        f.buyer.email,
        f.clinician.email,
        f.coordinator.email,
        f.fleetBerlin.email,
        f.fleetDefault.email,
      ].sort(),
    );
    for (const r of rows) {
      expect(r.subject).toBe(`Loan ${f.reference} cancelled`);
      expect(r.text).toContain(`cancelled by ${f.buyer.name}`);
      expect(r.text).toContain('Surgeon unavailable that week.');
      const calendar = ics(r);
      expect(calendar.getFirstPropertyValue('method')).toBe('CANCEL');
      expect(calendar.getAllSubcomponents('vevent')[0]!.getFirstPropertyValue('sequence')).toBe(1);
    }
  });

  it('declined and expired: buyers and fleet managers, with the reason or the cause', async () => {
    const declined = await makeLoan('declined');
    await t.dataSource.transaction((m) =>
      notify(m, {
        loanId: declined.loanId,
        event: 'declined',
        actorUserId: declined.fleetBerlin.userId,
        reason: 'Unit is booked for a trade show.',
      }),
    );
    const d = await outboxFor(declined.loanId);
    expect(d.map((r) => r.to).sort()).toEqual(
      [declined.buyer.email, declined.fleetBerlin.email, declined.fleetDefault.email].sort(),
    );
    expect(d.every((r) => r.text.includes('Unit is booked for a trade show.'))).toBe(true);
    expect(d.every((r) => !r.attachments)).toBe(true);

    const expired = await makeLoan('expired', [
      { from: 'requested', to: 'approved', at: '2027-02-02T10:00:00Z' },
      { from: 'approved', to: 'expired', at: '2027-02-05T10:00:00Z' },
    ]);
    await t.dataSource.transaction((m) => notify(m, { loanId: expired.loanId, event: 'expired' }));
    const e = await outboxFor(expired.loanId);
    expect(e).toHaveLength(3);
    const buyerMail = e.find((r) => r.to === expired.buyer.email)!;
    expect(buyerMail.text).toContain('The deposit was not secured by the deadline.');
    // 2027-02-05 10:00Z in New York (EST, UTC−5).
    expect(buyerMail.text).toContain('February 5, 2027 at 5:00 AM EST');
  });

  it('writes nothing when the loan change rolls back, and the worker sends what committed', async () => {
    const f = await makeLoan('requested');
    await expect(
      t.dataSource.transaction(async (m) => {
        await notify(m, { loanId: f.loanId, event: 'requested' });
        throw new Error('the approval failed');
      }),
    ).rejects.toThrow('the approval failed');
    expect(await outboxFor(f.loanId)).toHaveLength(0);
    expect(await notifiedUsers(f.loanId)).toHaveLength(0);

    await t.dataSource.transaction((m) => notify(m, { loanId: f.loanId, event: 'requested' }));
    const mailer = new RecordingMailer();
    const worker = new OutboxWorker({
      dataSource: t.dataSource,
      mailer,
      logger: createLogger('silent'),
      messageIdDomain: 'evalon.example',
      // This worker's database also holds what earlier test files enqueued and nobody drained
      // (visits, shipments): claim everything due, so the message of this loan is in the batch.
      settings: { ...t.config.outbox, batchSize: 100_000 },
    });
    await worker.drainOnce();
    const sent = mailer.to(f.fleetBerlin.email);
    expect(sent).toHaveLength(1);
    expect(sent[0]!.headers).toMatchObject({ 'X-Evalon-Loan': f.reference });
  });

  it('refuses a loan that does not exist (the caller’s transaction then rolls back)', async () => {
    await expect(
      t.dataSource.transaction((m) => notify(m, { loanId: 2_000_000_000, event: 'requested' })),
    ).rejects.toThrow('does not exist');
  });
});

describe('helpers', () => {
  it('reads the first HH:mm–HH:mm span of free-text receiving hours', () => {
    expect(parseReceivingHours('Mon–Fri 06:30–15:00')).toEqual({ from: '06:30', to: '15:00' });
    expect(parseReceivingHours('Mo-Fr 07:00-14:30')).toEqual({ from: '07:00', to: '14:30' });
    expect(parseReceivingHours('by appointment')).toBeUndefined();
    expect(parseReceivingHours('18:00–06:00')).toBeUndefined();
    expect(parseReceivingHours(null)).toBeUndefined();
  });

  it('estimates the deposit deadline: 72 h after approval, never after the start of the ship-by day at the depot', () => {
    expect(
      defaultDepositDueBy(new Date('2027-02-02T10:00:00Z'), '2027-03-08', 'America/Los_Angeles'),
    ).toEqual(new Date('2027-02-05T10:00:00Z'));
    // Midnight 2027-03-08 in Los Angeles is 08:00Z (PST, UTC−8; US DST starts 2027-03-14).
    expect(
      defaultDepositDueBy(new Date('2027-03-07T12:00:00Z'), '2027-03-08', 'America/Los_Angeles'),
    ).toEqual(new Date('2027-03-08T08:00:00Z'));
    // Approved on the ship-by day itself: the approval time stands.
    expect(
      defaultDepositDueBy(new Date('2027-03-08T12:00:00Z'), '2027-03-08', 'America/Los_Angeles'),
    ).toEqual(new Date('2027-03-08T12:00:00Z'));
  });
});
