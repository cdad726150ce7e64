import request from 'supertest';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson, type TestPerson } from './helpers/factories';
import { setCookies } from './helpers/http';

// Two apps on one database stand for two server processes: each has its own signed-in person
// cache and its own session-touch bookkeeping. A change made anywhere (here: plain SQL, as
// another process, the members screens or an operator would make it) must show on the very
// next request to either of them.
let a: TestApp;
let b: TestApp;
let hospital: { id: number; name: string };
let lender: { id: number; name: string };

beforeAll(async () => {
  a = await startTestApp();
  b = await startTestApp();
  hospital = await makeOrganisation(a.dataSource, 'hospital');
  lender = await makeOrganisation(a.dataSource, 'lender');
});
afterAll(async () => {
  await a.close();
  await b.close();
});

/** Signs in on app `a`; returns the cookie header that works on both apps and the CSRF token. */
async function signIn(person: TestPerson): Promise<{ cookie: string; csrf: string }> {
  const first = await request(a.app).get('/api/auth/csrf').expect(200);
  const anonymous = setCookies(first).map((c) => c.split(';')[0]);
  const csrf = (first.body as { csrfToken: string }).csrfToken;
  const login = await request(a.app)
    .post('/api/auth/login')
    .set('Cookie', anonymous.join('; '))
    .set('X-XSRF-TOKEN', csrf)
    .send({ email: person.email, password: person.password })
    .expect(200);
  const sid = setCookies(login)
    .map((c) => c.split(';')[0]!)
    .find((c) => c.startsWith('evalon.sid='));
  const xsrf = setCookies(login)
    .map((c) => c.split(';')[0]!)
    .find((c) => c.startsWith('XSRF-TOKEN='));
  return { cookie: [sid, xsrf].join('; '), csrf: decodeURIComponent(xsrf!.split('=')[1]!) };
}

async function me(app: TestApp, cookie: string) {
  return request(app.app).get('/api/auth/me').set('Cookie', cookie);
}

/** Both apps answer /me once, so both caches hold the person before the change. */
async function warmBoth(cookie: string) {
  const [ra, rb] = [await me(a, cookie), await me(b, cookie)];
  expect(ra.status).toBe(200);
  expect(rb.status).toBe(200);
  return ra.body.user as { memberships: { role: string; organisationName: string }[] };
}

describe('signed-in person cache', () => {
  it('a role change shows on the next request to every process', async () => {
    const person = await makePerson(a.dataSource, hospital.id, 'buyer');
    const { cookie } = await signIn(person);
    expect((await warmBoth(cookie)).memberships.map((m) => m.role)).toEqual(['buyer']);
    await a.dataSource.query("UPDATE memberships SET role = 'coordinator' WHERE id = ?", [
      person.membershipId,
    ]);
    for (const app of [b, a]) {
      const res = await me(app, cookie);
      expect(res.status).toBe(200);
      expect(res.body.user.memberships.map((m: { role: string }) => m.role)).toEqual([
        'coordinator',
      ]);
    }
  });

  it('an added and a removed membership show on the next request', async () => {
    const person = await makePerson(a.dataSource, hospital.id, 'buyer');
    const { cookie } = await signIn(person);
    await warmBoth(cookie);
    await a.dataSource.query(
      "INSERT INTO memberships (user_id, organisation_id, role, created_at) VALUES (?, ?, 'coordinator', NOW(3))",
      [person.userId, lender.id],
    );
    const added = await me(b, cookie);
    expect(
      added.body.user.memberships.map((m: { organisationId: number }) => m.organisationId),
    ).toEqual(expect.arrayContaining([hospital.id, lender.id]));
    await a.dataSource.query('DELETE FROM memberships WHERE id = ?', [person.membershipId]);
    const removed = await me(b, cookie);
    expect(removed.body.user.memberships).toEqual([
      expect.objectContaining({ organisationId: lender.id, role: 'coordinator' }),
    ]);
  });

  it('a role lost takes the route away at once (403 on the next request)', async () => {
    const person = await makePerson(a.dataSource, lender.id, 'fleet_manager');
    const { cookie } = await signIn(person);
    // A fleet managers' read: answered before the role goes, refused right after.
    const path = `/api/lenders/${lender.id}/depots`;
    expect((await request(b.app).get(path).set('Cookie', cookie)).status).toBe(200);
    expect((await request(a.app).get(path).set('Cookie', cookie)).status).toBe(200);
    await a.dataSource.query("UPDATE memberships SET role = 'buyer' WHERE id = ?", [
      person.membershipId,
    ]);
    const after = await request(b.app).get(path).set('Cookie', cookie);
    expect(after.status).toBe(403);
  });

  it('deactivation ends the session on the next request to every process (401)', async () => {
    const person = await makePerson(a.dataSource, hospital.id, 'buyer');
    const { cookie } = await signIn(person);
    await warmBoth(cookie);
    await a.dataSource.query('UPDATE users SET active = 0 WHERE id = ?', [person.userId]);
    const res = await me(b, cookie);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('account_deactivated');
  });

  it('a renamed organisation and a renamed person show on the next request', async () => {
    const org = await makeOrganisation(a.dataSource, 'hospital');
    const person = await makePerson(a.dataSource, org.id, 'buyer');
    const { cookie } = await signIn(person);
    await warmBoth(cookie);
    const newName = `${org.name} renamed`;
    await a.dataSource.query('UPDATE organisations SET name = ? WHERE id = ?', [newName, org.id]);
    await a.dataSource.query("UPDATE users SET name = 'Renamed Person' WHERE id = ?", [
      person.userId,
    ]);
    const res = await me(b, cookie);
    expect(res.body.user.name).toBe('Renamed Person');
    expect(res.body.user.memberships[0].organisationName).toBe(newName);
  });

  it('signing out on one process ends the session on the others', async () => {
    const person = await makePerson(a.dataSource, hospital.id, 'buyer');
    const { cookie, csrf } = await signIn(person);
    await warmBoth(cookie);
    await request(a.app)
      .post('/api/auth/logout')
      .set('Cookie', cookie)
      .set('X-XSRF-TOKEN', csrf)
      .expect(204);
    expect((await me(b, cookie)).status).toBe(401);
    expect((await me(a, cookie)).status).toBe(401);
  });

  it('a sign-in time change (last_sign_in_at) does not invalidate the cache', async () => {
    const person = await makePerson(a.dataSource, hospital.id, 'buyer');
    const [before] = await a.dataSource.query('SELECT auth_version AS v FROM users WHERE id = ?', [
      person.userId,
    ]);
    await a.dataSource.query('UPDATE users SET last_sign_in_at = NOW(3) WHERE id = ?', [
      person.userId,
    ]);
    const [after] = await a.dataSource.query('SELECT auth_version AS v FROM users WHERE id = ?', [
      person.userId,
    ]);
    expect(Number(after.v)).toBe(Number(before.v));
  });
});
