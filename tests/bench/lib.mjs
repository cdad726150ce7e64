// Shared pieces of the benchmark scripts (`npm run bench:availability`, `npm run bench:booking`):
// a dedicated database, bulk loading, a built server on a free port, a signed-in session.
// Benchmarks are scripts, not timed tests: they print what one run measured.
import { execFileSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import autocannon from 'autocannon';
import net from 'node:net';
import path from 'node:path';
import { hash } from '@node-rs/argon2';
import mysql from 'mysql2/promise';
import { buildServer } from '../../infra/lib/deps.mjs';
import { dbConfig, startMariadb } from '../../infra/lib/mariadb.mjs';
import { portOpen, root, run } from '../../infra/lib/proc.mjs';

/** The benchmarks' own database (the MariaDB user may create `evalon_test*` databases). */
export const benchDatabase = process.env.EVALON_BENCH_DB_NAME ?? 'evalon_test_bench';
export const benchPassword = 'bench-password-not-secret';

/** Prints a line with the bench tag. */
export function say(msg) {
  process.stdout.write(`[bench] ${msg}\n`);
}

/** Starts MariaDB if needed, builds the server, recreates and migrates the bench database. */
export async function prepareDatabase() {
  // Reuse a MariaDB that already listens (whoever started it); otherwise start ours.
  if (!(await portOpen(dbConfig.port))) await startMariadb();
  say('building the server (esbuild)');
  buildServer();
  const admin = await mysql.createConnection({
    host: dbConfig.host,
    port: dbConfig.port,
    user: dbConfig.user,
    password: dbConfig.password,
  });
  await admin.query(`DROP DATABASE IF EXISTS \`${benchDatabase}\``);
  await admin.query(
    `CREATE DATABASE \`${benchDatabase}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
  );
  await admin.end();
  run(process.execPath, [path.join(root, 'server/dist/migrate.js')], {
    env: { ...process.env, EVALON_DB_NAME: benchDatabase },
    stdio: 'ignore',
  });
  return mysql.createConnection({
    host: dbConfig.host,
    port: dbConfig.port,
    user: dbConfig.user,
    password: dbConfig.password,
    database: benchDatabase,
    timezone: 'Z',
  });
}

/** Inserts rows in batches of `batch` with multi-row INSERTs. Returns the first insert id. */
export async function bulkInsert(db, table, columns, rows, batch = 2_000) {
  let firstId = null;
  for (let i = 0; i < rows.length; i += batch) {
    const [result] = await db.query(`INSERT INTO ${table} (${columns.join(', ')}) VALUES ?`, [
      rows.slice(i, i + batch),
    ]);
    firstId ??= result.insertId;
  }
  return firstId;
}

/** A calendar date `days` after `date` (YYYY-MM-DD, UTC arithmetic). */
export function addDays(date, days) {
  const d = new Date(`${date}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/** The first Monday at least `days` days from today (UTC). */
export function mondayAfter(days) {
  let d = addDays(new Date().toISOString().slice(0, 10), days);
  while (new Date(`${d}T00:00:00Z`).getUTCDay() !== 1) d = addDays(d, 1);
  return d;
}

/** A small deterministic pseudo-random generator (mulberry32), so every run loads the same data. */
export function random(seed = 20_270_315) {
  let a = seed;
  return () => {
    a |= 0;
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4_294_967_296;
  };
}

const categories = [
  'robotic_platform',
  'flexible_endoscope',
  'laser',
  'imaging',
  'fluid_management',
  'accessory',
];

/**
 * Loads lenders with depots, models and units, hospitals with campuses, and one signed-in-able
 * buyer. Coordinates are spread over the continental US (invented places).
 * @returns ids the benchmarks need.
 */
export async function loadFleet(
  db,
  { lenders, depotsPerLender, modelsPerLender, units, hospitals },
) {
  const now = new Date();
  const rnd = random();
  const orgRows = [];
  for (let l = 0; l < lenders; l++) orgRows.push([`Bench lender ${l + 1}`, 'lender', 'US', now]);
  for (let h = 0; h < hospitals; h++)
    orgRows.push([`Bench hospital ${h + 1}`, 'hospital', 'US', now]);
  const firstOrg = await bulkInsert(
    db,
    'organisations',
    ['name', 'kind', 'country', 'created_at'],
    orgRows,
  );
  const lenderIds = Array.from({ length: lenders }, (_, i) => firstOrg + i);
  const hospitalIds = Array.from({ length: hospitals }, (_, i) => firstOrg + lenders + i);

  const place = () => [
    (30 + rnd() * 17).toFixed(6), // 30°N..47°N
    (-122 + rnd() * 50).toFixed(6), // 122°W..72°W
  ];
  const zones = ['America/New_York', 'America/Chicago', 'America/Denver', 'America/Los_Angeles'];
  const siteColumns = [
    'organisation_id',
    'kind',
    'name',
    'address_line',
    'city',
    'country',
    'latitude',
    'longitude',
    'time_zone',
    'cutoff_time',
    'created_at',
  ];
  const depotRows = [];
  for (const lenderId of lenderIds) {
    for (let d = 0; d < depotsPerLender; d++) {
      const [lat, lng] = place();
      depotRows.push([
        lenderId,
        'depot',
        `Depot ${lenderId}-${d + 1}`,
        '1 Freight Way',
        'Benchville',
        'US',
        lat,
        lng,
        zones[d % 4],
        '15:00',
        now,
      ]);
    }
  }
  const firstDepot = await bulkInsert(db, 'sites', siteColumns, depotRows);
  const depotsOf = (l) =>
    Array.from({ length: depotsPerLender }, (_, d) => firstDepot + l * depotsPerLender + d);
  const campusRows = hospitalIds.map((id) => {
    const [lat, lng] = place();
    return [
      id,
      'campus',
      `Campus ${id}`,
      '1 Hospital Road',
      'Benchville',
      'US',
      lat,
      lng,
      'America/New_York',
      null,
      now,
    ];
  });
  const firstCampus = await bulkInsert(db, 'sites', siteColumns, campusRows);

  const modelRows = [];
  for (let l = 0; l < lenders; l++) {
    for (let m = 0; m < modelsPerLender; m++) {
      modelRows.push([
        lenderIds[l],
        `Bench model ${l + 1}-${m + 1}`,
        categories[m % categories.length],
        'Invented bench model.',
        5_000_000 + m * 100_000,
        'USD',
        1_000,
        100_000,
        5_000_000,
        now,
        now,
      ]);
    }
  }
  const firstModel = await bulkInsert(
    db,
    'models',
    [
      'lender_id',
      'name',
      'category',
      'description',
      'list_value',
      'currency',
      'deposit_percent_bps',
      'deposit_min',
      'deposit_max',
      'created_at',
      'updated_at',
    ],
    modelRows,
  );
  const modelCount = lenders * modelsPerLender;
  const unitRows = [];
  for (let u = 0; u < units; u++) {
    const model = u % modelCount;
    const lender = Math.floor(model / modelsPerLender);
    const depots = depotsOf(lender);
    unitRows.push([
      firstModel + model,
      `BN-${String(u + 1).padStart(6, '0')}`,
      depots[u % depots.length],
      'active',
      now,
      now,
    ]);
  }
  const firstUnit = await bulkInsert(
    db,
    'units',
    ['model_id', 'serial_number', 'home_depot_id', 'status', 'created_at', 'updated_at'],
    unitRows,
  );
  const unitList = unitRows.map((row, i) => ({
    id: firstUnit + i,
    modelId: row[0],
    depotId: row[2],
  }));

  const email = `bench.buyer.${Date.now()}@bench.example`;
  const passwordHash = await hash(benchPassword, { algorithm: 2, memoryCost: 19_456, timeCost: 2 });
  const [user] = await db.query(
    'INSERT INTO users (email, name, password_hash, active, created_at, updated_at) VALUES (?, ?, ?, 1, ?, ?)',
    [email, 'Bench Buyer', passwordHash, now, now],
  );
  await db.query(
    "INSERT INTO memberships (user_id, organisation_id, role, created_at) VALUES (?, ?, 'buyer', ?)",
    [user.insertId, hospitalIds[0], now],
  );
  return {
    lenderIds,
    hospitalIds,
    campusOf: (hospitalIndex) => firstCampus + hospitalIndex,
    firstModel,
    modelCount,
    units: unitList,
    buyer: { email, userId: user.insertId, hospitalId: hospitalIds[0], campusId: firstCampus },
  };
}

/** A TCP port that was free a moment ago. */
export function freePort() {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address();
      server.close(() => resolve(port));
    });
  });
}

/**
 * Starts the built server (server/dist/main.js) on the bench database and waits for it to
 * listen. Request logging is at `warn`, the outbox worker is off, so the numbers measure the
 * API and the database.
 */
export async function startServer(port, extraEnv = {}) {
  // BENCH_NODE_ARGS (e.g. `--cpu-prof --cpu-prof-dir=/tmp/prof`) lets a run be profiled.
  const nodeArgs = (process.env.BENCH_NODE_ARGS ?? '').split(' ').filter(Boolean);
  const child = spawn(process.execPath, [...nodeArgs, path.join(root, 'server/dist/main.js')], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'production',
      EVALON_SESSION_SECRET: 'bench-session-secret-0123456789',
      EVALON_DB_NAME: benchDatabase,
      EVALON_PORT: String(port),
      EVALON_PUBLIC_URL: `http://127.0.0.1:${port}`,
      EVALON_LOG_LEVEL: 'warn',
      EVALON_OUTBOX_WORKER: 'off',
      EVALON_DB_POOL_SIZE: '20',
      ...extraEnv,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  child.stdout.on('data', (c) => (output += c));
  child.stderr.on('data', (c) => (output += c));
  const until = Date.now() + 30_000;
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`server exited:\n${output}`);
    try {
      const res = await fetch(`http://127.0.0.1:${port}/api/health`);
      if (res.ok) break;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  return {
    url: `http://127.0.0.1:${port}`,
    pid: child.pid,
    output: () => output,
    stop: () =>
      new Promise((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGINT');
        setTimeout(() => child.kill('SIGKILL'), 5_000).unref();
      }),
  };
}

/** Signs in over HTTP; returns the Cookie header and the CSRF token for changing requests. */
export async function signIn(baseUrl, email, password) {
  const jar = new Map();
  const keep = (res) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const [name, ...value] = pair.split('=');
      jar.set(name, value.join('='));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const csrfRes = await fetch(`${baseUrl}/api/auth/csrf`);
  keep(csrfRes);
  const { csrfToken } = await csrfRes.json();
  const login = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', cookie: cookie(), 'x-xsrf-token': csrfToken },
    body: JSON.stringify({ email, password }),
  });
  keep(login);
  if (login.status !== 200)
    throw new Error(`sign-in failed: ${login.status} ${await login.text()}`);
  return { cookie: cookie(), csrf: decodeURIComponent(jar.get('XSRF-TOKEN') ?? csrfToken) };
}

/** Milliseconds with one decimal. */
export const ms = (n) => `${Number(n).toFixed(1)} ms`;

/** Columns of a bulk `loans` insert, in the order the benches give their rows. */
export const loanColumns = [
  'reference',
  'state',
  'hospital_id',
  'site_id',
  'site_time_zone',
  'lender_id',
  'use_from',
  'use_to',
  'ship_by',
  'deliver_by',
  'return_ship_by',
  'back_at_depot',
  'ready_again',
  'deposit_amount',
  'deposit_currency',
  'requested_by_user_id',
  'created_at',
  'updated_at',
];

/** The latency and throughput figures of one autocannon run. */
export function summarise(name, result) {
  return {
    name,
    p50: result.latency.p50,
    p97_5: result.latency.p97_5,
    p99: result.latency.p99,
    rps: result.requests.average,
    total: result.requests.total,
    non2xx: result.non2xx,
    errors: result.errors,
  };
}

let clockTicks;
/** CPU seconds (user + system) a process has used so far, from /proc (Linux). */
function cpuSecondsOf(pid) {
  clockTicks ??= Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim());
  // Fields after the command name (which may hold spaces): utime and stime are 14th and 15th.
  const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return (Number(fields[11]) + Number(fields[12])) / clockTicks;
}

/** The pid of the MariaDB serving the benches (ours, from its pid file), or null. */
export function mariadbPid() {
  const file = process.env.BENCH_DB_PID_FILE ?? path.join(root, '.data/mariadb/mariadbd.pid');
  try {
    return Number(fs.readFileSync(file, 'utf8').trim());
  } catch {
    return null;
  }
}

/**
 * A CPU meter over the server and MariaDB processes. On a shared machine requests per second
 * swing with what else runs; the CPU time each request costs our two processes swings much
 * less, so the benches print it beside the rates (a ratio of costs reads like a ratio of rates
 * on a quiet machine).
 */
export function cpuMeter(serverPid) {
  const dbPid = mariadbPid();
  const read = () => ({
    node: cpuSecondsOf(serverPid),
    db: dbPid ? cpuSecondsOf(dbPid) : 0,
  });
  const start = read();
  return {
    /** CPU milliseconds per request since the meter started, for `requests` requests. */
    perRequest(requests) {
      const end = read();
      const node = ((end.node - start.node) * 1000) / requests;
      const db = ((end.db - start.db) * 1000) / requests;
      return { node, db, total: node + db };
    },
  };
}

/**
 * Runs autocannon against one route of a running server: `connections` for `duration` seconds,
 * after a short warm-up (JIT, connection pool, caches) when `warmUp` is set. With `serverPid`,
 * also the CPU time per request of the server and MariaDB (see {@link cpuMeter}).
 */
export async function loadRoute(
  baseUrl,
  name,
  route,
  { headers = {}, connections = 16, duration = 20, warmUp = false, serverPid } = {},
) {
  if (warmUp) await autocannon({ url: baseUrl + route, connections: 4, duration: 2, headers });
  const meter = serverPid ? cpuMeter(serverPid) : null;
  const result = await autocannon({ url: baseUrl + route, connections, duration, headers });
  const summary = summarise(name, result);
  if (meter) summary.cpu = meter.perRequest(result.requests.total);
  return summary;
}

/** One printed line per route: latency percentiles, requests per second, failures. */
export function reportLine(r, width = 22) {
  return (
    `${r.name.padEnd(width)} p50 ${ms(r.p50)}  p97.5 ${ms(r.p97_5)}  p99 ${ms(r.p99)}  ` +
    `${r.rps.toFixed(0)} req/s  (${r.total} requests, ${r.non2xx} non-2xx, ${r.errors} errors)` +
    (r.cpu
      ? `  CPU ${r.cpu.total.toFixed(2)} ms/req (node ${r.cpu.node.toFixed(2)} + MariaDB ${r.cpu.db.toFixed(2)})`
      : '')
  );
}
