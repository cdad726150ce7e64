import { hashToken } from '../src/identity/domain/tokens';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson, testPassword } from './helpers/factories';
import { anonymousClient, cookieValue, signedInClient } from './helpers/http';
import { tokenFromLink } from './helpers/recording-mailer';

let t: TestApp;
let org: { id: number; name: string };

beforeAll(async () => {
  t = await startTestApp();
  org = await makeOrganisation(t.dataSource, 'hospital');
});
afterAll(() => t.close());

/** Invites a new clinician as a fresh buyer and returns the e-mailed token. */
async function invite(): Promise<{ email: string; token: string }> {
  const buyer = await makePerson(t.dataSource, org.id, 'buyer');
  const client = await signedInClient(t.app, buyer.email, buyer.password);
  const email = `invitee.${buyer.userId}@test.example`;
  await client.agent
    .post(`/api/organisations/${org.id}/invitations`)
    .set('X-XSRF-TOKEN', client.csrf)
    .send({ email, name: 'Invited Person', role: 'clinician' })
    .expect(201);
  const mail = await t.mail.waitFor(email);
  return { email, token: tokenFromLink(mail.text, '/accept-invitation') };
}

describe('accepting an invitation', () => {
  it('sets the password and name, signs in, and uses up the token', async () => {
    const { email, token } = await invite();
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/accept-invitation')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token, password: 'a-brand-new-password', name: 'Chosen Name' })
      .expect(200);
    expect(res.body.user).toMatchObject({ email, name: 'Chosen Name' });
    expect(res.body.user.memberships).toEqual([
      {
        organisationId: org.id,
        organisationName: org.name,
        organisationKind: 'hospital',
        role: 'clinician',
      },
    ]);
    expect(cookieValue(res, 'evalon.sid')).toBeDefined();
    await client.agent.get('/api/auth/me').expect(200);

    const [user] = await t.dataSource.query(
      'SELECT id, name, password_hash FROM users WHERE email = ?',
      [email],
    );
    expect(user.password_hash).toMatch(/^\$argon2id\$/);
    const [token_row] = await t.dataSource.query(
      'SELECT used_at FROM user_tokens WHERE token_hash = ?',
      [hashToken(token)],
    );
    expect(token_row.used_at).not.toBeNull();
    const audit = await t.dataSource.query(
      "SELECT organisation_id FROM audit_events WHERE action = 'invitation.accepted' AND actor_user_id = ?",
      [user.id],
    );
    expect(audit).toEqual([{ organisation_id: org.id }]);

    // The new password works for a normal sign-in.
    await signedInClient(t.app, email, 'a-brand-new-password');
  });

  it('is single-use: the second attempt answers 410 token_used', async () => {
    const { token } = await invite();
    const client = await anonymousClient(t.app);
    await client.agent
      .post('/api/auth/accept-invitation')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token, password: 'first-password-1' })
      .expect(200);
    const other = await anonymousClient(t.app);
    const again = await other.agent
      .post('/api/auth/accept-invitation')
      .set('X-XSRF-TOKEN', other.csrf)
      .send({ token, password: 'second-password-2' })
      .expect(410);
    expect(again.body.error.code).toBe('token_used');
  });

  it('expires: an invitation past its expiry answers 410 token_expired and sets no password', async () => {
    const { email, token } = await invite();
    await t.dataSource.query('UPDATE user_tokens SET expires_at = ? WHERE token_hash = ?', [
      new Date(Date.now() - 1000),
      hashToken(token),
    ]);
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/accept-invitation')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token, password: 'too-late-password' })
      .expect(410);
    expect(res.body.error.code).toBe('token_expired');
    const [user] = await t.dataSource.query('SELECT password_hash FROM users WHERE email = ?', [
      email,
    ]);
    expect(user.password_hash).toBeNull();
  });

  it('answers 400 token_invalid for a token that was never issued', async () => {
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/accept-invitation')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token: 'x'.repeat(43), password: 'whatever-password' })
      .expect(400);
    expect(res.body.error.code).toBe('token_invalid');
  });
});

describe('password reset', () => {
  it('answers 202 and the same body whether or not the address has an account', async () => {
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const client = await anonymousClient(t.app);
    const known = await client.agent
      .post('/api/auth/password-reset')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: person.email })
      .expect(202);
    const unknownEmail = `no.such.person.${person.userId}@test.example`;
    const unknown = await client.agent
      .post('/api/auth/password-reset')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: unknownEmail })
      .expect(202);
    expect(unknown.text).toBe(known.text);
    expect(unknown.headers['content-type']).toBe(known.headers['content-type']);

    const mail = await t.mail.waitFor(person.email);
    expect(mail.subject).toBe('Reset your Evalon password');
    expect(mail.text).toContain(`${t.config.http.publicUrl}/reset-password?token=`);
    // Give background sending a moment, then make sure nothing went to the unknown address.
    await new Promise((r) => setTimeout(r, 100));
    expect(t.mail.to(unknownEmail)).toHaveLength(0);
    const rows = await t.dataSource.query(
      "SELECT t.expires_at, t.created_at FROM user_tokens t WHERE t.user_id = ? AND t.purpose = 'password_reset'",
      [person.userId],
    );
    expect(rows).toHaveLength(1);
    expect(new Date(rows[0].expires_at).getTime() - new Date(rows[0].created_at).getTime()).toBe(
      3_600_000,
    );
  });

  it('sets a new password once, ends every session, and the old password stops working', async () => {
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const open = await signedInClient(t.app, person.email, person.password);
    const client = await anonymousClient(t.app);
    await client.agent
      .post('/api/auth/password-reset')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: person.email })
      .expect(202);
    const token = tokenFromLink((await t.mail.waitFor(person.email)).text, '/reset-password');
    await client.agent
      .post('/api/auth/reset-password')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token, password: 'replacement-password' })
      .expect(204);
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE user_id = ?', [person.userId]),
    ).toHaveLength(0);
    await open.agent.get('/api/auth/me').expect(401);

    const login = await anonymousClient(t.app);
    await login.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', login.csrf)
      .send({ email: person.email, password: testPassword })
      .expect(401);
    await signedInClient(t.app, person.email, 'replacement-password');

    const again = await client.agent
      .post('/api/auth/reset-password')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token, password: 'another-password-3' })
      .expect(410);
    expect(again.body.error.code).toBe('token_used');
  });

  it('a newer reset link replaces the older one', async () => {
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const client = await anonymousClient(t.app);
    for (let i = 0; i < 2; i++) {
      await client.agent
        .post('/api/auth/password-reset')
        .set('X-XSRF-TOKEN', client.csrf)
        .send({ email: person.email })
        .expect(202);
    }
    const first = tokenFromLink((await t.mail.waitFor(person.email, 1)).text, '/reset-password');
    const second = tokenFromLink((await t.mail.waitFor(person.email, 2)).text, '/reset-password');
    await client.agent
      .post('/api/auth/reset-password')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token: first, password: 'first-link-password' })
      .expect(410);
    await client.agent
      .post('/api/auth/reset-password')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ token: second, password: 'second-link-password' })
      .expect(204);
  });
});
