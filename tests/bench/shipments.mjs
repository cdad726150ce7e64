// `npm run bench:shipments`: the coordinator's board and the scan rate, against the built server
// on a dedicated database.
// 1. 5,000 open shipments of one lender; the board's first page with filters and sort at 16
//    connections: p97.5 latency (target ≤ 50 ms).
// 2. Scans on one server process (16 connections, each on its own shipment): scans per second
//    (target ≥ 300/s).
import autocannon from 'autocannon';
import { hash } from '@node-rs/argon2';
import { gs1CheckDigit } from '@evalon/gs1';
import {
  addDays,
  benchPassword,
  bulkInsert,
  freePort,
  loadFleet,
  cpuMeter,
  loanColumns,
  mondayAfter,
  ms,
  prepareDatabase,
  say,
  signIn,
  startServer,
} from './lib.mjs';

const SHIPMENTS = Number(process.env.BENCH_SHIPMENTS ?? 5_000);
const SCAN_SECONDS = Number(process.env.BENCH_SCAN_SECONDS ?? 10);

/** A GTIN-14 with its GS1 check digit (computed by @evalon/gs1). */
const gtin = (body13) => body13 + gs1CheckDigit(body13);

async function main() {
  const db = await prepareDatabase();
  say('loading a fleet and the shipments');
  const fleet = await loadFleet(db, {
    lenders: 1,
    depotsPerLender: 3,
    modelsPerLender: 5,
    units: 200,
    hospitals: 20,
  });
  const now = new Date();
  const lenderId = fleet.lenderIds[0];
  const [depots] = await db.query(
    "SELECT id FROM sites WHERE organisation_id = ? AND kind = 'depot'",
    [lenderId],
  );
  const loanRows = [];
  const base = mondayAfter(30);
  for (let i = 0; i < SHIPMENTS; i++) {
    const h = i % fleet.hospitalIds.length;
    const ship = addDays(base, i % 120);
    loanRows.push([
      `EV-BENCH-${String(i).padStart(6, '0')}`,
      'confirmed',
      fleet.hospitalIds[h],
      fleet.campusOf(h),
      'America/New_York',
      lenderId,
      addDays(ship, 3),
      addDays(ship, 5),
      ship,
      addDays(ship, 2),
      addDays(ship, 6),
      addDays(ship, 8),
      addDays(ship, 10),
      100_000,
      'USD',
      fleet.buyer.userId,
      now,
      now,
    ]);
  }
  const firstLoan = await bulkInsert(db, 'loans', loanColumns, loanRows);
  const states = ['to_pack', 'packed', 'handed_over', 'in_transit'];
  const shipmentRows = loanRows.map((l, i) => [
    `${l[0]}-O1`,
    firstLoan + i,
    lenderId,
    l[2],
    'outbound',
    depots[i % depots.length].id,
    l[3],
    states[i % states.length],
    l[8],
    l[9],
    'America/New_York',
    new Date(`${l[9]}T05:00:00Z`),
    'US',
    'US',
    2,
    l[9],
    i % 17 === 0,
    now,
    now,
  ]);
  const firstShipment = await bulkInsert(
    db,
    'shipments',
    [
      'reference',
      'loan_id',
      'lender_id',
      'hospital_id',
      'direction',
      'depot_id',
      'site_id',
      'state',
      'ship_by',
      'due_by',
      'due_zone',
      'overdue_at',
      'origin_country',
      'destination_country',
      'transit_days',
      'eta',
      'at_risk',
      'created_at',
      'updated_at',
    ],
    shipmentRows,
  );
  const fibre = gtin('0290471199001');
  const itemRows = [];
  for (let i = 0; i < SHIPMENTS; i++) {
    // A line with a large quantity, so the scan phase never completes it.
    itemRows.push([firstShipment + i, 1, null, 'Bench fibre', fibre, 60_000, 1, 0, 1, 1]);
    itemRows.push([
      firstShipment + i,
      2,
      null,
      'Bench cable',
      gtin('0290471199002'),
      1,
      1,
      0,
      1,
      1,
    ]);
  }
  await bulkInsert(
    db,
    'shipment_items',
    [
      'shipment_id',
      'position',
      'unit_id',
      'name',
      'gtin',
      'quantity',
      'needs_lot',
      'needs_serial',
      'needs_expiry',
      'required',
    ],
    itemRows,
  );
  const email = `bench.coordinator.${Date.now()}@bench.example`;
  const passwordHash = await hash(benchPassword, { algorithm: 2, memoryCost: 19_456, timeCost: 2 });
  const [user] = await db.query(
    'INSERT INTO users (email, name, password_hash, active, created_at, updated_at) VALUES (?, ?, ?, 1, ?, ?)',
    [email, 'Bench Coordinator', passwordHash, now, now],
  );
  await db.query(
    "INSERT INTO memberships (user_id, organisation_id, role, created_at) VALUES (?, ?, 'coordinator', ?)",
    [user.insertId, lenderId, now],
  );
  await db.end();

  const port = await freePort();
  const server = await startServer(port, { EVALON_SHIPMENT_ALERTS_INTERVAL_MS: '0' });
  try {
    const session = await signIn(server.url, email, benchPassword);
    const headers = { cookie: session.cookie, 'x-xsrf-token': session.csrf };

    say(`board: ${SHIPMENTS} open shipments, first page filtered and sorted, 16 connections, 10 s`);
    let meter = cpuMeter(server.pid);
    const board = await autocannon({
      url: `${server.url}/api/shipments?direction=outbound&state=to_pack&sort=due&page=1&pageSize=25`,
      connections: 16,
      duration: 10,
      headers,
    });
    const okBoard = board['2xx'];
    const boardCpu = meter.perRequest(board.requests.total);
    say(
      `board: ${okBoard} answers 2xx, ${board.non2xx} other; p50 ${ms(board.latency.p50)}, ` +
        `p97.5 ${ms(board.latency.p97_5)} (target ≤ 50 ms), ${board.requests.average.toFixed(0)} req/s; ` +
        `CPU ${boardCpu.total.toFixed(2)} ms/req (node ${boardCpu.node.toFixed(2)} + MariaDB ${boardCpu.db.toFixed(2)})`,
    );

    say(`scans: 16 connections, each on its own shipment, ${SCAN_SECONDS} s, one server process`);
    const expiry = '301231';
    meter = cpuMeter(server.pid);
    const scans = await autocannon({
      url: server.url,
      connections: 16,
      duration: SCAN_SECONDS,
      requests: [
        {
          method: 'POST',
          setupRequest: (req, context) => {
            context.n = (context.n ?? Math.floor(Math.random() * 1e6)) + 1;
            const shipment = firstShipment + 4 * (context.n % 16);
            return {
              ...req,
              path: `/api/shipments/${shipment}/scans`,
              headers: { ...headers, 'content-type': 'application/json' },
              body: JSON.stringify({ raw: `(01)${fibre}(17)${expiry}(10)LOT${context.n}` }),
            };
          },
        },
      ],
    });
    const scanCpu = meter.perRequest(scans.requests.total);
    say(
      `scans: ${scans['2xx']} ticked, ${scans.non2xx} other; ${(scans['2xx'] / SCAN_SECONDS).toFixed(0)} scans/s ` +
        `(target ≥ 300/s); p97.5 ${ms(scans.latency.p97_5)}; ` +
        `CPU ${scanCpu.total.toFixed(2)} ms/scan (node ${scanCpu.node.toFixed(2)} + MariaDB ${scanCpu.db.toFixed(2)})`,
    );
  } finally {
    await server.stop();
  }
}

main().catch((err) => {
  process.stderr.write(`${err.stack ?? err}\n`);
  process.exit(1);
});
