import request from 'supertest';
import { hashToken } from '../src/identity/domain/tokens';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson } from './helpers/factories';
import { freePort, startNode, type Started } from './helpers/processes';
import { signedInClient } from './helpers/http';
import { tokenFromLink } from './helpers/recording-mailer';

// Runs against the real local stand-in (infra/fakes/oauth/server.mjs) on a free port.
let fake: Started;
let fakeUrl: string;
let t: TestApp;
let org: { id: number; name: string };

beforeAll(async () => {
  const port = await freePort();
  fakeUrl = `http://127.0.0.1:${port}`;
  fake = await startNode(
    ['infra/fakes/oauth/server.mjs'],
    { EVALON_OAUTH_PORT: String(port) },
    /listening on/,
  );
  t = await startTestApp({
    EVALON_GOOGLE_AUTH_URL: `${fakeUrl}/authorize`,
    EVALON_GOOGLE_TOKEN_URL: `${fakeUrl}/token`,
    EVALON_GOOGLE_USERINFO_URL: `${fakeUrl}/userinfo`,
  });
  org = await makeOrganisation(t.dataSource, 'hospital');
}, 30_000);
afterAll(async () => {
  await t?.close();
  await fake?.stop();
});

/**
 * Plays the browser: start at /api/auth/google, let the stand-in pick `email` (login_hint,
 * skipping its page), come back to the callback. Returns the callback response and the agent.
 */
async function googleSignIn(email: string) {
  const agent = request.agent(t.app);
  const start = await agent.get('/api/auth/google').expect(302);
  const authorize = new URL(start.headers.location as string);
  expect(authorize.origin).toBe(fakeUrl);
  expect(authorize.searchParams.get('state')).toBeTruthy();
  expect(authorize.searchParams.get('code_challenge_method')).toBe('S256');
  authorize.searchParams.set('login_hint', email);
  const provider = await fetch(authorize, { redirect: 'manual' });
  expect(provider.status).toBe(302);
  const back = new URL(provider.headers.get('location')!);
  const callback = await agent.get(`${back.pathname}${back.search}`).expect(302);
  return { agent, callback, back };
}

describe('Continue with Google (local stand-in)', () => {
  it('shows the account chooser when no login_hint is given', async () => {
    const res = await fetch(
      `${fakeUrl}/authorize?response_type=code&client_id=x&redirect_uri=${encodeURIComponent('http://127.0.0.1/cb')}&state=s1`,
    );
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain('<title>Evalon test sign-in (local stand-in for Google)</title>');
    expect(html).toContain('buyer@velmora.example');
    // The original request rides along in hidden fields.
    expect(html).toContain('name="state" value="s1"');
  });

  it('signs in an invited person with that verified e-mail and links the Google subject', async () => {
    const buyer = await makePerson(t.dataSource, org.id, 'buyer');
    const inviter = await signedInClient(t.app, buyer.email, buyer.password);
    const email = `google.invitee.${buyer.userId}@test.example`;
    await inviter.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', inviter.csrf)
      .send({ email, name: 'Google Invitee', role: 'clinician' })
      .expect(201);
    const invitationToken = tokenFromLink((await t.mail.waitFor(email)).text, '/accept-invitation');

    const { agent, callback } = await googleSignIn(email);
    expect(callback.headers.location).toBe('/');
    const me = await agent.get('/api/auth/me').expect(200);
    expect(me.body.user).toMatchObject({ email, name: 'Google Invitee' });

    const [user] = await t.dataSource.query(
      'SELECT id, google_subject, last_sign_in_at, password_hash FROM users WHERE email = ?',
      [email],
    );
    expect(user.google_subject).toMatch(/^\d{21}$/);
    expect(user.last_sign_in_at).not.toBeNull();
    expect(user.password_hash).toBeNull();
    // Signing in with Google settles the invitation: the e-mailed link is used up.
    const [token] = await t.dataSource.query(
      'SELECT used_at FROM user_tokens WHERE token_hash = ?',
      [hashToken(invitationToken)],
    );
    expect(token.used_at).not.toBeNull();
    const [audit] = await t.dataSource.query(
      "SELECT detail FROM audit_events WHERE action = 'user.signed_in' AND actor_user_id = ?",
      [user.id],
    );
    expect(typeof audit.detail === 'string' ? JSON.parse(audit.detail) : audit.detail).toEqual({
      method: 'google',
    });
    // The members page no longer shows the person as pending.
    const members = await inviter.agent.get(`/api/organisations/${org.id}/members`).expect(200);
    expect(members.body.items.find((m: { email: string }) => m.email === email)).toMatchObject({
      pending: false,
    });
  });

  it('refuses an e-mail that has no Evalon account', async () => {
    const { agent, callback } = await googleSignIn(`stranger.${Date.now()}@elsewhere.example`);
    expect(callback.headers.location).toBe('/sign-in?error=google_unknown');
    await agent.get('/api/auth/me').expect(401);
  });

  it('refuses a deactivated person', async () => {
    const gone = await makePerson(t.dataSource, org.id, 'clinician', { active: false });
    const { callback } = await googleSignIn(gone.email);
    expect(callback.headers.location).toBe('/sign-in?error=account_deactivated');
  });

  it('refuses a callback that does not belong to this browser’s sign-in (state)', async () => {
    const person = await makePerson(t.dataSource, org.id, 'clinician');
    const { back } = await googleSignIn(person.email);
    // Replaying the same callback from another browser: no matching state in its session.
    const res = await request(t.app).get(`${back.pathname}${back.search}`).expect(302);
    expect(res.headers.location).toBe('/sign-in?error=google_failed');
  });

  it('reports a cancelled sign-in', async () => {
    const agent = request.agent(t.app);
    const start = await agent.get('/api/auth/google').expect(302);
    const authorize = new URL(start.headers.location as string);
    const cancel = await fetch(`${fakeUrl}/authorize/cancel${authorize.search}`, {
      redirect: 'manual',
    });
    const back = new URL(cancel.headers.get('location')!);
    expect(back.searchParams.get('error')).toBe('access_denied');
    const res = await agent.get(`${back.pathname}${back.search}`).expect(302);
    expect(res.headers.location).toBe('/sign-in?error=google_cancelled');
  });
});
