import request from 'supertest';
import { hashToken } from '../src/identity/domain/tokens';
import { startTestApp, type TestApp } from './helpers/app';
import { jsonColumn, makeOrganisation, makePerson, type TestPerson } from './helpers/factories';
import { signedInClient, type Client } from './helpers/http';
import { tokenFromLink } from './helpers/recording-mailer';

let t: TestApp;

beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

/** A hospital with a buyer (signed in) and a clinician. */
async function hospitalWithPeople(): Promise<{
  org: { id: number; name: string };
  buyer: TestPerson;
  clinician: TestPerson;
  client: Client;
}> {
  const org = await makeOrganisation(t.dataSource, 'hospital');
  const buyer = await makePerson(t.dataSource, org.id, 'buyer');
  const clinician = await makePerson(t.dataSource, org.id, 'clinician');
  const client = await signedInClient(t.app, buyer.email, buyer.password);
  return { org, buyer, clinician, client };
}

async function auditActions(
  organisationId: number,
): Promise<{ action: string; actor_user_id: number; detail: unknown }[]> {
  const rows = await t.dataSource.query(
    'SELECT action, actor_user_id, detail FROM audit_events WHERE organisation_id = ? ORDER BY id',
    [organisationId],
  );
  return rows.map((r: { action: string; actor_user_id: number; detail: unknown }) => ({
    ...r,
    detail: jsonColumn(r.detail),
  }));
}

describe('members page', () => {
  it('lists the members of the buyer’s own organisation', async () => {
    const { org, buyer, clinician, client } = await hospitalWithPeople();
    const res = await client.agent.get(`/api/organisations/${org.id}/members`).expect(200);
    const items = res.body.items as {
      userId: number;
      role: string;
      active: boolean;
      pending: boolean;
    }[];
    expect(items.map((m) => [m.userId, m.role]).sort()).toEqual(
      [
        [buyer.userId, 'buyer'],
        [clinician.userId, 'clinician'],
      ].sort(),
    );
    expect(items.every((m) => m.active && !m.pending)).toBe(true);
  });

  it('answers 403 for another organisation’s members page', async () => {
    const { client } = await hospitalWithPeople();
    const other = await makeOrganisation(t.dataSource, 'hospital');
    await makePerson(t.dataSource, other.id, 'buyer');
    const res = await client.agent.get(`/api/organisations/${other.id}/members`).expect(403);
    expect(res.body.error.code).toBe('forbidden');
  });

  it('answers 403 to a clinician (not a managing role) and 401 without a session', async () => {
    const { org, clinician } = await hospitalWithPeople();
    const client = await signedInClient(t.app, clinician.email, clinician.password);
    await client.agent.get(`/api/organisations/${org.id}/members`).expect(403);
    await request(t.app).get(`/api/organisations/${org.id}/members`).expect(401);
  });

  it('lets the platform admin see any organisation’s members', async () => {
    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const { org } = await hospitalWithPeople();
    const client = await signedInClient(t.app, admin.email, admin.password);
    const res = await client.agent.get(`/api/organisations/${org.id}/members`).expect(200);
    expect(res.body.items).toHaveLength(2);
  });
});

describe('invitations', () => {
  it('invites a clinician: pending member, hashed one-time token, e-mail with link, audit event', async () => {
    const { org, buyer, client } = await hospitalWithPeople();
    const email = `new.clinician.${org.id}@test.example`;
    const res = await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: email.toUpperCase(), name: 'Ines Hallward', role: 'clinician' })
      .expect(201);
    expect(res.body.member).toMatchObject({
      email,
      name: 'Ines Hallward',
      role: 'clinician',
      active: true,
      pending: true,
      lastSignInAt: null,
    });

    const [user] = await t.dataSource.query(
      'SELECT id, password_hash, active FROM users WHERE email = ?',
      [email],
    );
    expect(user.password_hash).toBeNull();
    const memberships = await t.dataSource.query(
      'SELECT role FROM memberships WHERE user_id = ? AND organisation_id = ?',
      [user.id, org.id],
    );
    expect(memberships).toEqual([{ role: 'clinician' }]);

    const mail = await t.mail.waitFor(email);
    expect(mail.subject).toBe(`You are invited to join ${org.name} on Evalon`);
    const token = tokenFromLink(mail.text, '/accept-invitation');
    expect(mail.text).toContain(`${t.config.http.publicUrl}/accept-invitation?token=`);
    expect(mail.html).toContain(`${t.config.http.publicUrl}/accept-invitation?token=${token}`);
    expect(mail.html).toContain(buyer.name);

    const tokens = await t.dataSource.query(
      "SELECT token_hash, expires_at, created_at, used_at FROM user_tokens WHERE user_id = ? AND purpose = 'invitation'",
      [user.id],
    );
    expect(tokens).toHaveLength(1);
    // Only the SHA-256 of the token is stored, never the token itself.
    expect(tokens[0].token_hash).toBe(hashToken(token));
    expect(tokens[0].token_hash).not.toContain(token);
    const lifetime =
      new Date(tokens[0].expires_at).getTime() - new Date(tokens[0].created_at).getTime();
    expect(lifetime).toBe(7 * 24 * 3_600_000);

    const audit = await auditActions(org.id);
    expect(audit).toContainEqual({
      action: 'member.invited',
      actor_user_id: buyer.userId,
      detail: { email, role: 'clinician', userId: user.id, newAccount: true },
    });
  });

  it('keeps buyers to hospital roles and fleet managers to lender roles', async () => {
    const { org, client } = await hospitalWithPeople();
    const wrongKind = await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: `fm.${org.id}@test.example`, name: 'Someone', role: 'fleet_manager' })
      .expect(422);
    expect(wrongKind.body.error.details.fieldErrors.role).toBeDefined();

    const lender = await makeOrganisation(t.dataSource, 'lender');
    const fleet = await makePerson(t.dataSource, lender.id, 'fleet_manager');
    const coordinator = await makePerson(t.dataSource, lender.id, 'coordinator');
    const fleetClient = await signedInClient(t.app, fleet.email, fleet.password);
    await fleetClient.agent
      .post(`/api/organisations/${lender.id}/invitations`)
      .set('X-XSRF-TOKEN', fleetClient.csrf)
      .send({
        email: `coord.${lender.id}@test.example`,
        name: 'New Coordinator',
        role: 'coordinator',
      })
      .expect(201);
    const coordinatorClient = await signedInClient(t.app, coordinator.email, coordinator.password);
    await coordinatorClient.agent
      .post(`/api/organisations/${lender.id}/invitations`)
      .set('X-XSRF-TOKEN', coordinatorClient.csrf)
      .send({ email: `coord2.${lender.id}@test.example`, name: 'Another', role: 'coordinator' })
      .expect(403);
    const count = await t.dataSource.query('SELECT COUNT(*) AS n FROM users WHERE email = ?', [
      `coord2.${lender.id}@test.example`,
    ]);
    expect(Number(count[0].n)).toBe(0);
  });

  it('refuses to invite someone who already has that role (409)', async () => {
    const { org, clinician, client } = await hospitalWithPeople();
    const res = await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: clinician.email, name: clinician.name, role: 'clinician' })
      .expect(409);
    expect(res.body.error.code).toBe('already_member');
  });
});

describe('invitations to people who already exist, and fresh links', () => {
  it('adds someone who already has an account without a new password link', async () => {
    const { org, client } = await hospitalWithPeople();
    const elsewhere = await makeOrganisation(t.dataSource, 'hospital');
    const existing = await makePerson(t.dataSource, elsewhere.id, 'clinician');
    const res = await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: existing.email, name: 'Ignored For Existing People', role: 'clinician' })
      .expect(201);
    expect(res.body.member).toMatchObject({
      userId: existing.userId,
      name: existing.name,
      pending: false,
    });
    const mail = await t.mail.waitFor(existing.email);
    expect(mail.subject).toBe(`You now have access to ${org.name} on Evalon`);
    expect(mail.text).toContain(`${t.config.http.publicUrl}/sign-in`);
    const tokens = await t.dataSource.query('SELECT 1 FROM user_tokens WHERE user_id = ?', [
      existing.userId,
    ]);
    expect(tokens).toHaveLength(0);
    // Two organisations now: only the platform admin may deactivate this person.
    const refused = await client.agent
      .post(`/api/organisations/${org.id}/members/${res.body.member.membershipId}/deactivate`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(409);
    expect(refused.body.error.code).toBe('member_of_other_organisations');
  });

  it('sends a fresh invitation link; the earlier link stops working', async () => {
    const { org, client } = await hospitalWithPeople();
    const email = `resend.${org.id}@test.example`;
    const invited = await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email, name: 'Slow Reader', role: 'clinician' })
      .expect(201);
    const first = tokenFromLink((await t.mail.waitFor(email, 1)).text, '/accept-invitation');
    await client.agent
      .post(
        `/api/organisations/${org.id}/members/${invited.body.member.membershipId}/resend-invitation`,
      )
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    const second = tokenFromLink((await t.mail.waitFor(email, 2)).text, '/accept-invitation');
    expect(second).not.toBe(first);
    const rows = await t.dataSource.query(
      'SELECT token_hash, used_at FROM user_tokens WHERE user_id = ? ORDER BY id',
      [invited.body.member.userId],
    );
    expect(rows.map((r: { token_hash: string }) => r.token_hash)).toEqual([
      hashToken(first),
      hashToken(second),
    ]);
    expect(rows[0].used_at).not.toBeNull();
    expect(rows[1].used_at).toBeNull();
  });
});

describe('role changes and deactivation', () => {
  it('changes a role and audits it', async () => {
    const { org, buyer, clinician, client } = await hospitalWithPeople();
    const res = await client.agent
      .patch(`/api/organisations/${org.id}/members/${clinician.membershipId}`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ role: 'buyer' })
      .expect(200);
    expect(res.body.member).toMatchObject({ membershipId: clinician.membershipId, role: 'buyer' });
    const [row] = await t.dataSource.query('SELECT role FROM memberships WHERE id = ?', [
      clinician.membershipId,
    ]);
    expect(row.role).toBe('buyer');
    expect(await auditActions(org.id)).toContainEqual({
      action: 'member.role_changed',
      actor_user_id: buyer.userId,
      detail: { userId: clinician.userId, from: 'clinician', to: 'buyer' },
    });
  });

  it('will not remove the last person who can manage members (409)', async () => {
    const { org, buyer, client } = await hospitalWithPeople();
    const res = await client.agent
      .patch(`/api/organisations/${org.id}/members/${buyer.membershipId}`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ role: 'clinician' })
      .expect(409);
    expect(res.body.error).toMatchObject({ code: 'last_manager' });
    expect(res.body.error.message).toMatch(/last person who can manage members/);
    const [row] = await t.dataSource.query('SELECT role FROM memberships WHERE id = ?', [
      buyer.membershipId,
    ]);
    expect(row.role).toBe('buyer');
  });

  it('will not let people deactivate themselves (409)', async () => {
    const { org, buyer, client } = await hospitalWithPeople();
    await makePerson(t.dataSource, org.id, 'buyer');
    const res = await client.agent
      .post(`/api/organisations/${org.id}/members/${buyer.membershipId}/deactivate`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(409);
    expect(res.body.error.code).toBe('cannot_deactivate_self');
  });

  it('deactivating ends the person’s sessions at once; reactivating lets them back', async () => {
    const { org, buyer, clinician, client } = await hospitalWithPeople();
    const victim = await signedInClient(t.app, clinician.email, clinician.password);
    await victim.agent.get('/api/auth/me').expect(200);
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE user_id = ?', [clinician.userId]),
    ).toHaveLength(1);

    const res = await client.agent
      .post(`/api/organisations/${org.id}/members/${clinician.membershipId}/deactivate`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    expect(res.body.member).toMatchObject({ userId: clinician.userId, active: false });
    const [user] = await t.dataSource.query('SELECT active FROM users WHERE id = ?', [
      clinician.userId,
    ]);
    expect(Number(user.active)).toBe(0);
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE user_id = ?', [clinician.userId]),
    ).toHaveLength(0);
    const audit = await auditActions(org.id);
    expect(audit).toContainEqual({
      action: 'member.deactivated',
      actor_user_id: buyer.userId,
      detail: { userId: clinician.userId, sessionsEnded: 1 },
    });

    await victim.agent.get('/api/auth/me').expect(401);
    // The old CSRF token died with the session; with a fresh one, sign-in is refused.
    await victim.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', victim.csrf)
      .send({ email: clinician.email, password: clinician.password })
      .expect(403);
    const fresh = await victim.agent.get('/api/auth/csrf').expect(200);
    const login = await victim.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', fresh.body.csrfToken)
      .send({ email: clinician.email, password: clinician.password })
      .expect(401);
    expect(login.body.error.code).toBe('account_deactivated');

    await client.agent
      .post(`/api/organisations/${org.id}/members/${clinician.membershipId}/reactivate`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    await signedInClient(t.app, clinician.email, clinician.password);
  });

  it('a session still open when its person is deactivated directly in the database ends on the next request', async () => {
    const { org } = await hospitalWithPeople();
    const clinician = await makePerson(t.dataSource, org.id, 'clinician');
    const client = await signedInClient(t.app, clinician.email, clinician.password);
    await t.dataSource.query('UPDATE users SET active = 0 WHERE id = ?', [clinician.userId]);
    const res = await client.agent.get('/api/auth/me').expect(401);
    expect(res.body.error.code).toBe('account_deactivated');
    expect(
      await t.dataSource.query('SELECT 1 FROM sessions WHERE user_id = ?', [clinician.userId]),
    ).toHaveLength(0);
  });
});
