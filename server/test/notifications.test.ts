import request from 'supertest';
import { notifyUsers, recipientsFor } from '../src/notifications/domain/in-app';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson, makeSite, unique } from './helpers/factories';
import { signedInClient } from './helpers/http';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

async function rowsOf(userId: number): Promise<{ id: number; read_at: Date | null }[]> {
  return t.dataSource.query('SELECT id, read_at FROM notifications WHERE user_id = ? ORDER BY id', [
    userId,
  ]);
}

describe('notifyUsers', () => {
  it('writes in the caller’s transaction: nothing on rollback, one per person on commit', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const a = await makePerson(t.dataSource, org.id, 'buyer');
    const b = await makePerson(t.dataSource, org.id, 'clinician');
    const note = { kind: 'test.event', title: 'Something happened', body: 'Details.' };
    await expect(
      t.dataSource.transaction(async (m) => {
        await notifyUsers(m, [a.userId, b.userId], note);
        throw new Error('the cause failed');
      }),
    ).rejects.toThrow('the cause failed');
    expect(await rowsOf(a.userId)).toHaveLength(0);

    await t.dataSource.transaction((m) => notifyUsers(m, [a.userId, b.userId, a.userId], note));
    expect(await rowsOf(a.userId)).toHaveLength(1);
    expect(await rowsOf(b.userId)).toHaveLength(1);
  });

  it('gives each person one notification per dedupe key, however often the cause replays', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const a = await makePerson(t.dataSource, org.id, 'buyer');
    const b = await makePerson(t.dataSource, org.id, 'buyer');
    const dedupeKey = `loan:${unique()}:confirmed`;
    const note = { kind: 'loan.confirmed', title: 'Confirmed', body: 'Arrives soon.', dedupeKey };
    await t.dataSource.transaction((m) => notifyUsers(m, [a.userId], note));
    await t.dataSource.transaction((m) => notifyUsers(m, [a.userId, b.userId], note));
    await t.dataSource.transaction((m) => notifyUsers(m, [a.userId, b.userId], note));
    expect(await rowsOf(a.userId)).toHaveLength(1);
    expect(await rowsOf(b.userId)).toHaveLength(1);
  });
});

describe('recipientsFor', () => {
  it('finds active people with the roles, once each, and nobody for a site of another organisation', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const campus = await makeSite(t.dataSource, org.id, 'campus');
    const buyer = await makePerson(t.dataSource, org.id, 'buyer');
    const clinician = await makePerson(t.dataSource, org.id, 'clinician');
    await makePerson(t.dataSource, org.id, 'clinician', { active: false });
    // The buyer is also a clinician: listed once, with both roles.
    await t.dataSource.query(
      'INSERT INTO memberships (user_id, organisation_id, role, created_at) VALUES (?, ?, ?, ?)',
      [buyer.userId, org.id, 'clinician', new Date()],
    );
    await t.dataSource.query('UPDATE users SET time_zone = ? WHERE id = ?', [
      'Europe/Berlin',
      clinician.userId,
    ]);

    const found = await recipientsFor(t.dataSource.manager, {
      organisationId: org.id,
      roles: ['buyer', 'clinician'],
      siteId: campus,
    });
    expect(found).toEqual([
      {
        userId: buyer.userId,
        email: buyer.email,
        name: buyer.name,
        timeZone: null,
        roles: ['buyer', 'clinician'],
      },
      {
        userId: clinician.userId,
        email: clinician.email,
        name: clinician.name,
        timeZone: 'Europe/Berlin',
        roles: ['clinician'],
      },
    ]);
    const buyersOnly = await recipientsFor(t.dataSource.manager, {
      organisationId: org.id,
      roles: ['buyer'],
    });
    expect(buyersOnly.map((r) => r.userId)).toEqual([buyer.userId]);

    const other = await makeOrganisation(t.dataSource, 'hospital');
    const foreignSite = await makeSite(t.dataSource, other.id, 'campus');
    expect(
      await recipientsFor(t.dataSource.manager, {
        organisationId: org.id,
        roles: ['buyer'],
        siteId: foreignSite,
      }),
    ).toEqual([]);
  });
});

describe('notifications API', () => {
  async function personWithNotifications(count: number) {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const person = await makePerson(t.dataSource, org.id, 'buyer');
    for (let i = 1; i <= count; i++) {
      await t.dataSource.transaction((m) =>
        notifyUsers(m, [person.userId], {
          kind: 'test.event',
          title: `Notice ${i}`,
          body: `Body ${i}`,
          link: `/loans/${i}`,
        }),
      );
    }
    const client = await signedInClient(t.app, person.email, person.password);
    return { person, client };
  }

  it('lists only the person’s own notifications, newest first, with the unread count', async () => {
    const { client } = await personWithNotifications(3);
    await personWithNotifications(2); // someone else's
    const res = await client.agent.get('/api/notifications').expect(200);
    expect(res.body.unreadCount).toBe(3);
    expect(res.body.items.map((n: { title: string }) => n.title)).toEqual([
      'Notice 3',
      'Notice 2',
      'Notice 1',
    ]);
    expect(res.body.items[0]).toMatchObject({
      kind: 'test.event',
      body: 'Body 3',
      link: '/loans/3',
      readAt: null,
    });
    const limited = await client.agent.get('/api/notifications?limit=1').expect(200);
    expect(limited.body.items).toHaveLength(1);
    expect(limited.body.unreadCount).toBe(3);
  });

  it('marks one read (its own only: 404 for anyone else’s) and filters by unread', async () => {
    const { person, client } = await personWithNotifications(2);
    const stranger = await personWithNotifications(1);
    const [mine] = await rowsOf(person.userId);
    const [theirs] = await rowsOf(stranger.person.userId);

    const read = await client.agent
      .post(`/api/notifications/${mine!.id}/read`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    expect(read.body.unreadCount).toBe(1);
    expect(read.body.notification.readAt).not.toBeNull();
    // Reading again keeps the first read time.
    const again = await client.agent
      .post(`/api/notifications/${mine!.id}/read`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    expect(again.body.notification.readAt).toBe(read.body.notification.readAt);

    const refused = await client.agent
      .post(`/api/notifications/${theirs!.id}/read`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(404);
    expect(refused.body.error.code).toBe('notification_not_found');
    expect((await rowsOf(stranger.person.userId))[0]!.read_at).toBeNull();

    const unread = await client.agent.get('/api/notifications?unread=true').expect(200);
    expect(unread.body.items.map((n: { id: number }) => n.id)).not.toContain(mine!.id);
    expect(unread.body.items).toHaveLength(1);
    const readOnes = await client.agent.get('/api/notifications?unread=false').expect(200);
    expect(readOnes.body.items.map((n: { id: number }) => n.id)).toEqual([mine!.id]);
  });

  it('marks all of the person’s own read, and nobody else’s', async () => {
    const { person, client } = await personWithNotifications(3);
    const stranger = await personWithNotifications(2);
    const res = await client.agent
      .post('/api/notifications/read-all')
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    expect(res.body).toEqual({ updated: 3, unreadCount: 0 });
    expect((await rowsOf(person.userId)).every((r) => r.read_at !== null)).toBe(true);
    expect((await rowsOf(stranger.person.userId)).every((r) => r.read_at === null)).toBe(true);
    const second = await client.agent
      .post('/api/notifications/read-all')
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    expect(second.body).toEqual({ updated: 0, unreadCount: 0 });
  });

  it('answers 401 without a session and 400 for a bad id', async () => {
    await request(t.app).get('/api/notifications').expect(401);
    const { client } = await personWithNotifications(0);
    await client.agent
      .post('/api/notifications/abc/read')
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(400);
  });
});
