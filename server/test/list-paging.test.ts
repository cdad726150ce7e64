import { startTestApp, type TestApp } from './helpers/app';
import { makeHospital, makeLender, makeModel, makeUnit } from './helpers/catalog';
import { makeOrganisation, makePerson } from './helpers/factories';
import { signedInClient } from './helpers/http';
import { insertApprovedLoan } from './helpers/payments';

// The one paging contract of list routes: `?page=&size=&sort=field,dir&q=` answered with
// `{items, total, page, size}`. Each test makes its own organisation, so counts are exact.

let t: TestApp;

beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

describe('members list paging', () => {
  it('pages, sorts and searches one organisation’s members, counting the matches', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const buyer = await makePerson(t.dataSource, org.id, 'buyer');
    await makePerson(t.dataSource, org.id, 'clinician');
    await makePerson(t.dataSource, org.id, 'clinician', { pending: true });
    await makePerson(t.dataSource, org.id, 'clinician', { active: false });
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    const url = `/api/organisations/${org.id}/members`;

    const [{ count }] = await t.dataSource.query(
      'SELECT COUNT(*) AS count FROM memberships WHERE organisation_id = ?',
      [org.id],
    );
    expect(Number(count)).toBe(4);
    const names: { name: string }[] = await t.dataSource.query(
      `SELECT u.name FROM memberships ms JOIN users u ON u.id = ms.user_id
        WHERE ms.organisation_id = ? ORDER BY u.name DESC`,
      [org.id],
    );

    const first = await client.agent.get(`${url}?size=3&sort=name,desc`).expect(200);
    expect(first.body).toMatchObject({ total: 4, page: 0, size: 3, pending: 1, deactivated: 1 });
    expect(first.body.items.map((m: { name: string }) => m.name)).toEqual(
      names.slice(0, 3).map((r) => r.name),
    );
    const second = await client.agent.get(`${url}?size=3&page=1&sort=name,desc`).expect(200);
    expect(second.body.items.map((m: { name: string }) => m.name)).toEqual([names[3]!.name]);

    // Status words match too: "invitation" finds the person who has not accepted.
    const invited = await client.agent.get(`${url}?q=invitation`).expect(200);
    expect(invited.body).toMatchObject({ total: 1, pending: 1, deactivated: 0 });
    expect(invited.body.items[0].pending).toBe(true);
    // Role words: "buyer" is the one hospital buyer.
    const buyers = await client.agent.get(`${url}?q=buyer`).expect(200);
    expect(buyers.body.items.map((m: { userId: number }) => m.userId)).toEqual([buyer.userId]);

    await client.agent.get(`${url}?sort=password,asc`).expect(400);
    await client.agent.get(`${url}?size=501`).expect(400);
  });
});

describe('models and units list paging', () => {
  it('pages a lender’s models by list value and adds up their units', async () => {
    const lender = await makeLender(t.dataSource);
    const values = [3_000_000, 9_000_000, 6_000_000];
    const ids = [];
    for (const listValue of values)
      ids.push(await makeModel(t.dataSource, lender.id, { listValue }));
    await makeUnit(t.dataSource, ids[0]!, lender.depotId);
    await makeUnit(t.dataSource, ids[1]!, lender.depotId);
    await makeUnit(t.dataSource, ids[1]!, lender.depotId, 'retired');
    const fleet = await signedInClient(t.app, lender.fleet.email, lender.fleet.password);

    const [{ units }] = await t.dataSource.query(
      `SELECT COUNT(*) AS units FROM units u JOIN models m ON m.id = u.model_id
        WHERE m.lender_id = ? AND u.status <> 'retired'`,
      [lender.id],
    );
    const res = await fleet.agent
      .get(`/api/models?lenderId=${lender.id}&sort=listValue,desc&size=2`)
      .expect(200);
    expect(res.body).toMatchObject({ total: 3, page: 0, size: 2, unitTotal: Number(units) });
    expect(res.body.items.map((m: { id: number }) => m.id)).toEqual([ids[1], ids[2]]);
    const last = await fleet.agent
      .get(`/api/models?lenderId=${lender.id}&sort=listValue,desc&size=2&page=1`)
      .expect(200);
    expect(last.body.items.map((m: { id: number }) => m.id)).toEqual([ids[0]]);
  });

  it('pages units with status counts; retired units only for the lender’s people', async () => {
    const lender = await makeLender(t.dataSource);
    const modelId = await makeModel(t.dataSource, lender.id);
    const active = [
      await makeUnit(t.dataSource, modelId, lender.depotId),
      await makeUnit(t.dataSource, modelId, lender.depotId),
    ];
    await makeUnit(t.dataSource, modelId, lender.depotId, 'maintenance');
    await makeUnit(t.dataSource, modelId, lender.depotId, 'retired');
    const fleet = await signedInClient(t.app, lender.fleet.email, lender.fleet.password);
    const hospital = await makeHospital(t.dataSource);
    const buyer = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);

    const byStatus: { status: string; count: string }[] = await t.dataSource.query(
      'SELECT status, COUNT(*) AS count FROM units WHERE model_id = ? GROUP BY status',
      [modelId],
    );
    const own = await fleet.agent.get(`/api/units?lenderId=${lender.id}&size=2`).expect(200);
    expect(own.body).toMatchObject({ total: 4, page: 0, size: 2 });
    expect(own.body.items).toHaveLength(2);
    expect(
      Object.fromEntries(
        own.body.statusCounts.map((c: { status: string; count: number }) => [c.status, c.count]),
      ),
    ).toEqual(Object.fromEntries(byStatus.map((r) => [r.status, Number(r.count)])));

    const seen = await buyer.agent.get(`/api/units?modelId=${modelId}`).expect(200);
    expect(seen.body.total).toBe(3);
    expect(seen.body.items.every((u: { status: string }) => u.status !== 'retired')).toBe(true);

    const [{ serial_number: serial }] = await t.dataSource.query(
      'SELECT serial_number FROM units WHERE id = ?',
      [active[1]],
    );
    const found = await fleet.agent
      .get(`/api/units?lenderId=${lender.id}&q=${encodeURIComponent(serial)}`)
      .expect(200);
    expect(found.body.items.map((u: { id: number }) => u.id)).toEqual([active[1]]);
    const bySerial = await fleet.agent
      .get(`/api/units?lenderId=${lender.id}&status=active&sort=serial,desc`)
      .expect(200);
    const serials = bySerial.body.items.map((u: { serialNumber: string }) => u.serialNumber);
    expect(serials).toEqual([...serials].sort().reverse());
    expect(serials).toHaveLength(2);
  });
});

describe('loans list paging', () => {
  it('pages a hospital’s loans with counts per state, and keeps the older `limit`', async () => {
    const lender = await makeLender(t.dataSource);
    const hospital = await makeHospital(t.dataSource);
    const first = await insertApprovedLoan(t.dataSource, lender, hospital, { shipInDays: 3 });
    const second = await insertApprovedLoan(t.dataSource, lender, hospital, { shipInDays: 9 });
    const buyer = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);

    const rows: { id: number; state: string }[] = await t.dataSource.query(
      'SELECT id, state FROM loans WHERE hospital_id = ? ORDER BY id',
      [hospital.id],
    );
    expect(rows.map((r) => Number(r.id))).toEqual([first.id, second.id]);

    const page = await buyer.agent.get('/api/loans?size=1&sort=window,desc').expect(200);
    expect(page.body).toMatchObject({
      total: 2,
      page: 0,
      size: 1,
      stateCounts: [{ state: 'approved', count: 2 }],
    });
    expect(page.body.items.map((l: { id: number }) => l.id)).toEqual([second.id]);
    const next = await buyer.agent.get('/api/loans?size=1&page=1&sort=window,desc').expect(200);
    expect(next.body.items.map((l: { id: number }) => l.id)).toEqual([first.id]);

    const none = await buyer.agent.get('/api/loans?state=requested,closed').expect(200);
    expect(none.body).toMatchObject({ items: [], total: 0 });
    expect(none.body.stateCounts).toEqual([{ state: 'approved', count: 2 }]);

    const older = await buyer.agent.get('/api/loans?limit=1').expect(200);
    expect(older.body).toMatchObject({ total: 2, page: 0, size: 1 });
    expect(older.body.items.map((l: { id: number }) => l.id)).toEqual([second.id]);

    await buyer.agent.get('/api/loans?state=requested,lost').expect(400);
  });
});
