import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import request from 'supertest';
import { createApp } from '../src/app';
import { createLogger } from '../src/logger';
import { repositoryStandin } from '../src/maps/api/routes';
import { startTestApp, type TestApp } from './helpers/app';
import { makeHospital } from './helpers/catalog';
import { signedInClient } from './helpers/http';
import { repoRoot } from './helpers/processes';

// A stand-in file of this test, so the route is tested without building the real one.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-maps-'));
const standin = path.join(dir, 'maps-standin.js');
fs.writeFileSync(standin, 'window.google = { maps: { version: "evalon-offline" } };\n');

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(async () => {
  await t.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

function appWith(maps: Parameters<typeof createApp>[0]['maps']) {
  return createApp({
    config: t.config,
    dataSource: t.dataSource,
    logger: createLogger('silent'),
    maps,
  });
}

describe('maps', () => {
  it('serves the stand-in script publicly, as JavaScript allowed by the CSP', async () => {
    const app = appWith({
      apiKey: null,
      hostedScriptUrl: 'unused',
      standinPath: async () => standin,
    });
    const res = await request(app).get('/maps/api/js?key=&callback=onMapsReady').expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/javascript/);
    expect(res.text).toContain('evalon-offline');
    // Same origin: `script-src 'self'` covers /maps/api/js.
    expect(res.headers['content-security-policy']).toContain("script-src 'self'");
  });

  it('tells signed-in people where the script is: the stand-in without a key', async () => {
    const hospital = await makeHospital(t.dataSource);
    const app = appWith({
      apiKey: null,
      hostedScriptUrl: 'unused',
      standinPath: async () => standin,
    });
    const client = await signedInClient(app, hospital.buyer.email, hospital.buyer.password);
    const res = await client.agent.get('/api/config/maps').expect(200);
    expect(res.body).toEqual({ apiKey: null, scriptUrl: '/maps/api/js', offline: true });
    await request(app).get('/api/config/maps').expect(401);
  });

  it('with a key: the hosted loader, and no stand-in route', async () => {
    const hospital = await makeHospital(t.dataSource);
    const app = appWith({
      apiKey: 'browser-key-123',
      hostedScriptUrl: 'https://maps.example/api/js',
      standinPath: async () => standin,
    });
    const client = await signedInClient(app, hospital.buyer.email, hospital.buyer.password);
    const res = await client.agent.get('/api/config/maps').expect(200);
    expect(res.body).toEqual({
      apiKey: 'browser-key-123',
      scriptUrl: 'https://maps.example/api/js',
      offline: false,
    });
    const script = await request(app).get('/maps/api/js');
    expect(script.text).not.toContain('evalon-offline');
  });

  it('finds the real stand-in through infra/fakes/maps at run time (outside Jest’s loader)', () => {
    // Jest cannot import ES modules natively, so the real loader runs in a plain Node process
    // through tsx, as it would in the server.
    const script = `import('${path.join(repoRoot, 'server/src/maps/api/routes.ts')}').then(async (m) => {
      const load = (m.repositoryStandin ?? m.default.repositoryStandin)({ EVALON_ROOT: ${JSON.stringify(repoRoot)} });
      const p = await load();
      console.log(p);
    })`;
    const out = spawnSync(process.execPath, ['--import', 'tsx', '-e', script], {
      cwd: repoRoot,
      encoding: 'utf8',
      timeout: 60_000,
    });
    expect(out.status).toBe(0);
    const file = out.stdout.trim().split('\n').pop()!;
    expect(file).toBe(path.join(repoRoot, 'infra/fakes/maps/dist/maps-standin.js'));
    expect(fs.readFileSync(file, 'utf8')).toContain('evalon-offline');
    expect(typeof repositoryStandin()).toBe('function');
  });
});
