import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson } from './helpers/factories';
import { anonymousClient, signedInClient } from './helpers/http';
import { listRoutes } from './helpers/routes';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

describe('health', () => {
  it('reports the database up', async () => {
    const res = await request(t.app).get('/api/health').expect(200);
    expect(res.body).toEqual({ status: 'ok', database: 'up' });
  });

  it('answers 503 when the database is gone', async () => {
    const down = await startTestApp();
    await down.dataSource.destroy();
    const res = await request(down.app).get('/api/health').expect(503);
    expect(res.body).toEqual({ status: 'degraded', database: 'down' });
  });
});

describe('OpenAPI document', () => {
  it('is OpenAPI 3 and lists every /api route with its method', async () => {
    const res = await request(t.app).get('/api/openapi.json').expect(200);
    expect(res.body.openapi).toMatch(/^3\./);
    const documented = new Set<string>();
    for (const [p, item] of Object.entries(
      res.body.paths as Record<string, Record<string, unknown>>,
    )) {
      for (const method of Object.keys(item)) documented.add(`${method.toUpperCase()} ${p}`);
    }
    const routes = listRoutes(t.app)
      .filter((r) => r.path.startsWith('/api/'))
      .map((r) => `${r.method} ${r.path.replace(/:([A-Za-z0-9_]+)/g, '{$1}')}`);
    expect(routes.length).toBeGreaterThanOrEqual(20);
    expect(routes.filter((r) => !documented.has(r))).toEqual([]);
    for (const must of [
      'POST /api/auth/login',
      'GET /api/auth/me',
      'GET /api/organisations/{orgId}/members',
      'GET /api/health',
    ]) {
      expect(documented).toContain(must);
    }
    const login = res.body.paths['/api/auth/login'].post;
    expect(login.requestBody.content['application/json'].schema).toEqual({
      $ref: '#/components/schemas/LoginRequest',
    });
    expect(res.body.components.schemas.Member.properties.pending.type).toBe('boolean');
  });
});

describe('errors and headers', () => {
  it('answers unknown /api routes with 404 in the JSON error shape', async () => {
    const res = await request(t.app).get('/api/no-such-thing').expect(404);
    expect(res.body).toEqual({
      error: {
        code: 'not_found',
        message: 'There is no GET /api/no-such-thing in the Evalon API.',
      },
    });
  });

  it('answers malformed JSON with 400 malformed_json', async () => {
    const client = await anonymousClient(t.app);
    const res = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .set('Content-Type', 'application/json')
      .send('{"email": ')
      .expect(400);
    expect(res.body.error.code).toBe('malformed_json');
  });

  it('answers a bad path parameter with 400 and field details', async () => {
    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const client = await signedInClient(t.app, admin.email, admin.password);
    const res = await client.agent.get('/api/organisations/not-a-number/members').expect(400);
    expect(res.body.error.code).toBe('invalid_request');
    expect(Object.keys(res.body.error.details.fieldErrors)).toEqual(['orgId']);
  });

  it('sets a request id and a content security policy limited to our origin', async () => {
    const res = await request(t.app)
      .get('/api/health')
      .set('X-Request-Id', 'trace-123')
      .expect(200);
    expect(res.headers['x-request-id']).toBe('trace-123');
    const generated = await request(t.app)
      .get('/api/health')
      .set('X-Request-Id', 'bad id with spaces');
    expect(generated.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
    const csp = String(res.headers['content-security-policy']);
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("font-src 'self'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
  });
});

describe('serving the web app', () => {
  it('serves index.html for deep links and files as they are, never for /api', async () => {
    const dist = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-web-'));
    fs.writeFileSync(
      path.join(dist, 'index.html'),
      '<!doctype html><title>Evalon test shell</title>',
    );
    fs.writeFileSync(path.join(dist, 'main-ABCDEFGH.js'), 'console.log(1)');
    const web = await startTestApp({ EVALON_WEB_DIST: dist });
    try {
      const deep = await request(web.app).get('/loans/42/timeline').expect(200);
      expect(deep.text).toContain('Evalon test shell');
      expect(deep.headers['cache-control']).toBe('no-cache');
      const asset = await request(web.app).get('/main-ABCDEFGH.js').expect(200);
      expect(asset.headers['cache-control']).toContain('immutable');
      await request(web.app).get('/api/not-a-route').expect(404).expect('Content-Type', /json/);
    } finally {
      await web.close();
      fs.rmSync(dist, { recursive: true, force: true });
    }
  });

  it('still runs when the web app has not been built', async () => {
    const web = await startTestApp({
      EVALON_WEB_DIST: path.join(os.tmpdir(), 'evalon-no-such-dist'),
    });
    try {
      const res = await request(web.app).get('/sign-in').expect(404);
      expect(res.text).toMatch(/has not been built/);
      await request(web.app).get('/api/health').expect(200);
    } finally {
      await web.close();
    }
  });
});
