import { depositForModel } from '@evalon/deposits';
import {
  addCalendarDays,
  businessDaysBetween,
  computeFootprint,
  earliestFeasibleWindow,
  greatCircleDistanceKm,
  toSiteDate,
} from '@evalon/scheduling';
import { startTestApp, type TestApp } from './helpers/app';
import {
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
import { signedInClient, type Client } from './helpers/http';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);

interface Item {
  unitId: number;
  feasible: boolean;
  milestones: Record<string, string>;
  earliestUseFrom: string | null;
  earliestUseTo: string | null;
  reasonCode: string | null;
  reason: string | null;
  leadDays: number;
  firstLoanOfModel: boolean;
  distanceKm: number;
  transitDays: number;
  deposit: { amount: number; currency: string };
}

async function search(
  client: Client,
  params: Record<string, string | number>,
): Promise<{ status: number; items: Item[]; body: Record<string, unknown> }> {
  const qs = new URLSearchParams(
    Object.entries(params).map(([k, v]) => [k, String(v)] as [string, string]),
  ).toString();
  const res = await client.agent.get(`/api/availability?${qs}`);
  return { status: res.status, items: res.body.items ?? [], body: res.body };
}

async function book(
  client: Client,
  body: { siteId: number; unitIds: number[]; useFrom: string; useTo: string },
) {
  return client.agent.post('/api/loans').set('X-XSRF-TOKEN', client.csrf).send(body);
}

describe('availability search', () => {
  let lender: TestLender;
  let hospital: TestHospital;
  let buyer: Client;
  beforeAll(async () => {
    lender = await makeLender(t.dataSource, places.eastDepot);
    hospital = await makeHospital(t.dataSource, places.bostonCampus);
    buyer = await sign(hospital.buyer);
  });

  it('finds a free unit with the milestones of @evalon/scheduling and the model’s deposit', async () => {
    const modelId = await makeModel(t.dataSource, lender.id, { listValue: 12_000_000 });
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const useFrom = mondayAfter(60);
    const useTo = addCalendarDays(useFrom, 2);
    const res = await search(buyer, { modelId, siteId: hospital.campusId, useFrom, useTo });
    expect(res.status).toBe(200);
    expect(res.body.caution).toMatch(/estimates until the lender confirms/);
    expect(res.items).toHaveLength(1);
    const item = res.items[0]!;
    expect(item).toMatchObject({ unitId, feasible: true, firstLoanOfModel: true, leadDays: 3 });
    const expected = computeFootprint({
      useFrom,
      useTo,
      depot: {
        lat: 40.5186,
        lng: -74.3479,
        country: 'US',
        timeZone: 'America/New_York',
        cutoffTime: '15:00',
      },
      hospital: { lat: 42.3371, lng: -71.0712, country: 'US', timeZone: 'America/New_York' },
      firstLoanOfModel: true,
    });
    expect(item.milestones).toEqual(expected.milestones);
    // The first loan of a model: 3 hospital business days lie in [deliverBy, useFrom)
    // (sample hospital loaner policies: 72 h for new sets; docs/design/product.md §1).
    expect(businessDaysBetween(item.milestones.deliverBy!, useFrom, 'US')).toBe(3);
    // Distance from the same great-circle function the package uses; ~300 km apart.
    expect(item.distanceKm).toBeCloseTo(
      greatCircleDistanceKm({ lat: 40.5186, lng: -74.3479 }, { lat: 42.3371, lng: -71.0712 }),
      0,
    );
    expect(item.transitDays).toBe(expected.transitDays);
    // 10 % of 120,000.00 = 12,000.00, inside [1,000.00, 50,000.00].
    expect(item.deposit).toEqual({
      amount: depositForModel(12_000_000, {
        percentBps: 1000,
        min: 100_000,
        max: 5_000_000,
        currency: 'USD',
      }),
      currency: 'USD',
    });
    expect(item.deposit.amount).toBe(1_200_000);
  });

  it('shows a booked unit as not feasible, with the earliest window that does fit', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const useFrom = mondayAfter(70);
    const useTo = addCalendarDays(useFrom, 4);
    const other = await makeHospital(t.dataSource);
    const otherBuyer = await sign(other.buyer);
    const booked = await book(otherBuyer, {
      siteId: other.campusId,
      unitIds: [unitId],
      useFrom,
      useTo,
    });
    expect(booked.status).toBe(201);

    const res = await search(buyer, { modelId, siteId: hospital.campusId, useFrom, useTo });
    const item = res.items[0]!;
    expect(item).toMatchObject({
      unitId,
      feasible: false,
      reasonCode: 'booked',
      reason: 'Booked by another hospital',
    });
    expect(item.earliestUseFrom).toBeTruthy();
    expect(item.earliestUseFrom! > useFrom).toBe(true);

    // Cross-check with the package's own earliest-window search over the unit's holds.
    const holds: { start: string; end: string }[] = await t.dataSource.query(
      'SELECT CAST(start_date AS CHAR) AS start, CAST(end_date AS CHAR) AS end FROM holds WHERE unit_id = ?',
      [unitId],
    );
    const window = earliestFeasibleWindow(
      {
        useFrom,
        useTo,
        depot: {
          lat: 40.5186,
          lng: -74.3479,
          country: 'US',
          timeZone: 'America/New_York',
          cutoffTime: '15:00',
        },
        hospital: { lat: 42.3371, lng: -71.0712, country: 'US', timeZone: 'America/New_York' },
        firstLoanOfModel: true,
        now: new Date(),
      },
      holds,
      180,
    );
    expect(item.earliestUseFrom).toBe(window!.useFrom);
    expect(item.earliestUseTo).toBe(window!.useTo);

    // And it really is the earliest: that day fits, the day before does not.
    const at = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom: item.earliestUseFrom!,
      useTo: item.earliestUseTo!,
    });
    expect(at.items[0]!.feasible).toBe(true);
    const before = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom: addCalendarDays(item.earliestUseFrom!, -1),
      useTo: addCalendarDays(item.earliestUseTo!, -1),
    });
    expect(before.items[0]!.feasible).toBe(false);
  });

  it('gives the regular lead time once the hospital has borrowed the model', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const first = await makeUnit(t.dataSource, modelId, lender.depotId);
    const second = await makeUnit(t.dataSource, modelId, lender.depotId);
    const useFrom = mondayAfter(80);
    const useTo = addCalendarDays(useFrom, 1);
    const own = await makeHospital(t.dataSource);
    const ownBuyer = await sign(own.buyer);
    const firstSearch = await search(ownBuyer, { modelId, siteId: own.campusId, useFrom, useTo });
    expect(firstSearch.items.every((i) => i.firstLoanOfModel && i.leadDays === 3)).toBe(true);
    expect(
      (await book(ownBuyer, { siteId: own.campusId, unitIds: [first], useFrom, useTo })).status,
    ).toBe(201);
    const again = await search(ownBuyer, { modelId, siteId: own.campusId, useFrom, useTo });
    const item = again.items.find((i) => i.unitId === second)!;
    expect(item).toMatchObject({ feasible: true, firstLoanOfModel: false, leadDays: 2 });
    // 48 h for known sets: 2 business days in [deliverBy, useFrom) (docs/design/product.md §1).
    expect(businessDaysBetween(item.milestones.deliverBy!, useFrom, 'US')).toBe(2);
    const mine = again.items.find((i) => i.unitId === first)!;
    expect(mine).toMatchObject({ feasible: false, reasonCode: 'booked_by_you' });
  });

  it('reports maintenance, and a window too soon for the unit to arrive', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const useFrom = mondayAfter(50);
    const useTo = addCalendarDays(useFrom, 2);
    const coordinator = await sign(lender.coordinator);
    await coordinator.agent
      .post(`/api/units/${unitId}/holds`)
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .send({ start: addCalendarDays(useFrom, -3), end: useFrom, reason: 'Optics recalibration' })
      .expect(201);
    const res = await search(buyer, { modelId, siteId: hospital.campusId, useFrom, useTo });
    expect(res.items[0]).toMatchObject({
      feasible: false,
      reasonCode: 'maintenance',
      reason: 'In maintenance',
    });
    expect(res.items[0]!.earliestUseFrom! > useFrom).toBe(true);

    // Tomorrow at the campus: the unit would have to have shipped already.
    const tomorrow = addCalendarDays(toSiteDate(new Date(), 'America/New_York'), 1);
    const soon = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom: tomorrow,
      useTo: tomorrow,
    });
    expect(soon.items[0]).toMatchObject({
      feasible: false,
      reasonCode: 'too_soon',
      reason: 'Too soon: it could not arrive in time',
    });
    expect(soon.items[0]!.earliestUseFrom! > tomorrow).toBe(true);
  });

  it('leaves out units that are not active', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const active = await makeUnit(t.dataSource, modelId, lender.depotId);
    await makeUnit(t.dataSource, modelId, lender.depotId, 'maintenance');
    await makeUnit(t.dataSource, modelId, lender.depotId, 'retired');
    const useFrom = mondayAfter(45);
    const res = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom,
      useTo: useFrom,
    });
    expect(res.items.map((i) => i.unitId)).toEqual([active]);
  });

  it('adds customs days and picks the distance band for a depot across the ocean', async () => {
    const german = await makeLender(t.dataSource, places.germanDepot);
    const modelId = await makeModel(t.dataSource, german.id, { currency: 'EUR' });
    await makeUnit(t.dataSource, modelId, german.depotId);
    const useFrom = mondayAfter(60);
    const res = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom,
      useTo: useFrom,
    });
    const item = res.items[0]!;
    // About 5,600 km (beyond 5,000 km: 5 days in the default bands) + 2 customs days (defaults
    // are the product's assumptions, see @evalon/scheduling DEFAULT_DISTANCE_BANDS).
    expect(item.distanceKm).toBeGreaterThan(5000);
    expect(item.transitDays).toBe(7);
    expect(item.deposit.currency).toBe('EUR');
  });

  it('searches only the caller’s own campuses and future windows', async () => {
    const modelId = await makeModel(t.dataSource, lender.id);
    const useFrom = mondayAfter(40);
    const other = await makeHospital(t.dataSource);
    const foreign = await search(buyer, {
      modelId,
      siteId: other.campusId,
      useFrom,
      useTo: useFrom,
    });
    expect(foreign.status).toBe(422);
    expect(foreign.body).toMatchObject({ error: { code: 'invalid_site' } });
    const depot = await search(buyer, { modelId, siteId: lender.depotId, useFrom, useTo: useFrom });
    expect(depot.status).toBe(422);
    const past = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom: '2020-01-06',
      useTo: '2020-01-07',
    });
    expect(past.status).toBe(422);
    expect(
      (past.body as { error: { details: { fieldErrors: object } } }).error.details.fieldErrors,
    ).toHaveProperty('useFrom');
    const reversed = await search(buyer, {
      modelId,
      siteId: hospital.campusId,
      useFrom,
      useTo: addCalendarDays(useFrom, -1),
    });
    expect(reversed.status).toBe(400);
    const fleet = await sign(lender.fleet);
    const lenderSearch = await search(fleet, {
      modelId,
      siteId: hospital.campusId,
      useFrom,
      useTo: useFrom,
    });
    expect(lenderSearch.status).toBe(403);
  });
});

describe('alternatives and calendars', () => {
  it('offers other units of the model first, then units of compatible models', async () => {
    const lender = await makeLender(t.dataSource);
    const hospital = await makeHospital(t.dataSource);
    const buyer = await sign(hospital.buyer);
    const modelId = await makeModel(t.dataSource, lender.id, { category: 'laser' });
    const compatibleId = await makeModel(t.dataSource, lender.id, { category: 'laser' });
    const unrelatedId = await makeModel(t.dataSource, lender.id, { category: 'laser' });
    await makeCompatible(t.dataSource, modelId, compatibleId);
    const wanted = await makeUnit(t.dataSource, modelId, lender.depotId);
    const sibling = await makeUnit(t.dataSource, modelId, lender.depotId);
    const cousin = await makeUnit(t.dataSource, compatibleId, lender.depotId);
    await makeUnit(t.dataSource, unrelatedId, lender.depotId);
    const useFrom = mondayAfter(55);
    const res = await buyer.agent
      .get(
        `/api/availability/alternatives?unitId=${wanted}&siteId=${hospital.campusId}&useFrom=${useFrom}&useTo=${useFrom}`,
      )
      .expect(200);
    expect(
      res.body.items.map((i: { unitId: number; relation: string }) => [i.unitId, i.relation]),
    ).toEqual([
      [sibling, 'same_model'],
      [cousin, 'compatible_model'],
    ]);
    expect(
      res.body.items.every(
        (i: { feasible: boolean; forUnitId: number }) => i.feasible && i.forUnitId === wanted,
      ),
    ).toBe(true);
  });

  it('shows other hospitals’ loans as “Reserved”, the own loan by reference, all to the lender', async () => {
    const lender = await makeLender(t.dataSource);
    const modelId = await makeModel(t.dataSource, lender.id);
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const a = await makeHospital(t.dataSource);
    const b = await makeHospital(t.dataSource);
    const buyerA = await sign(a.buyer);
    const useFrom = mondayAfter(65);
    const booked = await book(buyerA, {
      siteId: a.campusId,
      unitIds: [unitId],
      useFrom,
      useTo: useFrom,
    });
    expect(booked.status).toBe(201);
    const reference = booked.body.loan.reference;

    const own = await buyerA.agent.get(`/api/units/${unitId}/holds`).expect(200);
    expect(own.body.items).toEqual([
      expect.objectContaining({ kind: 'loan', loanReference: reference, hospitalName: null }),
    ]);
    const buyerB = await sign(b.buyer);
    const theirs = await buyerB.agent.get(`/api/units/${unitId}/holds`).expect(200);
    expect(theirs.body.items).toEqual([
      expect.objectContaining({
        kind: 'loan',
        label: 'Reserved',
        loanId: null,
        loanReference: null,
        hospitalName: null,
      }),
    ]);
    expect(JSON.stringify(theirs.body)).not.toContain(a.name);
    const fleet = await sign(lender.fleet);
    const lenders = await fleet.agent
      .get(
        `/api/units/${unitId}/holds?from=${addCalendarDays(useFrom, -60)}&to=${addCalendarDays(useFrom, 60)}`,
      )
      .expect(200);
    expect(lenders.body.items[0]).toMatchObject({ loanReference: reference, hospitalName: a.name });
    const outside = await fleet.agent
      .get(`/api/units/${unitId}/holds?from=${addCalendarDays(useFrom, 60)}`)
      .expect(200);
    expect(outside.body.items).toEqual([]);
  });
});
