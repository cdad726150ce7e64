import { depositForLoan } from '@evalon/deposits';
import { addCalendarDays } from '@evalon/scheduling';
import { startTestApp, type TestApp } from './helpers/app';
import {
  countRows,
  makeCompatible,
  makeHospital,
  makeLender,
  makeModel,
  makeUnit,
  mondayAfter,
  places,
  type TestHospital,
  type TestLender,
} from './helpers/catalog';
import { makeOrganisation, makePerson } from './helpers/factories';
import { signedInClient, type Client } from './helpers/http';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);

function post(client: Client, path: string, body: object = {}) {
  return client.agent.post(path).set('X-XSRF-TOKEN', client.csrf).send(body);
}

interface World {
  lender: TestLender;
  hospital: TestHospital;
  buyer: Client;
  fleet: Client;
  modelId: number;
  units: number[];
}

async function world(unitCount = 2): Promise<World> {
  const lender = await makeLender(t.dataSource, places.eastDepot);
  const hospital = await makeHospital(t.dataSource, places.bostonCampus);
  const modelId = await makeModel(t.dataSource, lender.id);
  const units: number[] = [];
  for (let i = 0; i < unitCount; i++)
    units.push(await makeUnit(t.dataSource, modelId, lender.depotId));
  return {
    lender,
    hospital,
    modelId,
    units,
    buyer: await sign(hospital.buyer),
    fleet: await sign(lender.fleet),
  };
}

const loansOfHospital = (hospitalId: number) =>
  countRows(t.dataSource, 'loans', 'hospital_id = ?', [hospitalId]);

describe('search → request → approve / decline / cancel', () => {
  it('requests a loan: loan, unit milestones, hold and event written together', async () => {
    const w = await world(1);
    const useFrom = mondayAfter(60);
    const useTo = addCalendarDays(useFrom, 3);
    const found = await w.buyer.agent
      .get(
        `/api/availability?modelId=${w.modelId}&siteId=${w.hospital.campusId}&useFrom=${useFrom}&useTo=${useTo}`,
      )
      .expect(200);
    const offer = found.body.items[0];
    expect(offer.feasible).toBe(true);

    const res = await post(w.buyer, '/api/loans', {
      siteId: w.hospital.campusId,
      unitIds: [w.units[0]],
      useFrom,
      useTo,
      note: 'Cases in OR 4.',
    }).expect(201);
    const loan = res.body.loan;
    expect(loan).toMatchObject({
      state: 'requested',
      hospitalId: w.hospital.id,
      lenderId: w.lender.id,
      siteId: w.hospital.campusId,
      useFrom,
      useTo,
      note: 'Cases in OR 4.',
      deposit: offer.deposit,
      allowedActions: ['cancel'],
    });
    expect(loan.reference).toMatch(/^EV-\d{4}-\d{6,}$/);
    expect(loan.units[0].milestones).toEqual(offer.milestones);

    const [row] = await t.dataSource.query(
      'SELECT reference, state, CAST(ship_by AS CHAR) AS ship_by, CAST(ready_again AS CHAR) AS ready_again, deposit_amount, deposit_currency FROM loans WHERE id = ?',
      [loan.id],
    );
    expect(row).toEqual({
      reference: loan.reference,
      state: 'requested',
      ship_by: offer.milestones.shipBy,
      ready_again: offer.milestones.readyAgain,
      deposit_amount: String(offer.deposit.amount),
      deposit_currency: 'USD',
    });
    const holds = await t.dataSource.query(
      'SELECT kind, loan_id, CAST(start_date AS CHAR) AS s, CAST(end_date AS CHAR) AS e FROM holds WHERE unit_id = ?',
      [w.units[0]],
    );
    expect(holds).toEqual([
      {
        kind: 'loan',
        loan_id: loan.id,
        s: offer.milestones.shipBy,
        e: offer.milestones.readyAgain,
      },
    ]);
    const events = await t.dataSource.query(
      'SELECT from_state, to_state, actor_user_id FROM loan_events WHERE loan_id = ?',
      [loan.id],
    );
    expect(events).toEqual([
      { from_state: null, to_state: 'requested', actor_user_id: w.hospital.buyer.userId },
    ]);
  });

  it('the fleet manager approves from the queue; approving twice names the state', async () => {
    const w = await world(1);
    const useFrom = mondayAfter(61);
    const loan = (
      await post(w.buyer, '/api/loans', {
        siteId: w.hospital.campusId,
        unitIds: w.units,
        useFrom,
        useTo: useFrom,
      }).expect(201)
    ).body.loan;
    const queue = await w.fleet.agent.get('/api/loans?state=requested').expect(200);
    expect(queue.body.items.map((l: { id: number }) => l.id)).toContain(loan.id);
    expect(queue.body.items.find((l: { id: number }) => l.id === loan.id).allowedActions).toEqual([
      'approve',
      'decline',
    ]);

    const approved = await post(w.fleet, `/api/loans/${loan.id}/approve`).expect(200);
    expect(approved.body.loan.state).toBe('approved');
    expect(approved.body.loan.events.map((e: { toState: string }) => e.toState)).toEqual([
      'requested',
      'approved',
    ]);
    expect(approved.body.loan.events[1].actorName).toBe(w.lender.fleet.name);
    const [row] = await t.dataSource.query('SELECT state FROM loans WHERE id = ?', [loan.id]);
    expect(row.state).toBe('approved');
    expect(await countRows(t.dataSource, 'holds', 'loan_id = ?', [loan.id])).toBe(1);

    const again = await post(w.fleet, `/api/loans/${loan.id}/approve`).expect(409);
    expect(again.body.error.code).toBe('illegal_transition');
    expect(again.body.error.message).toContain('approved');
    const queueAfter = await w.fleet.agent.get('/api/loans?state=requested').expect(200);
    expect(queueAfter.body.items.map((l: { id: number }) => l.id)).not.toContain(loan.id);
  });

  it('declining needs a reason, records it and releases the hold', async () => {
    const w = await world(1);
    const useFrom = mondayAfter(62);
    const loan = (
      await post(w.buyer, '/api/loans', {
        siteId: w.hospital.campusId,
        unitIds: w.units,
        useFrom,
        useTo: useFrom,
      }).expect(201)
    ).body.loan;
    const noReason = await post(w.fleet, `/api/loans/${loan.id}/decline`, {}).expect(422);
    expect(Object.keys(noReason.body.error.details.fieldErrors)).toEqual(['reason']);
    const declined = await post(w.fleet, `/api/loans/${loan.id}/decline`, {
      reason: 'Unit reserved for a recall check.',
    }).expect(200);
    expect(declined.body.loan.state).toBe('declined');
    expect(await countRows(t.dataSource, 'holds', 'loan_id = ?', [loan.id])).toBe(0);
    const [event] = await t.dataSource.query(
      "SELECT from_state, to_state, reason, actor_user_id FROM loan_events WHERE loan_id = ? AND to_state = 'declined'",
      [loan.id],
    );
    expect(event).toEqual({
      from_state: 'requested',
      to_state: 'declined',
      reason: 'Unit reserved for a recall check.',
      actor_user_id: w.lender.fleet.userId,
    });
    // The unit is free again for the same window.
    const found = await w.buyer.agent
      .get(
        `/api/availability?modelId=${w.modelId}&siteId=${w.hospital.campusId}&useFrom=${useFrom}&useTo=${useFrom}`,
      )
      .expect(200);
    expect(found.body.items[0].feasible).toBe(true);
    const cancel = await post(w.buyer, `/api/loans/${loan.id}/cancel`, {
      reason: 'Too late anyway',
    }).expect(409);
    expect(cancel.body.error.message).toContain('declined');
  });

  it('the buyer cancels an approved loan; its hold goes', async () => {
    const w = await world(1);
    const useFrom = mondayAfter(63);
    const loan = (
      await post(w.buyer, '/api/loans', {
        siteId: w.hospital.campusId,
        unitIds: w.units,
        useFrom,
        useTo: useFrom,
      }).expect(201)
    ).body.loan;
    await post(w.fleet, `/api/loans/${loan.id}/approve`).expect(200);
    const cancelled = await post(w.buyer, `/api/loans/${loan.id}/cancel`, {
      reason: 'Surgeon on leave.',
    }).expect(200);
    expect(cancelled.body.loan).toMatchObject({ state: 'cancelled', allowedActions: [] });
    expect(await countRows(t.dataSource, 'holds', 'loan_id = ?', [loan.id])).toBe(0);
    const states = await t.dataSource.query(
      'SELECT to_state FROM loan_events WHERE loan_id = ? ORDER BY id',
      [loan.id],
    );
    expect(states.map((s: { to_state: string }) => s.to_state)).toEqual([
      'requested',
      'approved',
      'cancelled',
    ]);
  });
});

describe('conflicts', () => {
  it('answers 409 with the conflict, the earliest window and alternatives; writes nothing', async () => {
    const w = await world(2);
    const compatibleModel = await makeModel(t.dataSource, w.lender.id);
    await makeCompatible(t.dataSource, w.modelId, compatibleModel);
    const cousin = await makeUnit(t.dataSource, compatibleModel, w.lender.depotId);
    const useFrom = mondayAfter(64);
    const useTo = addCalendarDays(useFrom, 2);
    await post(w.buyer, '/api/loans', {
      siteId: w.hospital.campusId,
      unitIds: [w.units[0]],
      useFrom,
      useTo,
    }).expect(201);

    const rival = await makeHospital(t.dataSource, places.bostonCampus);
    const rivalBuyer = await sign(rival.buyer);
    const res = await post(rivalBuyer, '/api/loans', {
      siteId: rival.campusId,
      unitIds: [w.units[0]],
      useFrom: addCalendarDays(useFrom, 1),
      useTo: addCalendarDays(useTo, 1),
    }).expect(409);
    expect(res.body.error.code).toBe('unit_unavailable');
    const { conflicts, alternatives } = res.body.error.details;
    expect(conflicts).toEqual([
      expect.objectContaining({
        unitId: w.units[0],
        reasonCode: 'booked',
        reason: 'Booked by another hospital',
      }),
    ]);
    expect(conflicts[0].earliestUseFrom > addCalendarDays(useFrom, 1)).toBe(true);
    expect(
      alternatives.map((a: { unitId: number; relation: string }) => [a.unitId, a.relation]),
    ).toEqual([
      [w.units[1], 'same_model'],
      [cousin, 'compatible_model'],
    ]);
    expect(await loansOfHospital(rival.id)).toBe(0);
    expect(await countRows(t.dataSource, 'holds', 'unit_id = ?', [w.units[0]])).toBe(1);
  });

  it('is all or nothing across units: one unit in maintenance blocks the whole loan', async () => {
    const w = await world(3);
    const useFrom = mondayAfter(66);
    await post(w.fleet, `/api/units/${w.units[2]}/holds`, {
      start: addCalendarDays(useFrom, -2),
      end: addCalendarDays(useFrom, 2),
      reason: 'Battery replacement',
    }).expect(201);
    const res = await post(w.buyer, '/api/loans', {
      siteId: w.hospital.campusId,
      unitIds: w.units,
      useFrom,
      useTo: useFrom,
    }).expect(409);
    expect(res.body.error.details.conflicts).toEqual([
      expect.objectContaining({ unitId: w.units[2], reasonCode: 'maintenance' }),
    ]);
    expect(await loansOfHospital(w.hospital.id)).toBe(0);
    expect(
      await countRows(t.dataSource, 'holds', "unit_id IN (?, ?) AND kind = 'loan'", [
        w.units[0],
        w.units[1],
      ]),
    ).toBe(0);

    // Without the blocked unit the other two book together, deposit summed by @evalon/deposits.
    const ok = await post(w.buyer, '/api/loans', {
      siteId: w.hospital.campusId,
      unitIds: [w.units[1], w.units[0]],
      useFrom,
      useTo: useFrom,
    }).expect(201);
    const rule = { percentBps: 1000, min: 100_000, max: 5_000_000, currency: 'USD' };
    const expected = depositForLoan([
      { unitId: 'a', listValue: 12_000_000, rule },
      { unitId: 'b', listValue: 12_000_000, rule },
    ]);
    expect(ok.body.loan.deposit).toEqual({
      amount: expected.waived ? 0 : expected.amount,
      currency: 'USD',
    });
    expect(ok.body.loan.deposit.amount).toBe(2_400_000);
    expect(ok.body.loan.units.map((u: { unitId: number }) => u.unitId)).toEqual(
      [w.units[0], w.units[1]].sort((a, b) => a! - b!),
    );
    expect(await countRows(t.dataSource, 'loan_units', 'loan_id = ?', [ok.body.loan.id])).toBe(2);
    expect(await countRows(t.dataSource, 'holds', 'loan_id = ?', [ok.body.loan.id])).toBe(2);
  });

  it('20 simultaneous requests for one unit: exactly one loan, 19 × 409, one hold', async () => {
    const w = await world(1);
    const useFrom = mondayAfter(67);
    const responses = await Promise.all(
      Array.from({ length: 20 }, (_, i) =>
        post(w.buyer, '/api/loans', {
          siteId: w.hospital.campusId,
          unitIds: w.units,
          // Overlapping windows, each one day later than the last.
          useFrom: addCalendarDays(useFrom, i % 5),
          useTo: addCalendarDays(useFrom, (i % 5) + 2),
        }),
      ),
    );
    const statuses = responses.map((r) => r.status);
    expect(statuses.filter((s) => s === 201)).toHaveLength(1);
    expect(statuses.filter((s) => s === 409)).toHaveLength(19);
    expect(statuses.filter((s) => s >= 500)).toHaveLength(0);
    expect(await countRows(t.dataSource, 'holds', 'unit_id = ?', [w.units[0]])).toBe(1);
    expect(await loansOfHospital(w.hospital.id)).toBe(1);
    const [unit] = await t.dataSource.query('SELECT booking_version FROM units WHERE id = ?', [
      w.units[0],
    ]);
    expect(unit.booking_version).toBe(1);
  });
});

describe('bad input writes nothing', () => {
  let w: World;
  beforeAll(async () => {
    w = await world(2);
  });

  async function refused(body: object, status: number, field?: string) {
    const beforeHolds = await countRows(t.dataSource, 'holds', 'unit_id IN (?, ?)', w.units);
    const res = await post(w.buyer, '/api/loans', body);
    expect(res.status).toBe(status);
    if (field) expect(Object.keys(res.body.error.details.fieldErrors)).toContain(field);
    expect(await loansOfHospital(w.hospital.id)).toBe(0);
    expect(await countRows(t.dataSource, 'holds', 'unit_id IN (?, ?)', w.units)).toBe(beforeHolds);
    return res;
  }

  const window = () => ({ useFrom: mondayAfter(70), useTo: addCalendarDays(mondayAfter(70), 1) });

  it('unknown unit ids', async () => {
    const res = await refused(
      { siteId: w.hospital.campusId, unitIds: [w.units[0], 999_999_999], ...window() },
      422,
      'unitIds',
    );
    expect(res.body.error.message).toContain('999999999');
  });

  it('the last case day before the first', async () => {
    const { useFrom } = window();
    await refused(
      {
        siteId: w.hospital.campusId,
        unitIds: w.units,
        useFrom,
        useTo: addCalendarDays(useFrom, -1),
      },
      422,
      'useTo',
    );
  });

  it('a window in the past', async () => {
    await refused(
      { siteId: w.hospital.campusId, unitIds: w.units, useFrom: '2021-03-01', useTo: '2021-03-02' },
      422,
      'useFrom',
    );
  });

  it('another organisation’s site, or a depot', async () => {
    const other = await makeHospital(t.dataSource);
    await refused({ siteId: other.campusId, unitIds: w.units, ...window() }, 422, 'siteId');
    await refused({ siteId: w.lender.depotId, unitIds: w.units, ...window() }, 422, 'siteId');
  });

  it('more than 20 units, or a unit twice', async () => {
    const many = Array.from({ length: 21 }, (_, i) => i + 1);
    await refused({ siteId: w.hospital.campusId, unitIds: many, ...window() }, 422, 'unitIds');
    await refused(
      { siteId: w.hospital.campusId, unitIds: [w.units[0], w.units[0]], ...window() },
      422,
      'unitIds',
    );
  });

  it('units of two lenders', async () => {
    const other = await makeLender(t.dataSource);
    const foreignUnit = await makeUnit(
      t.dataSource,
      await makeModel(t.dataSource, other.id),
      other.depotId,
    );
    const res = await refused(
      { siteId: w.hospital.campusId, unitIds: [w.units[0], foreignUnit], ...window() },
      422,
      'unitIds',
    );
    expect(res.body.error.code).toBe('several_lenders');
  });
});

describe('who may see and change a loan', () => {
  let w: World;
  let loanId: number;
  beforeAll(async () => {
    w = await world(1);
    const useFrom = mondayAfter(75);
    loanId = (
      await post(w.buyer, '/api/loans', {
        siteId: w.hospital.campusId,
        unitIds: w.units,
        useFrom,
        useTo: useFrom,
      }).expect(201)
    ).body.loan.id;
  });

  it('another hospital’s buyer gets 404 for reading and cancelling, and sees none of it in lists', async () => {
    const orlenbach = await makeHospital(t.dataSource, places.germanCampus);
    const stranger = await sign(orlenbach.buyer);
    const read = await stranger.agent.get(`/api/loans/${loanId}`).expect(404);
    expect(read.body.error.code).toBe('loan_not_found');
    await post(stranger, `/api/loans/${loanId}/cancel`, { reason: 'Not mine' }).expect(404);
    const list = await stranger.agent.get('/api/loans').expect(200);
    expect(list.body.items.map((l: { id: number }) => l.id)).not.toContain(loanId);
    const [row] = await t.dataSource.query('SELECT state FROM loans WHERE id = ?', [loanId]);
    expect(row.state).toBe('requested');
  });

  it('a hospital buyer cannot approve; another lender’s fleet manager gets 404', async () => {
    await post(w.buyer, `/api/loans/${loanId}/approve`).expect(403);
    const otherLender = await makeLender(t.dataSource);
    const otherFleet = await sign(otherLender.fleet);
    await post(otherFleet, `/api/loans/${loanId}/approve`).expect(404);
    const clinician = await sign(w.hospital.clinician);
    await post(clinician, `/api/loans/${loanId}/cancel`, { reason: 'Not my call' }).expect(403);
    const seen = await clinician.agent.get(`/api/loans/${loanId}`).expect(200);
    expect(seen.body.loan.allowedActions).toEqual([]);
    const [row] = await t.dataSource.query('SELECT state FROM loans WHERE id = ?', [loanId]);
    expect(row.state).toBe('requested');
  });

  it('the lender’s coordinator sees the loan but cannot approve it; the admin sees everything', async () => {
    const coordinator = await sign(w.lender.coordinator);
    const list = await coordinator.agent
      .get(`/api/loans?q=${encodeURIComponent(w.hospital.name)}`)
      .expect(200);
    expect(list.body.items.map((l: { id: number }) => l.id)).toEqual([loanId]);
    await post(coordinator, `/api/loans/${loanId}/approve`).expect(403);
    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const adminClient = await sign(admin);
    await adminClient.agent.get(`/api/loans/${loanId}`).expect(200);
  });
});
