import { defaultDepositWindowMs } from '@evalon/deposits';
import { formatInstant } from '@evalon/messages';
import { startTestApp, type TestApp } from './helpers/app';
import {
  makeHospital,
  makeLender,
  makeModel,
  makeUnit,
  mondayAfter,
  places,
} from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';

// The deposit deadline is computed once, at approval, with the configured window, stored as
// `loans.deposit_due_at`, and read from there by the approval e-mail and the deposit page: with
// a window other than the 72 h default, the e-mail promises exactly what the server enforces.
const windowHours = 5;
let t: TestApp;
beforeAll(async () => {
  t = await startTestApp(
    { EVALON_DEPOSIT_WINDOW_HOURS: String(windowHours) },
    { outboxWorker: false },
  );
});
afterAll(() => t.close());

function post(client: Client, path: string, body: object = {}) {
  return client.agent.post(path).set('X-XSRF-TOKEN', client.csrf).send(body);
}

it('stores the configured deadline at approval and the approval e-mail promises it', async () => {
  expect(windowHours * 3_600_000).not.toBe(defaultDepositWindowMs);
  const lender = await makeLender(t.dataSource, places.eastDepot);
  const hospital = await makeHospital(t.dataSource, places.bostonCampus);
  const modelId = await makeModel(t.dataSource, lender.id);
  const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
  const buyer = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
  const fleet = await signedInClient(t.app, lender.fleet.email, lender.fleet.password);
  // Far enough ahead that the window, not the ship-by day, decides the deadline.
  const useFrom = mondayAfter(61);
  const loan = (
    await post(buyer, '/api/loans', {
      siteId: hospital.campusId,
      unitIds: [unitId],
      useFrom,
      useTo: useFrom,
    }).expect(201)
  ).body.loan;
  await post(fleet, `/api/loans/${loan.id}/approve`).expect(200);

  const [row] = await t.dataSource.query(
    `SELECT l.deposit_due_at AS due, e.at AS approvedAt
       FROM loans l JOIN loan_events e ON e.loan_id = l.id AND e.to_state = 'approved'
      WHERE l.id = ?`,
    [loan.id],
  );
  const due = new Date(row.due);
  const approvedAt = new Date(row.approvedAt);
  expect(due.getTime() - approvedAt.getTime()).toBe(windowHours * 3_600_000);

  // The deposit page reads the same stored instant.
  const payments = await buyer.agent.get(`/api/loans/${loan.id}/payments`).expect(200);
  expect(payments.body.depositDueAt).toBe(due.toISOString());

  // The buyer's approval e-mail (campus zone: the buyer has no zone of their own).
  const [mail] = await t.dataSource.query('SELECT text FROM outbox_messages WHERE dedupe_key = ?', [
    `loan:${loan.id}:approved:user:${hospital.buyer.userId}`,
  ]);
  const promised = formatInstant(due, places.bostonCampus.timeZone, 'en-US');
  expect(mail.text).toContain(promised);
  const defaultDeadline = new Date(approvedAt.getTime() + defaultDepositWindowMs);
  expect(mail.text).not.toContain(
    formatInstant(defaultDeadline, places.bostonCampus.timeZone, 'en-US'),
  );
});
