import request from 'supertest';
import { startTestApp, type TestApp } from './helpers/app';
import { jsonColumn, makeOrganisation, makePerson, makeSite } from './helpers/factories';
import { signedInClient } from './helpers/http';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

describe('own profile', () => {
  it('changes name and time zone, answers {user}, and audits the change', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const client = await signedInClient(t.app, person.email, person.password);
    const res = await client.agent
      .patch('/api/auth/me')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ name: 'Renamed Person', timeZone: 'America/Chicago' })
      .expect(200);
    expect(res.body.user).toMatchObject({
      id: person.userId,
      name: 'Renamed Person',
      timeZone: 'America/Chicago',
    });
    const [row] = await t.dataSource.query('SELECT name, time_zone FROM users WHERE id = ?', [
      person.userId,
    ]);
    expect(row).toEqual({ name: 'Renamed Person', time_zone: 'America/Chicago' });
    const [audit] = await t.dataSource.query(
      "SELECT detail FROM audit_events WHERE action = 'user.profile_updated' AND actor_user_id = ?",
      [person.userId],
    );
    expect(jsonColumn(audit.detail)).toEqual({
      name: { from: person.name, to: 'Renamed Person' },
      timeZone: { from: null, to: 'America/Chicago' },
    });
  });

  it('refuses a time zone that is not an IANA zone (422 with the field)', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const client = await signedInClient(t.app, person.email, person.password);
    const res = await client.agent
      .patch('/api/auth/me')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ timeZone: 'Mars/Olympus_Mons' })
      .expect(422);
    expect(res.body.error.details.fieldErrors.timeZone).toBeDefined();
  });

  it('changes the password after checking the current one; other sessions end, this one stays', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const other = await signedInClient(t.app, person.email, person.password);
    const client = await signedInClient(t.app, person.email, person.password);
    const wrong = await client.agent
      .post('/api/auth/change-password')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ currentPassword: 'not-my-password', newPassword: 'a-new-password-1' })
      .expect(422);
    expect(wrong.body.error).toMatchObject({ code: 'invalid_current_password' });
    expect(wrong.body.error.details.fieldErrors.currentPassword).toBeDefined();
    await client.agent
      .post('/api/auth/change-password')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ currentPassword: person.password, newPassword: 'a-new-password-1' })
      .expect(204);
    await client.agent.get('/api/auth/me').expect(200);
    await other.agent.get('/api/auth/me').expect(401);
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE user_id = ?', [person.userId]),
    ).toHaveLength(1);
    await signedInClient(t.app, person.email, 'a-new-password-1');
  });
});

describe('organisations and sites', () => {
  it('lists only the person’s own organisation, or every organisation for the admin', async () => {
    const mine = await makeOrganisation(t.dataSource, 'hospital');
    const theirs = await makeOrganisation(t.dataSource, 'lender');
    const buyer = await makePerson(t.dataSource, mine.id, 'buyer');
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    const res = await client.agent.get('/api/organisations').expect(200);
    expect(res.body).toEqual({
      items: [{ id: mine.id, name: mine.name, kind: 'hospital', country: 'US' }],
    });

    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const adminClient = await signedInClient(t.app, admin.email, admin.password);
    const all = await adminClient.agent.get('/api/organisations').expect(200);
    const ids = (all.body.items as { id: number }[]).map((o) => o.id);
    expect(ids).toEqual(expect.arrayContaining([mine.id, theirs.id, platform.id]));
    const [count] = await t.dataSource.query('SELECT COUNT(*) AS n FROM organisations');
    expect(ids).toHaveLength(Number(count.n));
  });

  it('shows own campuses and every lender depot, not other hospitals’ campuses', async () => {
    const mine = await makeOrganisation(t.dataSource, 'hospital');
    const otherHospital = await makeOrganisation(t.dataSource, 'hospital');
    const lender = await makeOrganisation(t.dataSource, 'lender');
    const myCampus = await makeSite(t.dataSource, mine.id, 'campus', 'America/Chicago');
    const theirCampus = await makeSite(t.dataSource, otherHospital.id, 'campus');
    const depot = await makeSite(t.dataSource, lender.id, 'depot', 'Europe/Berlin');
    const buyer = await makePerson(t.dataSource, mine.id, 'buyer');
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    const res = await client.agent.get('/api/sites').expect(200);
    const items = res.body.items as {
      id: number;
      kind: string;
      organisationId: number;
      timeZone: string;
      latitude: number;
      cutoffTime: string | null;
    }[];
    const ids = items.map((s) => s.id);
    expect(ids).toContain(myCampus);
    expect(ids).toContain(depot);
    expect(ids).not.toContain(theirCampus);
    expect(items.every((s) => s.organisationId === mine.id || s.kind === 'depot')).toBe(true);
    expect(items.find((s) => s.id === depot)).toMatchObject({
      timeZone: 'Europe/Berlin',
      latitude: 40.5,
      cutoffTime: '15:00',
    });
  });

  it('needs a session', async () => {
    await request(t.app).get('/api/sites').expect(401);
    await request(t.app).get('/api/organisations').expect(401);
  });
});

describe('audit trail', () => {
  it('shows a managing member their organisation’s events, not another’s', async () => {
    const org = await makeOrganisation(t.dataSource, 'lender');
    const other = await makeOrganisation(t.dataSource, 'lender');
    const fleet = await makePerson(t.dataSource, org.id, 'fleet_manager');
    const client = await signedInClient(t.app, fleet.email, fleet.password);
    await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: `audit.${org.id}@test.example`, name: 'Audit Subject', role: 'coordinator' })
      .expect(201);
    const res = await client.agent.get(`/api/audit?organisationId=${org.id}`).expect(200);
    expect(res.body.items).toHaveLength(1);
    expect(res.body.items[0]).toMatchObject({
      actorUserId: fleet.userId,
      organisationId: org.id,
      action: 'member.invited',
    });
    expect(Date.parse(res.body.items[0].at)).not.toBeNaN();
    await client.agent.get(`/api/audit?organisationId=${other.id}`).expect(403);
    await client.agent.get('/api/audit').expect(403);
  });

  it('is closed to non-managing roles and open to the admin for any organisation', async () => {
    const org = await makeOrganisation(t.dataSource, 'lender');
    const coordinator = await makePerson(t.dataSource, org.id, 'coordinator');
    const coordinatorClient = await signedInClient(t.app, coordinator.email, coordinator.password);
    await coordinatorClient.agent.get(`/api/audit?organisationId=${org.id}`).expect(403);

    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const adminClient = await signedInClient(t.app, admin.email, admin.password);
    await adminClient.agent.get(`/api/audit?organisationId=${org.id}`).expect(200);
    const all = await adminClient.agent.get('/api/audit?limit=5').expect(200);
    expect(all.body.items.length).toBeGreaterThan(0);
    expect(all.body.items.length).toBeLessThanOrEqual(5);
    const ids = (all.body.items as { id: number }[]).map((e) => e.id);
    expect([...ids].sort((a, b) => b - a)).toEqual(ids);
  });
});
