import { routeSteps } from '../src/http/routes';
import { startTestApp, type TestApp } from './helpers/app';
import { makeHospital, makeLender } from './helpers/catalog';
import { signedInClient } from './helpers/http';
import { insertApprovedLoan } from './helpers/payments';
import { listRouteSteps } from './helpers/routes';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());

describe('every route checks who may call it before it reads the body', () => {
  it('runs access, then path and query, then the scope check, then the body', () => {
    // API routes (the web app's page fallback is a GET without a body, outside the API).
    const routes = listRouteSteps(t.app).filter((r) => !r.path.startsWith('regex:'));
    for (const r of routes)
      expect({ route: `${r.method} ${r.path}`, first: r.steps[0] }).toEqual({
        route: `${r.method} ${r.path}`,
        first: 'access',
      });
    // The walker must really see the routers (a silent walker would pass trivially).
    expect(routes.length).toBeGreaterThanOrEqual(40);
    for (const r of routes) {
      const steps = r.steps.filter((s) => s !== undefined);
      const order = steps.map((s) => routeSteps.indexOf(s));
      expect({ route: `${r.method} ${r.path}`, order }).toEqual({
        route: `${r.method} ${r.path}`,
        order: [...order].sort((a, b) => a - b),
      });
      expect(steps).toContain('body');
    }
    expect(routes.filter((r) => r.steps.includes('scope')).length).toBeGreaterThanOrEqual(2);
  });

  it('answers 404, not a validation message, to another hospital’s buyer with a bad body', async () => {
    const lender = await makeLender(t.dataSource);
    const hospital = await makeHospital(t.dataSource);
    const stranger = await makeHospital(t.dataSource);
    const loan = await insertApprovedLoan(t.dataSource, lender, hospital);
    const client = await signedInClient(t.app, stranger.buyer.email, stranger.buyer.password);
    const res = await client.agent
      .post(`/api/loans/${loan.id}/deposit`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ method: 'no such method' })
      .expect(404);
    expect(res.body.error.code).toBe('loan_not_found');

    // The loan's own buyer gets the validation message for the same body.
    const own = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
    const mine = await own.agent
      .post(`/api/loans/${loan.id}/deposit`)
      .set('X-XSRF-TOKEN', own.csrf)
      .send({ method: 'no such method' })
      .expect(422);
    expect(mine.body.error.code).toBe('validation_failed');
  });

  it('answers 404 to another hospital’s buyer cancelling a loan with a one-letter reason', async () => {
    const lender = await makeLender(t.dataSource);
    const hospital = await makeHospital(t.dataSource);
    const stranger = await makeHospital(t.dataSource);
    const loan = await insertApprovedLoan(t.dataSource, lender, hospital);
    const client = await signedInClient(t.app, stranger.buyer.email, stranger.buyer.password);
    const res = await client.agent
      .post(`/api/loans/${loan.id}/cancel`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ reason: 'x' })
      .expect(404);
    expect(res.body.error.code).toBe('loan_not_found');
    const [row] = await t.dataSource.query('SELECT state FROM loans WHERE id = ?', [loan.id]);
    expect(row.state).toBe('approved');

    // The loan's own buyer is told what is wrong with the reason instead.
    const own = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
    const mine = await own.agent
      .post(`/api/loans/${loan.id}/cancel`)
      .set('X-XSRF-TOKEN', own.csrf)
      .send({ reason: 'x' })
      .expect(422);
    expect(mine.body.error.code).toBe('validation_failed');
  });
});
