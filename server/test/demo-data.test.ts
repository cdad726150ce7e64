import mysql from 'mysql2/promise';
import type { DataSource } from 'typeorm';
import { isTimeZone, isValidGtin, modelCategories } from '@evalon/contracts';
import { createApp } from '../src/app';
import { loadConfig, type Config } from '../src/config';
import { createDataSource } from '../src/database/data-source';
import { demoPassword } from '../src/demo/demo-data';
import { isDatabaseEmpty, loadDemoData, truncateAppTables } from '../src/demo/load-demo-data';
import { createLogger } from '../src/logger';
import { anonymousClient, signedInClient } from './helpers/http';
import { RecordingMailer } from './helpers/recording-mailer';
import { testDatabasePrefix } from './test-database';

// The demo loader needs an empty database, so this file gets one of its own.
const database = `${testDatabasePrefix}_demo_w${process.env.JEST_WORKER_ID ?? '1'}`;
let config: Config;
let dataSource: DataSource;

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

beforeAll(async () => {
  config = loadConfig({ ...process.env, EVALON_DB_NAME: database });
  await adminQuery(`DROP DATABASE IF EXISTS \`${database}\``);
  await adminQuery(
    `CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
  );
  dataSource = createDataSource(config.db);
  await dataSource.initialize();
  await dataSource.runMigrations();
}, 30_000);
afterAll(async () => {
  await dataSource?.destroy();
  await adminQuery(`DROP DATABASE IF EXISTS \`${database}\``);
});

// Loading the demo data (17 loans, ten of them with shipments; the visits played through the
// visit use cases) takes seconds on a busy machine.
jest.setTimeout(60_000);

describe('demo data', () => {
  it('loads into an empty database only', async () => {
    expect(await isDatabaseEmpty(dataSource)).toBe(true);
    const summary = await loadDemoData(dataSource);
    expect(summary).toEqual({
      organisations: 5,
      sites: 6,
      people: 11,
      models: 7,
      units: 37,
      maintenanceHolds: 4,
      loans: 17,
      proctors: 8,
      visits: 7,
    });
    const [counts] = await dataSource.query(
      'SELECT (SELECT COUNT(*) FROM organisations) AS o, (SELECT COUNT(*) FROM sites) AS s, (SELECT COUNT(*) FROM users) AS u',
    );
    // The identity part's 5 organisations and 11 people, plus 5 more proctor practices and
    // 7 more proctors.
    expect([Number(counts.o), Number(counts.s), Number(counts.u)]).toEqual([10, 6, 18]);
    expect(await isDatabaseEmpty(dataSource)).toBe(false);
    await expect(loadDemoData(dataSource)).rejects.toThrow(/empty/);
  }, 60_000);

  it('has the accounts the brief names, in the right kinds of organisation', async () => {
    const rows: { email: string; role: string; kind: string; organisation: string }[] =
      await dataSource.query(
        `SELECT u.email, m.role, o.kind, o.name AS organisation
         FROM users u JOIN memberships m ON m.user_id = u.id JOIN organisations o ON o.id = m.organisation_id`,
      );
    const by = new Map(rows.map((r) => [r.email, r]));
    expect(by.get('admin@evalon.example')).toMatchObject({
      role: 'admin',
      kind: 'platform',
      organisation: 'Evalon Marketplace',
    });
    expect(by.get('buyer@velmora.example')).toMatchObject({
      role: 'buyer',
      kind: 'hospital',
      organisation: 'Velmora Health',
    });
    expect(by.get('clinician@velmora.example')).toMatchObject({
      role: 'clinician',
      kind: 'hospital',
    });
    expect(by.get('buyer@orlenbach.example')).toMatchObject({
      role: 'buyer',
      organisation: 'Klinikum Orlenbach',
    });
    expect(by.get('fleet@quorvel.example')).toMatchObject({
      role: 'fleet_manager',
      kind: 'lender',
      organisation: 'Quorvel Surgical',
    });
    expect(by.get('coordinator@quorvel.example')).toMatchObject({
      role: 'coordinator',
      kind: 'lender',
    });
    expect(by.get('proctor@proctors.example')).toMatchObject({
      role: 'proctor',
      kind: 'proctor_practice',
    });
    // Invented people only: every address uses a reserved .example domain (RFC 2606).
    expect(rows.every((r) => r.email.endsWith('.example'))).toBe(true);
  });

  it('gives sites real IANA zones, plausible coordinates and depot cut-offs', async () => {
    const sites: {
      name: string;
      kind: string;
      time_zone: string;
      latitude: string;
      longitude: string;
      cutoff_time: string | null;
      org: string;
    }[] = await dataSource.query(
      'SELECT s.name, s.kind, s.time_zone, s.latitude, s.longitude, s.cutoff_time, o.name AS org FROM sites s JOIN organisations o ON o.id = s.organisation_id',
    );
    expect(sites.every((s) => isTimeZone(s.time_zone))).toBe(true);
    const velmora = sites
      .filter((s) => s.org === 'Velmora Health')
      .map((s) => s.time_zone)
      .sort();
    expect(velmora).toEqual(['America/Chicago', 'America/New_York']);
    const depots = sites.filter((s) => s.kind === 'depot');
    expect(depots.map((s) => s.time_zone).sort()).toEqual([
      'America/Los_Angeles',
      'America/New_York',
      'Europe/Berlin',
    ]);
    expect(depots.every((s) => /^\d{2}:\d{2}$/.test(s.cutoff_time ?? ''))).toBe(true);
    // Boston-like campus: north-eastern US (roughly 40–45°N, 67–75°W).
    const boston = sites.find((s) => s.name === 'Velmora East Campus')!;
    expect(Number(boston.latitude)).toBeGreaterThan(40);
    expect(Number(boston.latitude)).toBeLessThan(45);
    expect(Number(boston.longitude)).toBeGreaterThan(-75);
    expect(Number(boston.longitude)).toBeLessThan(-67);
  });

  it('demo accounts sign in with the demo password; the deactivated and pending ones do not', async () => {
    const app = createApp({
      config,
      dataSource,
      mailer: new RecordingMailer(),
      logger: createLogger('silent'),
    });
    const me = await signedInClient(app, 'buyer@velmora.example', demoPassword);
    const members = await me.agent.get('/api/auth/me').expect(200);
    const velmoraId = members.body.user.memberships[0].organisationId;
    const list = await me.agent.get(`/api/organisations/${velmoraId}/members`).expect(200);
    const states = (list.body.items as { email: string; active: boolean; pending: boolean }[]).map(
      (m) => [m.email, m.active, m.pending],
    );
    expect(states).toEqual(
      expect.arrayContaining([
        ['or.nurse@velmora.example', true, true],
        ['former.clinician@velmora.example', false, false],
      ]),
    );
    const client = await anonymousClient(app);
    const deactivated = await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: 'former.clinician@velmora.example', password: demoPassword })
      .expect(401);
    expect(deactivated.body.error.code).toBe('account_deactivated');
    await client.agent
      .post('/api/auth/login')
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: 'or.nurse@velmora.example', password: demoPassword })
      .expect(401);
  });

  it('lists Quorvel’s catalogue: models in every category, 30+ units over 3 depots, valid GTINs', async () => {
    const models: { id: number; category: string; name: string }[] = await dataSource.query(
      `SELECT m.id, m.category, m.name FROM models m JOIN organisations o ON o.id = m.lender_id
        WHERE o.name = 'Quorvel Surgical'`,
    );
    expect(models.length).toBeGreaterThanOrEqual(6);
    expect(new Set(models.map((m) => m.category))).toEqual(new Set(modelCategories));
    const perDepot: { depot: string; n: string }[] = await dataSource.query(
      `SELECT d.name AS depot, COUNT(*) AS n FROM units u JOIN sites d ON d.id = u.home_depot_id
        GROUP BY d.name ORDER BY d.name`,
    );
    expect(perDepot.map((r) => r.depot)).toEqual([
      'Quorvel East Depot',
      'Quorvel Europe Depot',
      'Quorvel West Depot',
    ]);
    expect(perDepot.reduce((sum, r) => sum + Number(r.n), 0)).toBeGreaterThanOrEqual(30);
    // GS1 check digits (GS1 General Specifications §7.9.1) of every packing-list GTIN and UDI.
    const gtins: { gtin: string }[] = await dataSource.query(
      'SELECT gtin FROM model_packing_items WHERE gtin IS NOT NULL UNION SELECT udi_di FROM units WHERE udi_di IS NOT NULL',
    );
    expect(gtins.length).toBeGreaterThan(20);
    expect(gtins.filter((g) => !isValidGtin(g.gtin))).toEqual([]);
    // The robotic platform compatible with the flexible endoscopes and the laser (and back).
    const robot = models.find((m) => m.category === 'robotic_platform')!;
    const partners: { category: string }[] = await dataSource.query(
      `SELECT m.category FROM model_compatibility c JOIN models m ON m.id = c.compatible_model_id
        WHERE c.model_id = ?`,
      [robot.id],
    );
    expect(partners.map((p) => p.category)).toEqual(
      expect.arrayContaining(['flexible_endoscope', 'laser']),
    );
    const back: { n: string }[] = await dataSource.query(
      'SELECT COUNT(*) AS n FROM model_compatibility WHERE compatible_model_id = ?',
      [robot.id],
    );
    expect(Number(back[0]!.n)).toBe(partners.length);
  });

  it('has shipments in every state, one at risk, one overdue, one return awaiting inspection', async () => {
    const legs: { direction: string; state: string; at_risk: number; overdue: number }[] =
      await dataSource.query(
        'SELECT direction, state, at_risk, overdue_at <= NOW(3) AS overdue FROM shipments',
      );
    const outbound = new Set(legs.filter((l) => l.direction === 'outbound').map((l) => l.state));
    const returns = new Set(legs.filter((l) => l.direction === 'return').map((l) => l.state));
    for (const s of ['to_pack', 'packed', 'handed_over', 'in_transit', 'delivered', 'exception']) {
      expect(outbound).toContain(s);
    }
    for (const s of ['awaiting_return', 'in_transit', 'received', 'inspected']) {
      expect(returns).toContain(s);
    }
    const open = legs.filter((l) => l.direction === 'outbound' && l.state === 'in_transit');
    expect(open.filter((l) => Number(l.at_risk) === 1 && Number(l.overdue) === 0)).toHaveLength(1);
    expect(open.filter((l) => Number(l.overdue) === 1)).toHaveLength(1);
    expect(legs.filter((l) => l.direction === 'return' && l.state === 'received')).toHaveLength(1);
    // The return on its way back is due at the depot by the loan's back-at-depot day, with an
    // expected arrival from its hand-over.
    const back: { due: string; back: string; eta: string | null }[] = await dataSource.query(
      `SELECT CAST(s.due_by AS CHAR) AS due, CAST(l.back_at_depot AS CHAR) AS back,
              CAST(s.eta AS CHAR) AS eta
         FROM shipments s JOIN loans l ON l.id = s.loan_id
        WHERE s.direction = 'return' AND s.state = 'in_transit'`,
    );
    expect(back).toHaveLength(1);
    expect(back[0]!.due).toBe(back[0]!.back);
    expect(back[0]!.eta).toMatch(/^\d{4}-\d{2}-\d{2}$/);
  });

  it('has loans of both hospitals in each early state, and holds in the coming months', async () => {
    const loans: { hospital: string; state: string }[] = await dataSource.query(
      'SELECT o.name AS hospital, l.state FROM loans l JOIN organisations o ON o.id = l.hospital_id',
    );
    expect(new Set(loans.map((l) => l.state))).toEqual(
      new Set([
        'requested',
        'approved',
        'declined',
        'cancelled',
        // The journey after confirmation, carried by the demo shipments.
        'confirmed',
        'shipped',
        'delivered',
        'returning',
        'returned',
      ]),
    );
    expect(loans.filter((l) => l.hospital === 'Velmora Health').length).toBeGreaterThanOrEqual(3);
    expect(loans.filter((l) => l.hospital === 'Klinikum Orlenbach').length).toBeGreaterThanOrEqual(
      3,
    );
    const holds: { kind: string; start: string; loan_state: string | null }[] =
      await dataSource.query(
        `SELECT h.kind, CAST(h.start_date AS CHAR) AS start, l.state AS loan_state
         FROM holds h LEFT JOIN loans l ON l.id = h.loan_id`,
      );
    const today = new Date().toISOString().slice(0, 10);
    expect(holds.filter((h) => h.kind === 'maintenance').length).toBeGreaterThanOrEqual(3);
    expect(holds.every((h) => h.start >= today)).toBe(true);
    // Declined and cancelled loans gave their holds back.
    expect(
      holds.filter((h) => h.loan_state === 'declined' || h.loan_state === 'cancelled'),
    ).toEqual([]);
    const events: { n: string }[] = await dataSource.query('SELECT COUNT(*) AS n FROM loan_events');
    // The first seven: one request each, plus 2 approvals, 1 decline, 1 cancel. The ten staged
    // for shipments: request, approval and confirmation each, plus their journey steps
    // (shipped ×4 for handed over, at risk, overdue, lost; delivered: 2; returning: 3;
    // awaiting inspection and inspected: 4 each).
    expect(Number(events[0]!.n)).toBe(7 + 4 + 10 * 3 + (4 + 2 + 3 + 4 + 4));
  });

  it('has eight proctors in the US and Germany, one licence ending mid next month, visits in several states', async () => {
    const proctors: { country: string; n: number }[] = await dataSource.query(
      'SELECT home_country AS country, COUNT(*) AS n FROM proctor_profiles GROUP BY home_country ORDER BY home_country',
    );
    expect(proctors.map((p) => [p.country, Number(p.n)])).toEqual([
      ['DE', 3],
      ['US', 5],
    ]);
    const today = new Date();
    const next = new Date(Date.UTC(today.getUTCFullYear(), today.getUTCMonth() + 1, 15));
    const [ending] = await dataSource.query(
      "SELECT COUNT(*) AS n FROM proctor_credentials WHERE valid_to = ? AND kind = 'licence'",
      [next.toISOString().slice(0, 10)],
    );
    expect(Number(ending.n)).toBe(1);
    const states: { state: string }[] = await dataSource.query(
      'SELECT DISTINCT state FROM visits ORDER BY state',
    );
    expect(states.map((r) => r.state)).toEqual([
      'accepted',
      'cancelled',
      'completed',
      'offered',
      'signed_off',
      'unfilled',
    ]);
    const campuses: { subdivision: string | null }[] = await dataSource.query(
      "SELECT subdivision FROM sites WHERE kind = 'campus' ORDER BY subdivision",
    );
    expect(campuses.map((c) => c.subdivision)).toEqual(['DE-BW', 'US-IL', 'US-MA']);
  });

  it('reset empties every application table', async () => {
    await truncateAppTables(dataSource);
    expect(await isDatabaseEmpty(dataSource)).toBe(true);
    const [sessions] = await dataSource.query('SELECT COUNT(*) AS n FROM sessions');
    expect(Number(sessions.n)).toBe(0);
    for (const table of ['models', 'units', 'loans', 'holds', 'loan_events']) {
      const [row] = await dataSource.query(`SELECT COUNT(*) AS n FROM ${table}`);
      expect([table, Number(row.n)]).toEqual([table, 0]);
    }
    const [migrations] = await dataSource.query('SELECT COUNT(*) AS n FROM migrations');
    expect(Number(migrations.n)).toBeGreaterThan(0);
    // Loan references start again at 1 (the sequence is not cached, so no restart skips any).
    const [next] = await dataSource.query('SELECT NEXTVAL(loan_reference_seq) AS n');
    expect(Number(next.n)).toBe(1);
    const [seq] = await dataSource.query('SELECT cache_size AS cache FROM loan_reference_seq');
    expect(Number(seq.cache)).toBe(0);
  });
});
