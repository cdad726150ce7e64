import request from 'supertest';
import { startTestApp, type TestApp } from './helpers/app';
import { jsonColumn, makeOrganisation, makePerson } from './helpers/factories';
import {
  anonymousClient,
  cookieValue,
  sessionIdOf,
  setCookie,
  signedInClient,
} from './helpers/http';

let t: TestApp;
let hospital: { id: number; name: string };

beforeAll(async () => {
  t = await startTestApp();
  hospital = await makeOrganisation(t.dataSource, 'hospital');
});
afterAll(() => t.close());

async function sessionRows(userId: number): Promise<{ session_id: string; expires: number }[]> {
  return t.dataSource.query('SELECT session_id, expires FROM sessions WHERE user_id = ?', [userId]);
}

describe('sign-in with e-mail and password', () => {
  it('answers {user}, records the sign-in and writes an audit event', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await anonymousClient(t.app);
    const before = Date.now();
    const res = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: `  ${buyer.email.toUpperCase()} `, password: buyer.password })
      .expect(200);
    expect(res.body).toEqual({
      user: {
        id: buyer.userId,
        email: buyer.email,
        name: buyer.name,
        timeZone: null,
        memberships: [
          {
            organisationId: hospital.id,
            organisationName: hospital.name,
            organisationKind: 'hospital',
            role: 'buyer',
          },
        ],
      },
    });
    const [user] = await t.dataSource.query('SELECT last_sign_in_at FROM users WHERE id = ?', [
      buyer.userId,
    ]);
    expect(new Date(user.last_sign_in_at).getTime()).toBeGreaterThanOrEqual(before - 5);
    const audit = await t.dataSource.query(
      "SELECT action, detail FROM audit_events WHERE actor_user_id = ? AND action = 'user.signed_in'",
      [buyer.userId],
    );
    expect(audit).toHaveLength(1);
    expect(jsonColumn(audit[0].detail)).toEqual({ method: 'password' });
    const me = await client.agent.get('/api/auth/me').expect(200);
    expect(me.body.user.id).toBe(buyer.userId);
  });

  it('sets HttpOnly, SameSite=Lax session cookie without Secure on an http public URL', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: buyer.email, password: buyer.password })
      .expect(200);
    const sid = setCookie(res, 'evalon.sid');
    const xsrf = setCookie(res, 'XSRF-TOKEN');
    expect(sid).toMatch(/; HttpOnly/);
    expect(sid).toMatch(/; SameSite=Lax/);
    expect(sid).not.toMatch(/; Secure/);
    // The CSRF cookie must be readable by the app's script, so it is not HttpOnly.
    expect(xsrf).toMatch(/; SameSite=Lax/);
    expect(xsrf).not.toMatch(/HttpOnly/);
    expect(xsrf).not.toMatch(/; Secure/);
  });

  it('idle timeout: the cookie and the stored session expire 8 h after the last request', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: buyer.email, password: buyer.password })
      .expect(200);
    const expires = /Expires=([^;]+)/.exec(setCookie(res, 'evalon.sid') ?? '')?.[1];
    const eightHours = 8 * 3_600_000;
    expect(Math.abs(Date.parse(expires!) - (Date.now() + eightHours))).toBeLessThan(60_000);
    const [row] = await sessionRows(buyer.userId);
    expect(Math.abs(row!.expires * 1000 - (Date.now() + eightHours))).toBeLessThan(60_000);
    // Rolling: a later request renews the cookie.
    const again = await client.agent.get('/api/auth/me').expect(200);
    expect(setCookie(again, 'evalon.sid')).toBeDefined();
  });

  it('regenerates the session id at sign-in and drops the old session row', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const agent = request.agent(t.app);
    const first = await agent.get('/api/auth/csrf').expect(200);
    const before = sessionIdOf(setCookie(first, 'evalon.sid'));
    expect(before).toBeDefined();
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE session_id = ?', [before]),
    ).toHaveLength(1);
    const res = await agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', first.body.csrfToken)
      .send({ email: buyer.email, password: buyer.password })
      .expect(200);
    const after = sessionIdOf(setCookie(res, 'evalon.sid'));
    expect(after).toBeDefined();
    expect(after).not.toBe(before);
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE session_id = ?', [before]),
    ).toHaveLength(0);
    expect((await sessionRows(buyer.userId)).map((r) => r.session_id)).toEqual([after]);
    // The CSRF token is new as well; the old one no longer works.
    const newToken = cookieValue(res, 'XSRF-TOKEN');
    expect(newToken).toBeDefined();
    expect(newToken).not.toBe(first.body.csrfToken);
    await agent.post('/api/auth/logout').set('X-XSRF-TOKEN', first.body.csrfToken).expect(403);
  });

  it('answers the same 401 for an unknown e-mail and a wrong password', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await anonymousClient(t.app);
    const wrong = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: buyer.email, password: 'not-the-password' })
      .expect(401);
    const unknown = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: `nobody.${buyer.userId}@test.example`, password: 'whatever-it-is' })
      .expect(401);
    const expected = {
      error: { code: 'invalid_credentials', message: 'E-mail or password is not right.' },
    };
    expect(wrong.body).toEqual(expected);
    expect(unknown.body).toEqual(expected);
    // No session was started for the person.
    const [user] = await t.dataSource.query('SELECT last_sign_in_at FROM users WHERE id = ?', [
      buyer.userId,
    ]);
    expect(user.last_sign_in_at).toBeNull();
    expect(await sessionRows(buyer.userId)).toHaveLength(0);
  });

  it('tells a deactivated person so only when the password was right', async () => {
    const gone = await makePerson(t.dataSource, hospital.id, 'clinician', { active: false });
    const client = await anonymousClient(t.app);
    const wrong = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: gone.email, password: 'not-the-password' })
      .expect(401);
    expect(wrong.body.error.code).toBe('invalid_credentials');
    const right = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: gone.email, password: gone.password })
      .expect(401);
    expect(right.body).toEqual({
      error: {
        code: 'account_deactivated',
        message: 'This account has been deactivated. Ask your organisation’s administrator.',
      },
    });
    expect(await sessionRows(gone.userId)).toHaveLength(0);
  });

  it('answers 422 with field messages for a malformed body', async () => {
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: 'not-an-address', password: '' })
      .expect(422);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.details.fieldErrors.email).toEqual(['Enter a valid e-mail address.']);
    expect(res.body.error.details.fieldErrors.password).toEqual(['Enter your password.']);
  });
});

describe('session and CSRF guards', () => {
  it('answers 401 on /api/auth/me without a session', async () => {
    const res = await request(t.app).get('/api/auth/me').expect(401);
    expect(res.body).toEqual({ error: { code: 'not_signed_in', message: 'Sign in to continue.' } });
  });

  it('refuses changing requests without the X-XSRF-TOKEN header (403 csrf_failed)', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await anonymousClient(t.app);
    const noHeader = await client.agent
      .post('/api/auth/login')
      .send({ email: buyer.email, password: buyer.password })
      .expect(403);
    expect(noHeader.body.error.code).toBe('csrf_failed');
    const wrongHeader = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', `${client.csrf}x`)
      .send({ email: buyer.email, password: buyer.password })
      .expect(403);
    expect(wrongHeader.body.error.code).toBe('csrf_failed');
    // Nothing happened: no sign-in was recorded.
    const [user] = await t.dataSource.query('SELECT last_sign_in_at FROM users WHERE id = ?', [
      buyer.userId,
    ]);
    expect(user.last_sign_in_at).toBeNull();

    const signedIn = await signedInClient(t.app, buyer.email, buyer.password);
    const patch = await signedIn.agent
      .patch('/api/auth/me')
      .send({ name: 'Changed Without Token' })
      .expect(403);
    expect(patch.body.error.code).toBe('csrf_failed');
    const [after] = await t.dataSource.query('SELECT name FROM users WHERE id = ?', [buyer.userId]);
    expect(after.name).toBe(buyer.name);
  });

  it('GET /api/auth/csrf sets a readable XSRF-TOKEN cookie equal to the answer', async () => {
    const res = await request(t.app).get('/api/auth/csrf').expect(200);
    expect(res.body.csrfToken).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(cookieValue(res, 'XSRF-TOKEN')).toBe(res.body.csrfToken);
  });

  it('signs out with 204, deletes the session row and clears the cookies', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    expect(await sessionRows(buyer.userId)).toHaveLength(1);
    const res = await client.agent
      .post('/api/auth/logout')
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(204);
    expect(setCookie(res, 'evalon.sid')).toMatch(/Expires=Thu, 01 Jan 1970/);
    expect(await sessionRows(buyer.userId)).toHaveLength(0);
    await client.agent.get('/api/auth/me').expect(401);
  });

  it('ends a session past the absolute timeout (401 session_expired)', async () => {
    const buyer = await makePerson(t.dataSource, hospital.id, 'buyer');
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    const [row] = await sessionRows(buyer.userId);
    // Pretend the sign-in happened 7 days and 1 minute ago (the default absolute limit is 7 days).
    const longAgo = Date.now() - (7 * 24 * 60 + 1) * 60_000;
    await t.dataSource.query(
      "UPDATE sessions SET data = JSON_SET(data, '$.authenticatedAt', ?) WHERE session_id = ?",
      [longAgo, row!.session_id],
    );
    const res = await client.agent.get('/api/auth/me').expect(401);
    expect(res.body.error.code).toBe('session_expired');
    expect(await sessionRows(buyer.userId)).toHaveLength(0);
  });
});

describe('https public URL', () => {
  let https: TestApp;
  beforeAll(async () => {
    https = await startTestApp({ EVALON_PUBLIC_URL: 'https://evalon.test.example' });
  });
  afterAll(() => https.close());

  it('marks both cookies Secure behind a TLS-terminating proxy on loopback', async () => {
    const buyer = await makePerson(https.dataSource, hospital.id, 'buyer');
    const agent = request.agent(https.app);
    const first = await agent.get('/api/auth/csrf').set('X-Forwarded-Proto', 'https').expect(200);
    expect(setCookie(first, 'XSRF-TOKEN')).toMatch(/; Secure/);
    // supertest's jar will not send Secure cookies over http, so carry them by hand.
    const sid = setCookie(first, 'evalon.sid')!.split(';')[0];
    const res = await request(https.app)
      .post('/api/auth/login')
      .set('X-Forwarded-Proto', 'https')
      .set('Cookie', `${sid}; XSRF-TOKEN=${first.body.csrfToken}`)
      .set('X-XSRF-TOKEN', first.body.csrfToken)
      .send({ email: buyer.email, password: buyer.password })
      .expect(200);
    const session = setCookie(res, 'evalon.sid');
    expect(session).toMatch(/; Secure/);
    expect(session).toMatch(/; HttpOnly/);
    expect(session).toMatch(/; SameSite=Lax/);
    expect(setCookie(res, 'XSRF-TOKEN')).toMatch(/; Secure/);
    expect(res.headers['strict-transport-security']).toMatch(/max-age=/);
  });
});
