// `npm run bench:availability`: loads 2,000 units over 20 depots and 60,000 loans into a
// dedicated database, starts the built server on a free port and runs autocannon for 20 s each
// against GET /api/health and the availability search (16 connections, signed-in session).
// Prints p50 / p97.5 / p99 latency and requests per second of both and their ratio (and, for
// context, of GET /api/auth/me, the cheapest signed-in request).
// Targets (the issue's): search p97.5 ≤ 50 ms and ≥ 25 % of health's requests per second.
import {
  addDays,
  benchPassword,
  bulkInsert,
  freePort,
  loadFleet,
  loadRoute,
  loanColumns,
  mondayAfter,
  prepareDatabase,
  random,
  reportLine,
  say,
  signIn,
  startServer,
} from './lib.mjs';

const UNITS = 2_000;
const LOANS = 60_000;
const DURATION_S = Number(process.env.BENCH_DURATION_S ?? 20);
const CONNECTIONS = 16;

/**
 * 30 loans per unit laid end to end from two years ago to about a year ahead, so each unit's
 * calendar is busy, some windows fit and others need the earliest-window search. Dates are
 * plausible footprints (ship 6 days before the first case, ready 8 days after the last); the
 * search recomputes footprints itself and only reads these as holds.
 */
function loanRows(fleet, hospitalCount) {
  const rnd = random(7);
  const today = new Date().toISOString().slice(0, 10);
  const now = new Date();
  const loans = [];
  const perUnit = LOANS / UNITS;
  for (const unit of fleet.units) {
    let cursor = addDays(today, -730 + Math.floor(rnd() * 20));
    for (let i = 0; i < perUnit; i++) {
      const useFrom = addDays(cursor, 6);
      const useTo = addDays(useFrom, 1 + Math.floor(rnd() * 4));
      const shipBy = cursor;
      const readyAgain = addDays(useTo, 8);
      const roll = rnd();
      const state =
        roll < 0.05
          ? 'declined'
          : roll < 0.08
            ? 'cancelled'
            : readyAgain < today
              ? 'closed'
              : shipBy <= today
                ? 'delivered'
                : roll < 0.5
                  ? 'requested'
                  : 'approved';
      const hospitalIndex = Math.floor(rnd() * hospitalCount);
      loans.push({ unit, shipBy, useFrom, useTo, readyAgain, state, hospitalIndex, now });
      cursor = addDays(readyAgain, 2 + Math.floor(rnd() * 20));
    }
  }
  return loans;
}

async function loadLoans(db, fleet, hospitalCount) {
  const loans = loanRows(fleet, hospitalCount);
  const firstLoan = await bulkInsert(
    db,
    'loans',
    loanColumns,
    loans.map((l, i) => [
      `EV-B-${String(i + 1).padStart(6, '0')}`,
      l.state,
      fleet.hospitalIds[l.hospitalIndex],
      fleet.campusOf(l.hospitalIndex),
      'America/New_York',
      fleet.lenderIds[
        Math.floor(
          (l.unit.modelId - fleet.firstModel) / (fleet.modelCount / fleet.lenderIds.length),
        )
      ],
      l.useFrom,
      l.useTo,
      l.shipBy,
      addDays(l.useFrom, -3),
      addDays(l.useTo, 1),
      addDays(l.useTo, 5),
      l.readyAgain,
      1_000_000,
      'USD',
      fleet.buyer.userId,
      l.now,
      l.now,
    ]),
  );
  await bulkInsert(
    db,
    'loan_units',
    [
      'loan_id',
      'unit_id',
      'hospital_id',
      'model_id',
      'depot_id',
      'depot_time_zone',
      'ship_by',
      'deliver_by',
      'use_from',
      'use_to',
      'return_ship_by',
      'back_at_depot',
      'ready_again',
      'deposit_amount',
    ],
    loans.map((l, i) => [
      firstLoan + i,
      l.unit.id,
      fleet.hospitalIds[l.hospitalIndex],
      l.unit.modelId,
      l.unit.depotId,
      'America/New_York',
      l.shipBy,
      addDays(l.useFrom, -3),
      l.useFrom,
      l.useTo,
      addDays(l.useTo, 1),
      addDays(l.useTo, 5),
      l.readyAgain,
      1_000_000,
    ]),
  );
  // Holds of loans that still block: not declined or cancelled. One per loan, sequence per unit.
  const sequence = new Map();
  const holds = [];
  loans.forEach((l, i) => {
    if (l.state === 'declined' || l.state === 'cancelled') return;
    const next = (sequence.get(l.unit.id) ?? 0) + 1;
    sequence.set(l.unit.id, next);
    const hospitalId = fleet.hospitalIds[l.hospitalIndex];
    holds.push([l.unit.id, 'loan', l.shipBy, l.readyAgain, firstLoan + i, hospitalId, next, l.now]);
  });
  await bulkInsert(
    db,
    'holds',
    [
      'unit_id',
      'kind',
      'start_date',
      'end_date',
      'loan_id',
      'hospital_id',
      'sequence',
      'created_at',
    ],
    holds,
  );
  await db.query(
    `UPDATE units u JOIN (SELECT unit_id, MAX(sequence) AS v FROM holds GROUP BY unit_id) h
        ON h.unit_id = u.id SET u.booking_version = h.v`,
  );
  await bulkInsert(
    db,
    'loan_events',
    ['loan_id', 'at', 'actor_user_id', 'from_state', 'to_state'],
    loans.map((l, i) => [firstLoan + i, l.now, fleet.buyer.userId, null, 'requested']),
  );
  return { loans: loans.length, holds: holds.length };
}

async function main() {
  const started = Date.now();
  const db = await prepareDatabase();
  const hospitals = 50;
  const fleet = await loadFleet(db, {
    lenders: 4,
    depotsPerLender: 5,
    modelsPerLender: 10,
    units: UNITS,
    hospitals,
  });
  const counts = await loadLoans(db, fleet, hospitals);
  await db.query('ANALYZE TABLE units, holds, loans, loan_units, models, sites');
  const [[depots]] = await db.query("SELECT COUNT(*) AS n FROM sites WHERE kind = 'depot'");
  await db.end();
  say(
    `loaded ${UNITS} units, ${depots.n} depots, ${counts.loans} loans (${counts.holds} holds) ` +
      `in ${((Date.now() - started) / 1000).toFixed(1)} s`,
  );

  const port = await freePort();
  const server = await startServer(port);
  try {
    const session = await signIn(server.url, fleet.buyer.email, benchPassword);
    const useFrom = mondayAfter(35);
    const useTo = addDays(useFrom, 3);
    const searchPath =
      `/api/availability?modelId=${fleet.firstModel}&siteId=${fleet.buyer.campusId}` +
      `&useFrom=${useFrom}&useTo=${useTo}`;
    const probe = await fetch(server.url + searchPath, { headers: { cookie: session.cookie } });
    const body = await probe.json();
    if (probe.status !== 200)
      throw new Error(`search answered ${probe.status}: ${JSON.stringify(body)}`);
    const feasible = body.items.filter((i) => i.feasible).length;
    const withEarliest = body.items.filter((i) => !i.feasible && i.earliestUseFrom).length;
    say(
      `search for one model: ${body.items.length} units, ${feasible} fit, ` +
        `${withEarliest} with an earliest window found (window ${useFrom}..${useTo})`,
    );

    const load = { connections: CONNECTIONS, duration: DURATION_S, serverPid: server.pid };
    const health = await loadRoute(server.url, 'GET /api/health', '/api/health', load);
    // Warm-up first: JIT, connection pool, holiday calendars.
    const search = await loadRoute(server.url, 'GET /api/availability', searchPath, {
      ...load,
      headers: { cookie: session.cookie },
      warmUp: true,
    });
    // For reading the ratio: the cheapest signed-in request (session, person and memberships
    // loaded, session touched), i.e. the floor under any signed-in endpoint.
    const me = await loadRoute(server.url, 'GET /api/auth/me', '/api/auth/me', {
      ...load,
      headers: { cookie: session.cookie },
    });

    for (const r of [health, search, me]) say(reportLine(r));
    const ratio = search.rps / health.rps;
    const meRatio = me.rps / health.rps;
    say(`search req/s ÷ health req/s = ${(ratio * 100).toFixed(1)} %`);
    say(`auth/me req/s ÷ health req/s = ${(meRatio * 100).toFixed(1)} %`);
    say(
      `CPU per request (server + MariaDB): search ${(search.cpu.total / health.cpu.total).toFixed(1)}× ` +
        `health's, auth/me ${(me.cpu.total / health.cpu.total).toFixed(1)}× health's`,
    );
    say(
      `targets: search p97.5 ≤ 50 ms → ${search.p97_5 <= 50 ? 'met' : 'NOT met'}; ` +
        `≥ 25 % of health's req/s → ${ratio >= 0.25 ? 'met' : 'NOT met'}; ` +
        `auth/me ≥ 70 % of health's req/s → ${meRatio >= 0.7 ? 'met' : 'NOT met'}`,
    );
  } finally {
    await server.stop();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
