import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import mysql from 'mysql2/promise';
import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { createApp } from '../src/app';
import { loadConfig, type Config } from '../src/config';
import { createDataSource } from '../src/database/data-source';
import { loadDemoData } from '../src/demo/load-demo-data';
import { createLogger } from '../src/logger';
import {
  bodyRoutes,
  buildMatrixFixture,
  matrixRoles,
  renderMatrix,
  matrixRouteKeys,
  runMatrix,
  fillPath,
  matrixClients,
  type MatrixFixture,
  type MatrixRow,
} from './helpers/access-matrix';
import { hostileBodies, type OpenApi } from './helpers/fuzz-bodies';
import { appTables } from '../src/database/data-source';
import { RecordingMailer } from './helpers/recording-mailer';
import { testDatabasePrefix } from './test-database';

// The matrix runs on the demo data, so it gets a database of its own (like demo-data.test.ts).
const database = `${testDatabasePrefix}_matrix_w${process.env.JEST_WORKER_ID ?? '1'}`;
const matrixFile = path.join(__dirname, '..', '..', 'docs', 'security', 'access-matrix.md');
let config: Config;
let dataSource: DataSource;
let app: Express;
let rows: MatrixRow[];
let allRoutes: string[];
let openapi: OpenApi;
let fixture: MatrixFixture;
const standin = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-matrix-')), 'maps.js');
fs.writeFileSync(standin, 'window.google = { maps: { version: "evalon-offline" } };\n');

async function adminQuery(sql: string): Promise<void> {
  const c = await mysql.createConnection({
    host: config.db.host,
    port: config.db.port,
    user: config.db.user,
    password: config.db.password,
  });
  try {
    await c.query(sql);
  } finally {
    await c.end();
  }
}

jest.setTimeout(180_000);

beforeAll(async () => {
  // Files the set-up and the matrix store go to a temporary folder, not the app's.
  const files = fs.mkdtempSync(path.join(os.tmpdir(), 'evalon-matrix-files-'));
  config = loadConfig({
    ...process.env,
    EVALON_DB_NAME: database,
    EVALON_UPLOAD_DIR: path.join(files, 'photos'),
    EVALON_DOCUMENT_DIR: path.join(files, 'documents'),
    EVALON_CREDENTIAL_DIR: path.join(files, 'credentials'),
  });
  await adminQuery(`DROP DATABASE IF EXISTS \`${database}\``);
  await adminQuery(
    `CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
  );
  dataSource = createDataSource(config.db);
  await dataSource.initialize();
  await dataSource.runMigrations();
  await loadDemoData(dataSource);
  app = createApp({
    config,
    dataSource,
    mailer: new RecordingMailer(),
    logger: createLogger(config.logLevel),
    // Jest cannot import the ES module that finds the built stand-in (maps.test.ts does the same).
    maps: { apiKey: null, hostedScriptUrl: '', standinPath: async () => standin },
  });
  fixture = await buildMatrixFixture(dataSource, app);
  const request = (await import('supertest')).default;
  openapi = (await request(app).get('/api/openapi.json').expect(200)).body as OpenApi;
  allRoutes = matrixRouteKeys(app).map((r) => `${r.method} ${r.path}`);
  rows = await runMatrix(
    app,
    fixture,
    bodyRoutes(openapi),
    new Set(allRoutes.filter((k) => !(k in expectedPass))),
  );
  if (process.env.EVALON_WRITE_ACCESS_MATRIX === '1') {
    fs.mkdirSync(path.dirname(matrixFile), { recursive: true });
    fs.writeFileSync(matrixFile, renderMatrix(rows));
  }
});
afterAll(async () => {
  await dataSource?.destroy();
  await adminQuery(`DROP DATABASE IF EXISTS \`${database}\``);
});

/**
 * Routes added by the visits, shipments and evidence work after the matrix was written: they are
 * called by nobody in the matrix yet (their own API tests cover their access rules: evidence.test.ts, evidence-report.test.ts,
 * photos in shipments tests). Listed by
 * name so the list can only shrink on purpose.
 */
const awaitingExpectations: readonly string[] = [
  'DELETE /api/loans/:id/cases/:caseId',
  'GET /api/loans/:id/cases',
  'GET /api/loans/:id/cases.csv',
  'GET /api/loans/:id/metrics',
  'GET /api/loans/:id/report',
  'GET /api/loans/:id/report.pdf',
  'GET /api/shipments/:id/photos/:photoId',
  'GET /api/shipments/in-transit',
  'PATCH /api/loans/:id/cases/:caseId',
  'POST /api/loans/:id/cases',
  'POST /api/loans/:id/decision',
  'POST /api/loans/:id/feedback',
  'POST /api/shipments/:id/photos',
  'PUT /api/loans/:id/evidence-sharing',
];

const key = (r: MatrixRow) => `${r.method} ${r.path}`;
const isAccessRefusal = (status: number) => status === 401 || status === 403 || status === 404;

/**
 * Who gets past the access and scope checks with ids of their own organisation (anything but
 * 401/403/404), per route. Written from the product brief's role table and each route's summary,
 * and reviewed line by line against the first generated matrix; a change in who may do what has
 * to be made here on purpose. `everyone` = the signed-in roles; `out` = nobody signed in.
 */
const signedIn = 'admin buyer clinician fleet_manager coordinator proctor';
const hospitalAndLenderPeople = 'admin buyer clinician fleet_manager coordinator';
const expectedPass: Record<string, string> = {
  'GET /api/admin/outbox': 'admin',
  // No outbox message exists on fresh demo data: the admin's own id names nothing (404).
  'POST /api/admin/outbox/:id/resend': '',
  'GET /api/audit': 'admin',
  'POST /api/auth/accept-invitation': `out ${signedIn}`,
  'POST /api/auth/change-password': signedIn,
  'GET /api/auth/csrf': `out ${signedIn}`,
  'POST /api/auth/login': `out ${signedIn}`,
  'POST /api/auth/logout': `out ${signedIn}`,
  'GET /api/auth/me': signedIn,
  'PATCH /api/auth/me': signedIn,
  'POST /api/auth/password-reset': `out ${signedIn}`,
  'POST /api/auth/reset-password': `out ${signedIn}`,
  'GET /api/availability': 'buyer clinician',
  'GET /api/availability/alternatives': 'buyer clinician',
  'GET /api/config/maps': signedIn,
  'POST /api/gs1/parse': signedIn,
  'GET /api/health': `out ${signedIn}`,
  'GET /api/lenders/:orgId/credit-agreements': 'admin fleet_manager coordinator',
  'PUT /api/lenders/:orgId/credit-agreements/:hospitalId': 'fleet_manager',
  'GET /api/lenders/:orgId/depots': 'admin fleet_manager coordinator',
  'POST /api/lenders/:orgId/depots': 'fleet_manager',
  'PUT /api/lenders/:orgId/depots/:siteId': 'fleet_manager',
  'GET /api/lenders/:orgId/shipment-settings': 'admin fleet_manager coordinator',
  'PUT /api/lenders/:orgId/shipment-settings': 'admin fleet_manager',
  'GET /api/lenders/:orgId/shipping-settings': 'admin fleet_manager coordinator',
  'PUT /api/lenders/:orgId/shipping-settings': 'fleet_manager',
  'GET /api/loans': signedIn,
  'POST /api/loans': 'buyer',
  // Proctors see no loans.
  'GET /api/loans/:id': hospitalAndLenderPeople,
  'POST /api/loans/:id/approve': 'fleet_manager',
  'POST /api/loans/:id/cancel': 'buyer',
  'POST /api/loans/:id/decline': 'fleet_manager',
  'POST /api/loans/:id/deposit': 'buyer',
  'POST /api/loans/:id/deposit/refresh': hospitalAndLenderPeople,
  'GET /api/loans/:id/documents': hospitalAndLenderPeople,
  'POST /api/loans/:id/documents': 'buyer',
  'GET /api/loans/:id/documents/:docId': hospitalAndLenderPeople,
  // The return inspection and the settlement are the lender's.
  'POST /api/loans/:id/inspection': 'coordinator',
  'GET /api/loans/:id/payments': hospitalAndLenderPeople,
  'POST /api/loans/:id/settle': 'coordinator',
  'GET /api/models': signedIn,
  'POST /api/models': 'fleet_manager',
  'GET /api/models/:id': signedIn,
  'PUT /api/models/:id': 'fleet_manager',
  'POST /api/models/:id/photos': 'fleet_manager',
  'DELETE /api/models/:id/photos/:photoId': 'fleet_manager',
  'GET /api/notifications': signedIn,
  'POST /api/notifications/:id/read': signedIn,
  'POST /api/notifications/read-all': signedIn,
  'GET /api/openapi.json': `out ${signedIn}`,
  'GET /api/organisations': signedIn,
  'POST /api/organisations/:orgId/invitations': 'admin buyer fleet_manager',
  'GET /api/organisations/:orgId/members': 'admin buyer fleet_manager',
  'PATCH /api/organisations/:orgId/members/:membershipId': 'admin buyer fleet_manager',
  'POST /api/organisations/:orgId/members/:membershipId/deactivate': 'admin buyer fleet_manager',
  'POST /api/organisations/:orgId/members/:membershipId/reactivate': 'admin buyer fleet_manager',
  'POST /api/organisations/:orgId/members/:membershipId/resend-invitation':
    'admin buyer fleet_manager',
  'GET /api/photos/:id': signedIn,
  'GET /api/proctors/me': 'proctor',
  'PUT /api/proctors/me': 'proctor',
  'PUT /api/proctors/me/availability': 'proctor',
  'GET /api/proctors/me/availability/preview': 'proctor',
  'GET /api/proctors/me/credentials': 'proctor',
  'POST /api/proctors/me/credentials': 'proctor',
  // The demo proctor has no credential file on fresh demo data (own id answers 404).
  'GET /api/proctors/me/credentials/:credentialId/file': '',
  'GET /api/shipments': signedIn,
  'GET /api/shipments/:id': hospitalAndLenderPeople,
  // The hospital attests decontamination and confirms receipt; the lender packs, scans, hands
  // over outbound legs and receives returns.
  'POST /api/shipments/:id/decontamination': 'buyer',
  'POST /api/shipments/:id/hand-over': 'coordinator',
  'POST /api/shipments/:id/manual-ticks': 'coordinator',
  'POST /api/shipments/:id/pack': 'coordinator',
  'GET /api/shipments/:id/packing-slip.pdf': hospitalAndLenderPeople,
  'POST /api/shipments/:id/receipt': 'buyer',
  'POST /api/shipments/:id/receive': 'coordinator',
  'POST /api/shipments/:id/scans': 'coordinator',
  'GET /api/sites': signedIn,
  'GET /api/units': signedIn,
  'POST /api/units': 'fleet_manager',
  'GET /api/units/:id': signedIn,
  'PUT /api/units/:id': 'fleet_manager',
  'GET /api/units/:id/holds': signedIn,
  'POST /api/units/:id/holds': 'fleet_manager coordinator',
  // The fleet manager's delete runs first and removes the hold: the coordinator's own id is gone.
  'DELETE /api/units/:id/holds/:holdId': 'fleet_manager',
  'GET /api/visits': signedIn,
  'POST /api/visits': 'buyer clinician',
  // Lenders are not party to proctoring visits.
  'GET /api/visits/:id': 'admin buyer clinician proctor',
  'POST /api/visits/:id/accept': 'proctor',
  'POST /api/visits/:id/cancel': 'buyer clinician',
  'POST /api/visits/:id/cases': 'proctor',
  'POST /api/visits/:id/complete': 'proctor',
  'POST /api/visits/:id/decline': 'proctor',
  'POST /api/visits/:id/offers': 'buyer clinician',
  'POST /api/visits/:id/sign-offs': 'proctor',
  // No sign-off on the chosen own visits of fresh demo data (own id answers 404).
  'GET /api/visits/:id/sign-offs/:signOffId/pdf': '',
  'POST /api/visits/:id/withdraw': 'proctor',
  'GET /api/visits/candidates': 'admin buyer clinician',
  'GET /api/visits/settings/hospitals/:hospitalId': 'admin buyer',
  'PUT /api/visits/settings/hospitals/:hospitalId': 'admin buyer',
  'GET /api/visits/settings/lenders/:lenderId': 'admin fleet_manager',
  'PUT /api/visits/settings/models/:modelId': 'admin fleet_manager',
  'GET /api/visits/training-record': 'clinician',
  // Signed by the sender instead of a session: refused (400) without a valid signature.
  'POST /api/webhooks/carrier': `out ${signedIn}`,
  'POST /api/webhooks/payments': `out ${signedIn}`,
  'GET /maps/api/js': `out ${signedIn}`,
};

/** Catalogue reads every signed-in person may make for any lender's ids (the marketplace). */
const sharedCatalogue = new Set([
  'GET /api/models/:id',
  'GET /api/photos/:id',
  'GET /api/units/:id',
  'GET /api/units/:id/holds',
]);

const roleName = (role: string) => (role === 'signed out' ? 'out' : role);

describe('access matrix: every route × every demo role × own and another organisation’s ids', () => {
  it('covers every API route, and every route has an expectation', () => {
    expect(rows.length).toBeGreaterThanOrEqual(100);
    expect(rows.map(key).sort()).toEqual(
      Object.keys(expectedPass)
        .filter((k) => !awaitingExpectations.includes(k))
        .sort(),
    );
    // Routes that landed while the matrix was being written wait here, by name, until their
    // expected roles are written into `expectedPass`: a route in neither list fails.
    expect(allRoutes.filter((k) => !(k in expectedPass)).sort()).toEqual(
      [...awaitingExpectations].sort(),
    );
  });

  it('never answers 5xx', () => {
    const failures = rows.flatMap((r) =>
      matrixRoles.flatMap((role) =>
        [r.cells[role].own, r.cells[role].other ?? 0]
          .filter((s) => s >= 500)
          .map((s) => `${key(r)} as ${role}: ${s}`),
      ),
    );
    expect(failures).toEqual([]);
  });

  it('lets through exactly the expected roles with their own ids', () => {
    const surprises: string[] = [];
    for (const r of rows) {
      const expected = new Set((expectedPass[key(r)] ?? '').split(' ').filter(Boolean));
      for (const role of matrixRoles) {
        const passed = !isAccessRefusal(r.cells[role].own);
        if (passed !== expected.has(roleName(role))) {
          surprises.push(`${key(r)} as ${role}: ${r.cells[role].own}`);
        }
      }
    }
    expect(surprises).toEqual([]);
  });

  it('asks nobody signed in to sign in (401) on every route that is not public', () => {
    const wrong = rows
      .filter((r) => r.rule !== 'public')
      .filter(
        (r) => r.cells['signed out'].own !== 401 || (r.cells['signed out'].other ?? 401) !== 401,
      )
      .map((r) => `${key(r)}: ${r.cells['signed out'].own}/${r.cells['signed out'].other}`);
    expect(wrong).toEqual([]);
  });

  it('refuses another organisation’s ids with 403 or 404, before any validation message', () => {
    const wrong: string[] = [];
    for (const r of rows.filter((row) => row.rule !== 'public')) {
      for (const role of matrixRoles) {
        const other = r.cells[role].other;
        if (other === undefined || role === 'admin' || role === 'signed out') continue;
        const ok = sharedCatalogue.has(key(r))
          ? other < 300 || isAccessRefusal(other)
          : isAccessRefusal(other);
        if (!ok) wrong.push(`${key(r)} as ${role}: ${other}`);
      }
    }
    expect(wrong).toEqual([]);
    // The case from the issue: the German hospital's buyer cancelling the US hospital's loan.
    const cancel = rows.find((r) => key(r) === 'POST /api/loans/:id/cancel')!;
    expect(cancel.cells.buyer).toEqual({ own: 422, other: 404 });
  });

  it('has a current docs/security/access-matrix.md (npm run security:access-matrix)', () => {
    const onDisk = fs.existsSync(matrixFile) ? fs.readFileSync(matrixFile, 'utf8') : '';
    expect(onDisk).toBe(renderMatrix(rows));
  });
});

// Tables whose rows change with any request (sessions touched, refusals audited) are left out of
// the "nothing written" comparison.
const volatileTables = new Set(['sessions', 'audit_events']);
async function rowCounts(): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const table of appTables.filter((t) => !volatileTables.has(t))) {
    const [row] = await dataSource.query(`SELECT COUNT(*) AS n FROM \`${table}\``);
    counts[table] = Number(row.n);
  }
  return counts;
}

/** Bodies per write route; fast-check's seed is fixed so a failure repeats. */
const casesPerRoute = 25;

describe('fuzzed bodies on every write route with a body contract', () => {
  it('answers 400/413/422 with a code (field details on 422), never 5xx, and writes nothing', async () => {
    const clients = await matrixClients(app);
    const report: string[] = [];
    const problems: string[] = [];
    const targets = rows.filter(
      (r) => r.body && r.path !== '/api/auth/logout' && !r.path.startsWith('/api/webhooks/'),
    );
    for (const r of targets) {
      // The first role that gets past access with its own ids (see the matrix), so the body
      // reaches validation.
      const role = matrixRoles.find((x) => r.cells[x].own === 422)!;
      const path = fillPath(r.path, fixture.own[role], fixture.outbox);
      const bodies = hostileBodies(openapi, r.method, r.path, casesPerRoute);
      const before = await rowCounts();
      const seen = new Map<number, number>();
      for (const text of bodies) {
        const client = clients[role];
        const method = r.method.toLowerCase() as 'post' | 'put' | 'patch';
        const res = await client.agent[method](path)
          .set('X-XSRF-TOKEN', client.csrf)
          .set('Content-Type', 'application/json')
          .send(text);
        seen.set(res.status, (seen.get(res.status) ?? 0) + 1);
        const okStatus = res.status === 400 || res.status === 413 || res.status === 422;
        const hasCode = typeof res.body?.error?.code === 'string';
        const hasDetails = res.status !== 422 || res.body?.error?.details !== undefined;
        if (!okStatus || !hasCode || !hasDetails) {
          problems.push(
            `${r.method} ${r.path} as ${role}: ${res.status} for ${text.slice(0, 200)}`,
          );
        }
      }
      const after = await rowCounts();
      const changed = Object.keys(before).filter((t) => before[t] !== after[t]);
      if (changed.length)
        problems.push(`${r.method} ${r.path}: rows changed in ${changed.join(', ')}`);
      report.push(
        `${r.method} ${r.path} (${role}): ${bodies.length} cases → ${[...seen]
          .map(([status, n]) => `${n}×${status}`)
          .join(', ')}`,
      );
    }
    // The per-route counts go to the test output (reported in the closing note).
    console.log(`fuzz cases per route:\n${report.join('\n')}`);
    expect(targets.length).toBeGreaterThanOrEqual(40);
    expect(problems).toEqual([]);
  });
});
