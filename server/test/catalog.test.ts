import { toGtin14 } from '@evalon/contracts';
import { depositForModel } from '@evalon/deposits';
import { startTestApp, type TestApp } from './helpers/app';
import {
  countRows,
  makeHospital,
  makeLender,
  makeModel,
  makeUnit,
  mondayAfter,
  randomGtin,
  type TestLender,
} from './helpers/catalog';
import { jsonColumn, unique } from './helpers/factories';
import { signedInClient, type Client } from './helpers/http';
import { addCalendarDays } from '@evalon/scheduling';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

const sign = (person: { email: string; password: string }) =>
  signedInClient(t.app, person.email, person.password);

function modelBody(overrides: Record<string, unknown> = {}) {
  return {
    name: `Pathway laser ${unique()}`,
    category: 'laser',
    description: 'Pulsed laser console for stone ablation (invented).',
    listValue: 9_500_000,
    currency: 'USD',
    depositRule: { percentBps: 1_500, min: 200_000, max: 1_000_000, currency: 'USD' },
    packingList: [
      { name: 'Console', gtin: randomGtin(), quantity: 1, serialised: true },
      { name: 'Foot switch', gtin: null, quantity: 1 },
    ],
    compatibleModelIds: [],
    ...overrides,
  };
}

describe('depots and shipping settings', () => {
  let lender: TestLender;
  let fleet: Client;
  beforeAll(async () => {
    lender = await makeLender(t.dataSource);
    fleet = await sign(lender.fleet);
  });

  it('adds and changes a depot; the row holds what was sent', async () => {
    const body = {
      name: `North depot ${unique()}`,
      addressLine: '12 Freight Lane',
      city: 'Springvale',
      postalCode: '01103',
      region: 'MA',
      country: 'US',
      latitude: 42.1,
      longitude: -72.59,
      timeZone: 'America/New_York',
      receivingHours: 'Mon–Fri 08:00–16:00',
      cutoffTime: '14:30',
    };
    const created = await fleet.agent
      .post(`/api/lenders/${lender.id}/depots`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(body)
      .expect(201);
    const depot = created.body.depot;
    expect(depot).toMatchObject({ ...body, kind: 'depot', organisationId: lender.id });
    const [row] = await t.dataSource.query('SELECT * FROM sites WHERE id = ?', [depot.id]);
    expect(row).toMatchObject({
      kind: 'depot',
      cutoff_time: '14:30',
      time_zone: 'America/New_York',
    });

    const changed = await fleet.agent
      .put(`/api/lenders/${lender.id}/depots/${depot.id}`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ ...body, cutoffTime: '16:00', timeZone: 'America/Chicago' })
      .expect(200);
    expect(changed.body.depot).toMatchObject({ cutoffTime: '16:00', timeZone: 'America/Chicago' });
    const [after] = await t.dataSource.query(
      'SELECT cutoff_time, time_zone FROM sites WHERE id = ?',
      [depot.id],
    );
    expect(after).toEqual({ cutoff_time: '16:00', time_zone: 'America/Chicago' });

    const list = await fleet.agent.get(`/api/lenders/${lender.id}/depots`).expect(200);
    expect(list.body.items.map((d: { id: number }) => d.id)).toEqual(
      expect.arrayContaining([lender.depotId, depot.id]),
    );
  });

  it('refuses a bad cut-off, an unknown zone or a country without a holiday calendar', async () => {
    const before = await countRows(t.dataSource, 'sites', 'organisation_id = ?', [lender.id]);
    const base = {
      name: 'Bad depot',
      addressLine: '1 Nowhere',
      city: 'X',
      country: 'US',
      latitude: 1,
      longitude: 1,
      timeZone: 'America/New_York',
      cutoffTime: '15:00',
    };
    const bad = await fleet.agent
      .post(`/api/lenders/${lender.id}/depots`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ ...base, cutoffTime: '25:00', timeZone: 'Mars/Olympus' })
      .expect(422);
    expect(Object.keys(bad.body.error.details.fieldErrors).sort()).toEqual([
      'cutoffTime',
      'timeZone',
    ]);
    const calendar = await fleet.agent
      .post(`/api/lenders/${lender.id}/depots`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ ...base, country: 'ZZ' })
      .expect(422);
    expect(calendar.body.error.code).toBe('unknown_holiday_calendar');
    expect(await countRows(t.dataSource, 'sites', 'organisation_id = ?', [lender.id])).toBe(before);
  });

  it('only the lender’s fleet managers change depots and settings', async () => {
    const other = await makeLender(t.dataSource);
    const otherFleet = await sign(other.fleet);
    await otherFleet.agent
      .put(`/api/lenders/${lender.id}/shipping-settings`)
      .set('X-XSRF-TOKEN', otherFleet.csrf)
      .send({})
      .expect(403);
    const coordinator = await sign(lender.coordinator);
    await coordinator.agent.get(`/api/lenders/${lender.id}/shipping-settings`).expect(200);
    await coordinator.agent
      .post(`/api/lenders/${lender.id}/depots`)
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .send({})
      .expect(403);
  });

  it('shows the product defaults, then saves and reads back the lender’s own', async () => {
    const first = await fleet.agent.get(`/api/lenders/${lender.id}/shipping-settings`).expect(200);
    // docs/design/product.md §1 defaults: lead 2, first loan 3, decontamination 1, turnaround 2.
    expect(first.body).toMatchObject({
      isDefault: true,
      settings: { leadDays: 2, firstLoanLeadDays: 3, decontaminationDays: 1, turnaroundDays: 2 },
    });
    const settings = {
      distanceBands: [
        { maxKm: 500, days: 1 },
        { maxKm: 2000, days: 3 },
        { maxKm: null, days: 6 },
      ],
      customsDays: 3,
      leadDays: 2,
      firstLoanLeadDays: 4,
      decontaminationDays: 1,
      turnaroundDays: 3,
    };
    const saved = await fleet.agent
      .put(`/api/lenders/${lender.id}/shipping-settings`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(settings)
      .expect(200);
    expect(saved.body).toMatchObject({ isDefault: false, settings });
    const [row] = await t.dataSource.query(
      'SELECT * FROM lender_settings WHERE organisation_id = ?',
      [lender.id],
    );
    expect(jsonColumn(row.distance_bands)).toEqual(settings.distanceBands);
    expect(row).toMatchObject({ customs_days: 3, first_loan_lead_days: 4, turnaround_days: 3 });
  });

  it('refuses a band table that is not increasing or not open-ended, and a lead of 0', async () => {
    const res = await fleet.agent
      .put(`/api/lenders/${lender.id}/shipping-settings`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({
        distanceBands: [
          { maxKm: 800, days: 1 },
          { maxKm: 300, days: 2 },
        ],
        customsDays: 2,
        leadDays: 0,
        firstLoanLeadDays: 3,
        decontaminationDays: 1,
        turnaroundDays: 2,
      })
      .expect(422);
    expect(Object.keys(res.body.error.details.fieldErrors)).toEqual(
      expect.arrayContaining(['leadDays', 'distanceBands.1.maxKm']),
    );
  });
});

describe('models', () => {
  let lender: TestLender;
  let fleet: Client;
  beforeAll(async () => {
    lender = await makeLender(t.dataSource);
    fleet = await sign(lender.fleet);
  });

  it('lists a model with packing list and symmetric compatibility, stored as sent', async () => {
    const scopeId = await makeModel(t.dataSource, lender.id, { category: 'flexible_endoscope' });
    const body = modelBody({ compatibleModelIds: [scopeId] });
    const res = await fleet.agent
      .post('/api/models')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(body)
      .expect(201);
    const model = res.body.model;
    expect(model).toMatchObject({
      lenderId: lender.id,
      name: body.name,
      listValue: 9_500_000,
      compatibleModelIds: [scopeId],
      editable: true,
      unitCount: 0,
    });
    // 15 % of 95,000.00 is 14,250.00, above the rule's maximum of 10,000.00: clamped to it.
    expect(model.depositPerUnit).toEqual({
      amount: depositForModel(9_500_000, body.depositRule),
      currency: 'USD',
    });
    expect(model.depositPerUnit.amount).toBe(1_000_000);
    expect(model.packingList.map((p: { name: string }) => p.name)).toEqual([
      'Console',
      'Foot switch',
    ]);

    const items = await t.dataSource.query(
      'SELECT name, gtin, quantity, serialised FROM model_packing_items WHERE model_id = ? ORDER BY position',
      [model.id],
    );
    expect(items).toEqual([
      { name: 'Console', gtin: body.packingList[0]!.gtin, quantity: 1, serialised: 1 },
      { name: 'Foot switch', gtin: null, quantity: 1, serialised: 0 },
    ]);
    const pairs = await t.dataSource.query(
      'SELECT model_id, compatible_model_id FROM model_compatibility WHERE model_id IN (?, ?) ORDER BY model_id',
      [model.id, scopeId],
    );
    expect(pairs).toEqual(
      [
        { model_id: model.id, compatible_model_id: scopeId },
        { model_id: scopeId, compatible_model_id: model.id },
      ].sort((a, b) => a.model_id - b.model_id),
    );

    // The other side sees it too, and can search by it.
    const scope = await fleet.agent.get(`/api/models/${scopeId}`).expect(200);
    expect(scope.body.model.compatibleModelIds).toEqual([model.id]);
    const compatible = await fleet.agent.get(`/api/models?compatibleWith=${scopeId}`).expect(200);
    expect(compatible.body.items.map((m: { id: number }) => m.id)).toEqual([model.id]);

    // Dropping the link on one side drops it on both.
    await fleet.agent
      .put(`/api/models/${model.id}`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ ...body, compatibleModelIds: [] })
      .expect(200);
    expect(
      await countRows(t.dataSource, 'model_compatibility', 'model_id IN (?, ?)', [
        model.id,
        scopeId,
      ]),
    ).toBe(0);
  });

  it('filters by category and text, and hospital people see every lender’s models', async () => {
    const marker = unique();
    const imaging = await makeModel(t.dataSource, lender.id, {
      category: 'imaging',
      name: `Tower ${marker}`,
    });
    const hospital = await makeHospital(t.dataSource);
    const buyer = await sign(hospital.buyer);
    const found = await buyer.agent.get(`/api/models?category=imaging&q=${marker}`).expect(200);
    expect(found.body.items).toHaveLength(1);
    expect(found.body.items[0]).toMatchObject({
      id: imaging,
      editable: false,
      lenderName: lender.name,
    });
    const none = await buyer.agent.get(`/api/models?category=laser&q=${marker}`).expect(200);
    expect(none.body.items).toEqual([]);
    await buyer.agent.get('/api/models?category=spaceship').expect(400);
  });

  it('refuses bad GTINs, a deposit rule in another currency and a duplicate name', async () => {
    const valid = toGtin14('0950110153000');
    const wrongCheck = `${valid.slice(0, 13)}${(Number(valid[13]) + 1) % 10}`;
    const before = await countRows(t.dataSource, 'models', 'lender_id = ?', [lender.id]);
    const res = await fleet.agent
      .post('/api/models')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(
        modelBody({
          packingList: [{ name: 'Console', gtin: wrongCheck, quantity: 1 }],
          depositRule: { percentBps: 1000, min: 0, max: 10, currency: 'EUR' },
        }),
      )
      .expect(422);
    expect(Object.keys(res.body.error.details.fieldErrors).sort()).toEqual([
      'depositRule.currency',
      'packingList.0.gtin',
    ]);
    const body = modelBody();
    await fleet.agent.post('/api/models').set('X-XSRF-TOKEN', fleet.csrf).send(body).expect(201);
    const dup = await fleet.agent
      .post('/api/models')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(body)
      .expect(409);
    expect(dup.body.error.code).toBe('model_name_taken');
    expect(await countRows(t.dataSource, 'models', 'lender_id = ?', [lender.id])).toBe(before + 1);
  });

  it('keeps compatibility within one lender and refuses a model compatible with itself', async () => {
    const other = await makeLender(t.dataSource);
    const foreign = await makeModel(t.dataSource, other.id);
    const res = await fleet.agent
      .post('/api/models')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(modelBody({ compatibleModelIds: [foreign] }))
      .expect(422);
    expect(res.body.error.code).toBe('invalid_compatibility');
    const own = await makeModel(t.dataSource, lender.id);
    const self = await fleet.agent
      .put(`/api/models/${own}`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send(modelBody({ compatibleModelIds: [own] }))
      .expect(422);
    expect(self.body.error.code).toBe('invalid_compatibility');
  });

  it('only the owning lender’s fleet manager edits; buyers and coordinators cannot', async () => {
    const own = await makeModel(t.dataSource, lender.id);
    const other = await makeLender(t.dataSource);
    const otherFleet = await sign(other.fleet);
    const res = await otherFleet.agent
      .put(`/api/models/${own}`)
      .set('X-XSRF-TOKEN', otherFleet.csrf)
      .send(modelBody())
      .expect(403);
    expect(res.body.error.code).toBe('forbidden');
    const coordinator = await sign(lender.coordinator);
    await coordinator.agent
      .post('/api/models')
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .send(modelBody())
      .expect(403);
    const hospital = await makeHospital(t.dataSource);
    const buyer = await sign(hospital.buyer);
    await buyer.agent
      .post('/api/models')
      .set('X-XSRF-TOKEN', buyer.csrf)
      .send(modelBody())
      .expect(403);
    await otherFleet.agent.get('/api/models/999999999').expect(404);
    const [row] = await t.dataSource.query(
      'SELECT updated_at = created_at AS same FROM models WHERE id = ?',
      [own],
    );
    expect(Number(row.same)).toBe(1);
  });
});

describe('units and maintenance holds', () => {
  let lender: TestLender;
  let fleet: Client;
  let modelId: number;
  beforeAll(async () => {
    lender = await makeLender(t.dataSource);
    fleet = await sign(lender.fleet);
    modelId = await makeModel(t.dataSource, lender.id);
  });

  it('adds a unit, refuses a duplicate serial, another lender’s depot and a bad UDI', async () => {
    const serial = `KS-${unique()}`;
    const udi = randomGtin();
    const res = await fleet.agent
      .post('/api/units')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ modelId, serialNumber: serial, udiDi: udi, homeDepotId: lender.depotId })
      .expect(201);
    expect(res.body.unit).toMatchObject({
      modelId,
      serialNumber: serial,
      udiDi: udi,
      status: 'active',
    });
    const [row] = await t.dataSource.query('SELECT * FROM units WHERE id = ?', [res.body.unit.id]);
    expect(row).toMatchObject({
      serial_number: serial,
      udi_di: udi,
      home_depot_id: lender.depotId,
    });

    const dup = await fleet.agent
      .post('/api/units')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ modelId, serialNumber: serial, homeDepotId: lender.depotId })
      .expect(409);
    expect(dup.body.error.code).toBe('serial_taken');

    const other = await makeLender(t.dataSource);
    const depot = await fleet.agent
      .post('/api/units')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ modelId, serialNumber: `KS-${unique()}`, homeDepotId: other.depotId })
      .expect(422);
    expect(depot.body.error.details.fieldErrors.homeDepotId).toBeDefined();

    const udiBad = await fleet.agent
      .post('/api/units')
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({
        modelId,
        serialNumber: `KS-${unique()}`,
        udiDi: '1234567890123',
        homeDepotId: lender.depotId,
      })
      .expect(422);
    expect(Object.keys(udiBad.body.error.details.fieldErrors)).toEqual(['udiDi']);
    expect(await countRows(t.dataSource, 'units', 'model_id = ?', [modelId])).toBe(1);
  });

  it('changes a unit’s status; retired units are hidden from hospitals', async () => {
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const [unit] = await t.dataSource.query('SELECT serial_number FROM units WHERE id = ?', [
      unitId,
    ]);
    await fleet.agent
      .put(`/api/units/${unitId}`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ serialNumber: unit.serial_number, homeDepotId: lender.depotId, status: 'retired' })
      .expect(200);
    const [after] = await t.dataSource.query('SELECT status FROM units WHERE id = ?', [unitId]);
    expect(after.status).toBe('retired');
    const hospital = await makeHospital(t.dataSource);
    const buyer = await sign(hospital.buyer);
    const seen = await buyer.agent.get(`/api/units?modelId=${modelId}`).expect(200);
    expect(seen.body.items.map((u: { id: number }) => u.id)).not.toContain(unitId);
    const own = await fleet.agent.get(`/api/units?modelId=${modelId}`).expect(200);
    expect(own.body.items.map((u: { id: number }) => u.id)).toContain(unitId);
  });

  it('blocks a unit for maintenance, refuses an overlap, and lifts the hold', async () => {
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const start = mondayAfter(40);
    const end = addCalendarDays(start, 4);
    const coordinator = await sign(lender.coordinator);
    const res = await coordinator.agent
      .post(`/api/units/${unitId}/holds`)
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .send({ start, end, reason: 'Annual service' })
      .expect(201);
    expect(res.body.hold).toMatchObject({
      kind: 'maintenance',
      start,
      end,
      reason: 'Annual service',
    });
    const [hold] = await t.dataSource.query(
      'SELECT kind, CAST(start_date AS CHAR) AS s, CAST(end_date AS CHAR) AS e, sequence FROM holds WHERE unit_id = ?',
      [unitId],
    );
    expect(hold).toEqual({ kind: 'maintenance', s: start, e: end, sequence: 1 });
    const [version] = await t.dataSource.query('SELECT booking_version FROM units WHERE id = ?', [
      unitId,
    ]);
    expect(version.booking_version).toBe(1);

    const overlap = await coordinator.agent
      .post(`/api/units/${unitId}/holds`)
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .send({ start: end, end: addCalendarDays(end, 2), reason: 'Second service' })
      .expect(409);
    expect(overlap.body.error.code).toBe('hold_conflict');
    expect(await countRows(t.dataSource, 'holds', 'unit_id = ?', [unitId])).toBe(1);

    const other = await makeLender(t.dataSource);
    const stranger = await sign(other.coordinator);
    await stranger.agent
      .delete(`/api/units/${unitId}/holds/${res.body.hold.id}`)
      .set('X-XSRF-TOKEN', stranger.csrf)
      .expect(403);
    await coordinator.agent
      .delete(`/api/units/${unitId}/holds/${res.body.hold.id}`)
      .set('X-XSRF-TOKEN', coordinator.csrf)
      .expect(204);
    expect(await countRows(t.dataSource, 'holds', 'unit_id = ?', [unitId])).toBe(0);
  });

  it('refuses an end before the start', async () => {
    const unitId = await makeUnit(t.dataSource, modelId, lender.depotId);
    const start = mondayAfter(30);
    const res = await fleet.agent
      .post(`/api/units/${unitId}/holds`)
      .set('X-XSRF-TOKEN', fleet.csrf)
      .send({ start, end: addCalendarDays(start, -1), reason: 'Service' })
      .expect(422);
    expect(Object.keys(res.body.error.details.fieldErrors)).toEqual(['end']);
  });
});
