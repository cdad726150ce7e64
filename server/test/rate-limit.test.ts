import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson } from './helpers/factories';
import { anonymousClient, type Client } from './helpers/http';

let t: TestApp;
let org: { id: number };

beforeAll(async () => {
  // Small limits so the test is quick; the defaults (5 per account, 20 per address, 15 min)
  // are checked in src/config.spec.ts.
  t = await startTestApp({
    EVALON_LOGIN_MAX_FAILURES_PER_ACCOUNT: '3',
    EVALON_LOGIN_MAX_FAILURES_PER_IP: '7',
    EVALON_LOGIN_WINDOW_MINUTES: '15',
  });
  org = await makeOrganisation(t.dataSource, 'hospital');
  // The counters are shared in MariaDB: failures other suites on this database made from
  // 127.0.0.1 in the last 15 minutes would count against the small per-address budget here.
  await t.dataSource.query('DELETE FROM rate_limits');
});
afterAll(() => t.close());

function attempt(client: Client, email: string, password: string) {
  return client.agent
    .post('/api/auth/login')
    .set('X-XSRF-TOKEN', client.csrf)
    .send({ email, password });
}

/** Lets the limiter take a successful request back off its count (it does so on 'finish'). */
const settle = () => new Promise((r) => setTimeout(r, 50));

describe('sign-in rate limits', () => {
  // Both cases share the per-address budget of 7 failed attempts, so they run in this order.
  it('per account: a successful sign-in is not counted', async () => {
    const person = await makePerson(t.dataSource, org.id, 'buyer');
    const client = await anonymousClient(t.app);
    expect((await attempt(client, person.email, 'wrong-password-1')).status).toBe(401);
    expect((await attempt(client, person.email, 'wrong-password-2')).status).toBe(401);
    const ok = await attempt(client, person.email, person.password);
    expect(ok.status).toBe(200);
    await settle();
    const fresh = await anonymousClient(t.app);
    // Third failure overall: still within the limit of 3 because the success did not count.
    expect((await attempt(fresh, person.email, 'wrong-password-3')).status).toBe(401);
    const blocked = await attempt(fresh, person.email, 'wrong-password-4');
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('too_many_attempts');
    expect(blocked.body.error.message).toMatch(/Too many sign-in attempts/);
    const retryAfter = Number(blocked.headers['retry-after']);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(15 * 60);
    // While blocked, even the right password waits.
    expect((await attempt(fresh, person.email, person.password)).status).toBe(429);
  });

  it('per address: failures across different accounts add up', async () => {
    // 5 failed or blocked attempts so far came from this address (the success was taken back
    // off); the limit is 7, so two more fail normally and the third is refused.
    const client = await anonymousClient(t.app);
    const a = await makePerson(t.dataSource, org.id, 'clinician');
    const b = await makePerson(t.dataSource, org.id, 'clinician');
    expect((await attempt(client, a.email, 'wrong-password-a')).status).toBe(401);
    expect((await attempt(client, b.email, 'wrong-password-b')).status).toBe(401);
    const blocked = await attempt(client, `third.${a.userId}@test.example`, 'wrong-password-c');
    expect(blocked.status).toBe(429);
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0);
  });
});
