// Sign-in limits kept in MariaDB: two app instances (two "server processes" on one database,
// each with its own pool and middleware) count one account's failed sign-ins together, so moving
// between processes (a load balancer does that) does not give an attacker a fresh budget.
// Counting failures per account and per address and refusing with 429 and Retry-After is
// common practice (OWASP Authentication Cheat Sheet, "Protect against automated attacks";
// RFC 6585 §4 for 429, RFC 9110 §10.2.3 for Retry-After).
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson } from './helpers/factories';
import { anonymousClient, type Client } from './helpers/http';

let one: TestApp;
let two: TestApp;

const env = {
  EVALON_LOGIN_MAX_FAILURES_PER_ACCOUNT: '3',
  EVALON_LOGIN_MAX_FAILURES_PER_IP: '1000',
  EVALON_LOGIN_WINDOW_MINUTES: '15',
};

beforeAll(async () => {
  one = await startTestApp(env, { outboxWorker: false });
  two = await startTestApp(env, { outboxWorker: false });
  await one.dataSource.query('DELETE FROM rate_limits');
});
afterAll(async () => {
  await one?.close();
  await two?.close();
});

function attempt(client: Client, email: string, password: string) {
  return client.agent
    .post('/api/auth/login')
    .set('X-XSRF-TOKEN', client.csrf)
    .send({ email, password });
}

describe('sign-in limits shared by every process', () => {
  it('counts one account’s failures across two app instances', async () => {
    const org = await makeOrganisation(one.dataSource, 'hospital');
    const person = await makePerson(one.dataSource, org.id, 'buyer');
    const a = await anonymousClient(one.app);
    const b = await anonymousClient(two.app);
    // Three failures, alternating instances: within the limit of 3 wherever they landed.
    expect((await attempt(a, person.email, 'wrong-1')).status).toBe(401);
    expect((await attempt(b, person.email, 'wrong-2')).status).toBe(401);
    expect((await attempt(a, person.email, 'wrong-3')).status).toBe(401);
    // The fourth is refused by the instance that saw only one of them.
    const blocked = await attempt(b, person.email, 'wrong-4');
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('too_many_attempts');
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0);
    expect(Number(blocked.headers['retry-after'])).toBeLessThanOrEqual(15 * 60);
    // The count is a row in MariaDB: 4 hits (the refused one counts too) under the account key.
    const [row] = await one.dataSource.query(
      'SELECT points, expire FROM rate_limits WHERE `key` LIKE ?',
      [`signin-account:%${person.email.toLowerCase()}`],
    );
    expect(Number(row.points)).toBe(4);
    const expiresIn = Number(row.expire) - Date.now();
    expect(expiresIn).toBeGreaterThan(14 * 60_000);
    expect(expiresIn).toBeLessThanOrEqual(15 * 60_000);
    // Either instance now refuses even the right password until the window ends.
    expect((await attempt(a, person.email, person.password)).status).toBe(429);
  });

  it('takes a successful sign-in back off the shared count', async () => {
    const org = await makeOrganisation(one.dataSource, 'hospital');
    const person = await makePerson(one.dataSource, org.id, 'buyer');
    const a = await anonymousClient(one.app);
    const b = await anonymousClient(two.app);
    expect((await attempt(a, person.email, 'wrong-1')).status).toBe(401);
    expect((await attempt(b, person.email, 'wrong-2')).status).toBe(401);
    expect((await attempt(b, person.email, person.password)).status).toBe(200);
    // The limiter takes the success back on 'finish'; give it a moment.
    await new Promise((r) => setTimeout(r, 100));
    const fresh = await anonymousClient(one.app);
    expect((await attempt(fresh, person.email, 'wrong-3')).status).toBe(401);
    expect((await attempt(fresh, person.email, 'wrong-4')).status).toBe(429);
  });
});
