import express from 'express';
import { startTestApp, type TestApp } from './helpers/app';
import { listRoutes } from './helpers/routes';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

describe('every route declares who may call it', () => {
  it('finds the routes, and each one starts with an access rule', () => {
    const routes = listRoutes(t.app);
    // The walker must really see the routers (a silent walker would pass trivially).
    expect(routes.length).toBeGreaterThanOrEqual(20);
    expect(routes).toContainEqual(
      expect.objectContaining({ method: 'GET', path: '/api/organisations/:orgId/members' }),
    );
    const missing = routes.filter((r) => r.rule === undefined).map((r) => `${r.method} ${r.path}`);
    expect(missing).toEqual([]);
  });

  it('scopes member management to the organisation in the path', () => {
    const members = listRoutes(t.app).filter((r) =>
      r.path.startsWith('/api/organisations/:orgId/'),
    );
    expect(members.length).toBeGreaterThanOrEqual(6);
    for (const r of members) {
      expect(r.rule).toEqual({ roles: ['admin', 'buyer', 'fleet_manager'], org: 'param:orgId' });
    }
  });

  it('only the sign-in entry points and system routes are public', () => {
    const publicRoutes = listRoutes(t.app)
      .filter((r) => r.rule && 'public' in r.rule && r.path.startsWith('/api/'))
      .map((r) => `${r.method} ${r.path}`)
      .sort();
    expect(publicRoutes).toEqual(
      [
        'GET /api/health',
        'GET /api/openapi.json',
        'GET /api/auth/csrf',
        'POST /api/auth/login',
        'POST /api/auth/logout',
        'POST /api/auth/password-reset',
        'POST /api/auth/reset-password',
        'POST /api/auth/accept-invitation',
        'GET /api/auth/google',
        'GET /api/auth/google/callback',
        // Signed by the payment provider instead (verified before anything is read).
        'POST /api/webhooks/carrier',
        'POST /api/webhooks/payments',
      ].sort(),
    );
  });

  it('reports a route added without a rule (the walker is not blind)', () => {
    const app = express();
    const nested = express.Router();
    nested.get('/unguarded', (_req, res) => {
      res.end();
    });
    app.use('/api/extra', nested);
    expect(listRoutes(app)).toEqual([
      { method: 'GET', path: '/api/extra/unguarded', rule: undefined },
    ]);
  });
});
