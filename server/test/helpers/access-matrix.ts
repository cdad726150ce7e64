import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { demoPassword } from '../../src/demo/demo-data';
import { anonymousClient, signedInClient, type Client } from './http';
import { makeLender, makeModel, makeUnit, type TestHospital } from './catalog';
import { makePerson } from './factories';
import { tinyPng } from './images';
import { insertApprovedLoan, minimalPdf } from './payments';
import { ensureOutboundShipments } from '../../src/shipments';
import { listRoutes, type FoundRoute } from './routes';

/** The people the matrix signs in as: one per demo role, plus nobody. */
export const matrixRoles = [
  'signed out',
  'admin',
  'buyer',
  'clinician',
  'fleet_manager',
  'coordinator',
  'proctor',
] as const;
export type MatrixRole = (typeof matrixRoles)[number];

/** Demo accounts (invented people, `.example` domains) for each signed-in role. */
const demoAccounts: Record<Exclude<MatrixRole, 'signed out'>, string> = {
  admin: 'admin@evalon.example',
  buyer: 'buyer@velmora.example',
  clinician: 'clinician@velmora.example',
  fleet_manager: 'fleet@quorvel.example',
  coordinator: 'coordinator@quorvel.example',
  proctor: 'proctor@proctors.example',
};

/** Ids of one side (own or other) of every resource kind a path can name. */
interface Side {
  org: number;
  lender: number;
  hospital: number;
  model: number;
  unit: number;
  hold: number;
  photo: number;
  loan: number;
  document: number;
  shipment: number;
  visit: number;
  signOff: number;
  notification: number;
  membership: number;
  site: number;
  credential: number;
}

/** The ids the matrix uses, per role, for "own" and "another organisation's". */
export interface MatrixFixture {
  own: Record<MatrixRole, Side>;
  other: Record<MatrixRole, Side>;
  outbox: number;
}

type Row = Record<string, unknown>;

/** A valid id that names no row (the matrix shows the 404 it gets), where the data has none. */
export const noSuchRow = 2_000_000_000;

async function one(ds: DataSource, sql: string, params: unknown[] = []): Promise<number> {
  const rows: Row[] = await ds.query(sql, params);
  return rows[0] ? Number(Object.values(rows[0])[0]) : noSuchRow;
}

async function orgId(ds: DataSource, name: string): Promise<number> {
  return one(ds, 'SELECT id FROM organisations WHERE name = ?', [name]);
}

async function userId(ds: DataSource, email: string): Promise<number> {
  return one(ds, 'SELECT id FROM users WHERE email = ?', [email]);
}

/**
 * Adds what the demo data lacks for the matrix to the database the demo data was loaded into:
 * a second lender with a model, a unit, a maintenance hold and a loan (the demo has one lender),
 * and a spare member in each organisation for the member routes to act on. Then picks, for each
 * role, one id of its own organisation and one of another organisation for every kind of path
 * parameter.
 */
export async function buildMatrixFixture(ds: DataSource, app: Express): Promise<MatrixFixture> {
  const velmora = await orgId(ds, 'Velmora Health');
  const orlenbach = await orgId(ds, 'Klinikum Orlenbach');
  const quorvel = await orgId(ds, 'Quorvel Surgical');
  const proctorUser = await userId(ds, demoAccounts.proctor);
  const practice = await one(ds, 'SELECT organisation_id FROM memberships WHERE user_id = ?', [
    proctorUser,
  ]);

  const otherLender = await makeLender(ds);
  const otherModel = await makeModel(ds, otherLender.id);
  const otherUnit = await makeUnit(ds, otherModel, otherLender.depotId);
  const orlenbachCampus = await one(
    ds,
    "SELECT id FROM sites WHERE organisation_id = ? AND kind = 'campus' ORDER BY id LIMIT 1",
    [orlenbach],
  );
  const orlenbachBuyer = await userId(ds, 'buyer@orlenbach.example');
  const hospitalB: TestHospital = {
    id: orlenbach,
    name: 'Klinikum Orlenbach',
    buyer: {
      userId: orlenbachBuyer,
      membershipId: 0,
      email: 'buyer@orlenbach.example',
      name: '',
      password: demoPassword,
    },
    clinician: { userId: 0, membershipId: 0, email: '', name: '', password: '' },
    campusId: orlenbachCampus,
  };
  const otherLenderLoan = await insertApprovedLoan(ds, otherLender, hospitalB);
  await ds.query(
    `INSERT INTO holds (unit_id, kind, start_date, end_date, loan_id, reason, sequence, created_at, created_by_user_id)
     VALUES (?, 'maintenance', CURDATE() + INTERVAL 60 DAY, CURDATE() + INTERVAL 62 DAY, NULL, 'Matrix check', 0, NOW(3), ?)`,
    [otherUnit, otherLender.fleet.userId],
  );

  // The second lender's loan gets its outbound shipment, as approval would make it.
  await ensureOutboundShipments(ds.manager, otherLenderLoan.id, new Date());
  // One in-app notice per demo person, so the notice routes have an own and a foreign id.
  for (const email of Object.values(demoAccounts)) {
    await ds.query(
      `INSERT INTO notifications (user_id, kind, title, body, link, created_at, read_at, dedupe_key)
       VALUES (?, 'matrix', 'Matrix notice', 'A notice for the access matrix.', NULL, NOW(3), NULL, NULL)`,
      [await userId(ds, email)],
    );
  }

  const spare = new Map<number, number>();
  for (const [org, role] of [
    [velmora, 'clinician'],
    [orlenbach, 'clinician'],
    [quorvel, 'coordinator'],
    [otherLender.id, 'coordinator'],
    [practice, 'proctor'],
  ] as const) {
    spare.set(org, (await makePerson(ds, org, role)).membershipId);
  }

  const modelOf = (lender: number) =>
    one(ds, 'SELECT id FROM models WHERE lender_id = ? ORDER BY id LIMIT 1', [lender]);
  const unitWithHold = (lender: number) =>
    one(
      ds,
      `SELECT u.id FROM units u JOIN models m ON m.id = u.model_id
       LEFT JOIN holds h ON h.unit_id = u.id AND h.kind = 'maintenance'
       WHERE m.lender_id = ? ORDER BY h.id IS NULL, u.id LIMIT 1`,
      [lender],
    );
  const holdOf = (unit: number) =>
    one(ds, "SELECT id FROM holds WHERE unit_id = ? AND kind = 'maintenance' ORDER BY id LIMIT 1", [
      unit,
    ]);
  const photoOf = (model: number) =>
    one(ds, 'SELECT id FROM model_photos WHERE model_id = ? ORDER BY id LIMIT 1', [model]);
  const loanOf = (column: 'hospital_id' | 'lender_id', org: number) =>
    one(
      ds,
      `SELECT l.id FROM loans l LEFT JOIN shipments s ON s.loan_id = l.id
       WHERE l.${column} = ? ORDER BY s.id IS NULL, l.id LIMIT 1`,
      [org],
    );
  const documentOf = (loan: number) =>
    one(ds, 'SELECT id FROM loan_documents WHERE loan_id = ? ORDER BY id LIMIT 1', [loan]);
  const shipmentOf = (loan: number) =>
    one(ds, 'SELECT id FROM shipments WHERE loan_id = ? ORDER BY id LIMIT 1', [loan]);
  const visitOfHospital = (hospital: number) =>
    one(ds, 'SELECT id FROM visits WHERE hospital_id = ? ORDER BY id LIMIT 1', [hospital]);
  const signOffOf = (visit: number) =>
    one(ds, 'SELECT id FROM visit_sign_offs WHERE visit_id = ? ORDER BY id LIMIT 1', [visit]);
  const notificationOf = (user: number) =>
    one(ds, 'SELECT id FROM notifications WHERE user_id = ? ORDER BY id LIMIT 1', [user]);
  const notificationNotOf = (user: number) =>
    one(ds, 'SELECT id FROM notifications WHERE user_id <> ? ORDER BY id LIMIT 1', [user]);
  const siteOf = (org: number) =>
    one(ds, 'SELECT id FROM sites WHERE organisation_id = ? ORDER BY id LIMIT 1', [org]);
  const credentialOf = (user: number) =>
    one(ds, 'SELECT id FROM proctor_credentials WHERE proctor_user_id = ? ORDER BY id LIMIT 1', [
      user,
    ]);
  const credentialNotOf = (user: number) =>
    one(ds, 'SELECT id FROM proctor_credentials WHERE proctor_user_id <> ? ORDER BY id LIMIT 1', [
      user,
    ]);

  const quorvelModel = await modelOf(quorvel);
  // A photo of each lender's model and a document of each hospital's loan, filed through the
  // API as their people would.
  const upload = async (
    email: string,
    password: string,
    path: string,
    field: string,
    data: Buffer,
    filename: string,
    fields: Record<string, string> = {},
  ) => {
    const c = await signedInClient(app, email, password);
    let req = c.agent.post(path).set('X-XSRF-TOKEN', c.csrf);
    for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
    const res = await req.attach(field, data, { filename });
    if (res.status !== 201) throw new Error(`${path} answered ${res.status} for the matrix set-up`);
  };
  await upload(
    demoAccounts.fleet_manager,
    demoPassword,
    `/api/models/${quorvelModel}/photos`,
    'photo',
    tinyPng(),
    'a.png',
  );
  await upload(
    otherLender.fleet.email,
    otherLender.fleet.password,
    `/api/models/${otherModel}/photos`,
    'photo',
    tinyPng(),
    'b.png',
  );
  const velmoraLoanForDocs = await loanOf('hospital_id', velmora);
  const orlenbachLoanForDocs = await loanOf('hospital_id', orlenbach);
  await upload(
    demoAccounts.buyer,
    demoPassword,
    `/api/loans/${velmoraLoanForDocs}/documents`,
    'file',
    minimalPdf(),
    'po.pdf',
    { kind: 'purchase_order' },
  );
  await upload(
    'buyer@orlenbach.example',
    demoPassword,
    `/api/loans/${orlenbachLoanForDocs}/documents`,
    'file',
    minimalPdf(),
    'po.pdf',
    { kind: 'purchase_order' },
  );
  const quorvelUnit = await unitWithHold(quorvel);
  const otherUnitWithHold = await unitWithHold(otherLender.id);
  const catalogue = {
    own: {
      lender: quorvel,
      model: quorvelModel,
      unit: quorvelUnit,
      hold: await holdOf(quorvelUnit),
      photo: await photoOf(quorvelModel),
    },
    other: {
      lender: otherLender.id,
      model: otherModel,
      unit: otherUnitWithHold,
      hold: await holdOf(otherUnitWithHold),
      photo: await photoOf(otherModel),
    },
  };
  // The proctor's own visit: one they proctor, else one with their offer open, else one they
  // were offered.
  const proctorVisit = await one(
    ds,
    `SELECT v.id FROM visits v
     LEFT JOIN visit_offers o ON o.visit_id = v.id AND o.proctor_user_id = ?
     WHERE v.proctor_user_id = ? OR (o.id IS NOT NULL AND o.state <> 'queued')
     ORDER BY v.proctor_user_id <=> ? DESC, o.state = 'offered' DESC, v.id LIMIT 1`,
    [proctorUser, proctorUser, proctorUser],
  );
  const notProctorVisit = await one(
    ds,
    'SELECT id FROM visits WHERE id NOT IN (SELECT visit_id FROM visit_offers WHERE proctor_user_id = ?) ORDER BY id LIMIT 1',
    [proctorUser],
  );

  async function side(input: {
    org: number;
    hospital: number;
    loan: number;
    visit: number;
    user: number;
    foreignUser: boolean;
    catalogue: (typeof catalogue)['own'];
  }): Promise<Side> {
    return {
      org: input.org,
      lender: input.catalogue.lender,
      hospital: input.hospital,
      model: input.catalogue.model,
      unit: input.catalogue.unit,
      hold: input.catalogue.hold,
      photo: input.catalogue.photo,
      loan: input.loan,
      document: await documentOf(input.loan),
      shipment: await shipmentOf(input.loan),
      visit: input.visit,
      signOff: await signOffOf(input.visit),
      notification: input.foreignUser
        ? await notificationNotOf(input.user)
        : await notificationOf(input.user),
      membership: spare.get(input.org) ?? 0,
      site: await siteOf(input.org),
      credential: input.foreignUser
        ? await credentialNotOf(input.user)
        : await credentialOf(input.user),
    };
  }

  const own = {} as Record<MatrixRole, Side>;
  const other = {} as Record<MatrixRole, Side>;
  const velmoraLoan = await loanOf('hospital_id', velmora);
  const orlenbachLoan = await loanOf('hospital_id', orlenbach);
  const quorvelLoan = await loanOf('lender_id', quorvel);
  const velmoraVisit = await visitOfHospital(velmora);
  const orlenbachVisit = await visitOfHospital(orlenbach);
  for (const role of matrixRoles) {
    const user = role === 'signed out' ? 0 : await userId(ds, demoAccounts[role]);
    if (role === 'fleet_manager' || role === 'coordinator') {
      own[role] = await side({
        org: quorvel,
        hospital: velmora,
        loan: quorvelLoan,
        visit: velmoraVisit,
        user,
        foreignUser: false,
        catalogue: catalogue.own,
      });
      other[role] = await side({
        org: otherLender.id,
        hospital: orlenbach,
        loan: otherLenderLoan.id,
        visit: orlenbachVisit,
        user,
        foreignUser: true,
        catalogue: catalogue.other,
      });
    } else if (role === 'proctor') {
      own[role] = await side({
        org: practice,
        hospital: velmora,
        loan: velmoraLoan,
        visit: proctorVisit,
        user,
        foreignUser: false,
        catalogue: catalogue.own,
      });
      other[role] = await side({
        org: orlenbach,
        hospital: orlenbach,
        loan: orlenbachLoan,
        visit: notProctorVisit,
        user,
        foreignUser: true,
        catalogue: catalogue.other,
      });
    } else {
      // Hospital people, the admin and nobody: own = the US hospital network, other = the German
      // hospital (and the second lender for catalogue ids).
      own[role] = await side({
        org: velmora,
        hospital: velmora,
        loan: velmoraLoan,
        visit: velmoraVisit,
        user,
        foreignUser: false,
        catalogue: catalogue.own,
      });
      other[role] = await side({
        org: orlenbach,
        hospital: orlenbach,
        loan: orlenbachLoan,
        visit: orlenbachVisit,
        user,
        foreignUser: true,
        catalogue: catalogue.other,
      });
    }
  }
  const outbox = await one(ds, 'SELECT id FROM outbox_messages ORDER BY id LIMIT 1');
  return { own, other, outbox };
}

/** Which id a path parameter takes, by the path it appears in. */
function paramValue(path: string, name: string, ids: Side, outbox: number): number {
  const base = path.split('/').slice(0, 3).join('/');
  switch (name) {
    case 'orgId':
      return path.startsWith('/api/lenders/') ? ids.lender : ids.org;
    case 'siteId':
      return ids.site;
    case 'membershipId':
      return ids.membership;
    case 'hospitalId':
      return ids.hospital;
    case 'lenderId':
      return ids.lender;
    case 'modelId':
      return ids.model;
    case 'photoId':
      return ids.photo;
    case 'holdId':
      return ids.hold;
    case 'docId':
      return ids.document;
    case 'signOffId':
      return ids.signOff;
    case 'credentialId':
      return ids.credential;
    case 'id':
      switch (base) {
        case '/api/loans':
          return ids.loan;
        case '/api/models':
          return ids.model;
        case '/api/units':
          return ids.unit;
        case '/api/photos':
          return ids.photo;
        case '/api/shipments':
          return ids.shipment;
        case '/api/visits':
          return ids.visit;
        case '/api/notifications':
          return ids.notification;
        case '/api/admin':
          return outbox;
      }
  }
  throw new Error(`The access matrix does not know which id to put in :${name} of ${path}`);
}

/** Whether a route's path names a resource (so "another organisation's" makes sense). */
export function namesResource(path: string): boolean {
  return /:[A-Za-z]+/.test(path);
}

/** The path with ids filled in for one side. */
export function fillPath(path: string, ids: Side, outbox: number): string {
  return path.replace(/:([A-Za-z]+)/g, (_m, name: string) =>
    String(paramValue(path, name, ids, outbox)),
  );
}

/** One cell: the status a request answered. */
export interface MatrixCell {
  own: number;
  /** Absent when the path names no resource. */
  other?: number;
}

/** One row of the matrix: a route and what each role got. */
export interface MatrixRow {
  method: string;
  path: string;
  rule: string;
  /** Whether the route takes a JSON body (sent as `[]`, which no contract accepts). */
  body: boolean;
  cells: Record<MatrixRole, MatrixCell>;
}

/** Every route the matrix is about (API and maps routes, less the skipped ones). */
export function matrixRouteKeys(app: Express): FoundRoute[] {
  return listRoutes(app)
    .filter((r) => r.path.startsWith('/api/') || r.path.startsWith('/maps/'))
    .filter((r) => !(`${r.method} ${r.path}` in matrixSkips));
}

/** Routes the matrix leaves out, each with the reason. */
export const matrixSkips: Record<string, string> = {
  // Redirects to the sign-in provider's stand-in; covered by google-sign-in.test.ts.
  'GET /api/auth/google': 'redirects to the identity provider',
  'GET /api/auth/google/callback': 'needs the identity provider’s code',
};

function ruleText(route: FoundRoute): string {
  const r = route.rule;
  if (!r) return 'none';
  if ('public' in r) return 'public';
  if ('authenticated' in r) return 'signed in';
  return `${r.roles.join(', ')}${r.org ? ` in ${r.org}` : ''}`;
}

/** Signs in every demo role once (the clients keep their sessions for the whole matrix). */
export async function matrixClients(app: Express): Promise<Record<MatrixRole, Client>> {
  const clients = {} as Record<MatrixRole, Client>;
  clients['signed out'] = await anonymousClient(app);
  for (const role of matrixRoles) {
    if (role === 'signed out') continue;
    clients[role] = await signedInClient(app, demoAccounts[role], demoPassword);
  }
  return clients;
}

/** Routes with a JSON body in their contract, as `METHOD /express/:path`, read from the OpenAPI document. */
export function bodyRoutes(openapi: {
  paths: Record<string, Record<string, { requestBody?: { content?: Record<string, unknown> } }>>;
}): Set<string> {
  const found = new Set<string>();
  for (const [path, ops] of Object.entries(openapi.paths)) {
    for (const [method, op] of Object.entries(ops)) {
      if (op.requestBody?.content?.['application/json']) {
        found.add(`${method.toUpperCase()} ${path.replace(/\{([A-Za-z0-9_]+)\}/g, ':$1')}`);
      }
    }
  }
  return found;
}

/**
 * Sends every route once per role and side. Writes carry the CSRF token; a route with a body
 * contract gets `[]`, which no object contract accepts, so a person who passes the access and
 * scope checks gets a validation message and nothing is written, while a stranger must be
 * refused before that. Sign-out is sent by a throwaway session so each role's own stays.
 */
export async function runMatrix(
  app: Express,
  fixture: MatrixFixture,
  withBody: Set<string>,
  pending: ReadonlySet<string> = new Set(),
): Promise<MatrixRow[]> {
  const clients = await matrixClients(app);
  const routes = matrixRouteKeys(app)
    .filter((r) => !pending.has(`${r.method} ${r.path}`))
    // Deletions last, so the rows they remove are still there for the other routes.
    .sort(
      (a, b) =>
        Number(a.method === 'DELETE') - Number(b.method === 'DELETE') ||
        a.path.localeCompare(b.path) ||
        a.method.localeCompare(b.method),
    );
  const rows: MatrixRow[] = [];
  for (const route of routes) {
    const key = `${route.method} ${route.path}`;
    const body = withBody.has(key);
    const cells = {} as Record<MatrixRole, MatrixCell>;
    for (const role of matrixRoles) {
      const send = async (path: string) => {
        const client =
          route.path !== '/api/auth/logout'
            ? clients[role]
            : role === 'signed out'
              ? await anonymousClient(app)
              : await signedInClient(app, demoAccounts[role], demoPassword);
        const method = route.method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
        let req = client.agent[method](path);
        if (method !== 'get') req = req.set('X-XSRF-TOKEN', client.csrf);
        if (body) req = req.set('Content-Type', 'application/json').send('[]');
        const res = await req;
        return res.status;
      };
      const cell: MatrixCell = {
        own: await send(fillPath(route.path, fixture.own[role], fixture.outbox)),
      };
      if (namesResource(route.path)) {
        cell.other = await send(fillPath(route.path, fixture.other[role], fixture.outbox));
      }
      cells[role] = cell;
    }
    rows.push({ method: route.method, path: route.path, rule: ruleText(route), body, cells });
  }
  return rows;
}

const roleHeadings: Record<MatrixRole, string> = {
  'signed out': 'signed out',
  admin: 'admin',
  buyer: 'buyer',
  clinician: 'clinician',
  fleet_manager: 'fleet manager',
  coordinator: 'coordinator',
  proctor: 'proctor',
};

/** The matrix as the Markdown page `docs/security/access-matrix.md`. */
export function renderMatrix(rows: MatrixRow[]): string {
  const lines = [
    '# Access matrix',
    '',
    'Generated by `npm run security:access-matrix` (the test `server/test/access-matrix.test.ts`',
    'fails when this page is not current). Do not edit by hand.',
    '',
    'Every API route, called by each demo role (and by nobody) on the demo data, once with ids of',
    'the caller’s own organisation and once with ids of another organisation (`own / other`; a',
    'single value when the path names no resource). Routes with a body contract are sent the body',
    '`[]`, which no contract accepts: a caller who passes the access and scope checks gets `422`',
    '(a validation message) and nothing is written, while a caller who may not act must get',
    '`401`, `403` or `404` first. Bodiless writes really run for their own ids, in the order of',
    'this table, on a throwaway database.',
    '',
    'Own and other: hospital people and the admin act for the US hospital network (other = the',
    'German hospital); lender people for the lender of the demo (other = a second lender the test',
    'adds); the proctor for their own visits and credentials (other = a visit they were not',
    'offered, another proctor’s credential). Catalogue ids (models, units, photos) are the demo',
    'lender’s (other = the second lender’s).',
    '',
    'Skipped: ' +
      Object.entries(matrixSkips)
        .map(([k, why]) => `\`${k}\` (${why})`)
        .join(', ') +
      '.',
    '',
    `| route | rule | ${matrixRoles.map((r) => roleHeadings[r]).join(' | ')} |`,
    `| --- | --- | ${matrixRoles.map(() => '---').join(' | ')} |`,
  ];
  for (const row of rows) {
    const cells = matrixRoles.map((role) => {
      const c = row.cells[role];
      return c.other === undefined ? String(c.own) : `${c.own} / ${c.other}`;
    });
    lines.push(
      `| \`${row.method} ${row.path}\`${row.body ? ' (body)' : ''} | ${row.rule} | ${cells.join(' | ')} |`,
    );
  }
  const requests = rows.reduce(
    (n, r) =>
      n + matrixRoles.reduce((m, role) => m + (r.cells[role].other === undefined ? 1 : 2), 0),
    0,
  );
  lines.push(
    '',
    `${rows.length} routes × ${matrixRoles.length} callers: ${requests} requests.`,
    '',
  );
  return lines.join('\n');
}
