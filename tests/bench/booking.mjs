// `npm run bench:booking`: booking throughput and the double-booking guard, against the built
// server on a dedicated database.
// 1. Bookings of distinct units (16 connections): bookings per second (target ≥ 200/s).
// 2. 100 simultaneous requests for ONE unit with overlapping dates: created / 409 / 5xx counts
//    (expected exactly 1 / 99 / 0).
// 3. The same with two server processes on one database (requests alternate between them).
import autocannon from 'autocannon';
import {
  addDays,
  benchPassword,
  freePort,
  loadFleet,
  mondayAfter,
  prepareDatabase,
  say,
  signIn,
  startServer,
} from './lib.mjs';

const DISTINCT_BOOKINGS = Number(process.env.BENCH_BOOKINGS ?? 3_000);
const SAME_UNIT_REQUESTS = 100;

/** Fires `count` booking requests for one unit at once, spread over `servers`. */
async function stampede(servers, sessions, campusId, unitId, useFrom) {
  const requests = Array.from({ length: SAME_UNIT_REQUESTS }, (_, i) => {
    const server = servers[i % servers.length];
    const session = sessions[i % sessions.length];
    // Overlapping windows: each starts 0–4 days after the first and lasts three days.
    const from = addDays(useFrom, i % 5);
    return fetch(`${server.url}/api/loans`, {
      method: 'POST',
      headers: {
        'content-type': 'application/json',
        cookie: session.cookie,
        'x-xsrf-token': session.csrf,
      },
      body: JSON.stringify({
        siteId: campusId,
        unitIds: [unitId],
        useFrom: from,
        useTo: addDays(from, 2),
      }),
    }).then(async (res) => ({ status: res.status, body: await res.text() }));
  });
  const results = await Promise.all(requests);
  const created = results.filter((r) => r.status === 201).length;
  const conflicts = results.filter((r) => r.status === 409).length;
  const failures = results.filter((r) => r.status >= 500);
  const other = results.filter((r) => r.status !== 201 && r.status !== 409 && r.status < 500);
  return { created, conflicts, failures, other };
}

function report(label, outcome) {
  say(
    `${label}: ${outcome.created} created, ${outcome.conflicts} × 409, ${outcome.failures.length} × 5xx` +
      (outcome.other.length ? `, ${outcome.other.length} other (${outcome.other[0].status})` : '') +
      ` → ${outcome.created === 1 && outcome.conflicts === SAME_UNIT_REQUESTS - 1 && outcome.failures.length === 0 ? 'as expected' : 'NOT as expected'}`,
  );
  if (outcome.failures.length) say(`first 5xx body: ${outcome.failures[0].body.slice(0, 300)}`);
}

async function main() {
  const db = await prepareDatabase();
  const fleet = await loadFleet(db, {
    lenders: 4,
    depotsPerLender: 5,
    modelsPerLender: 10,
    units: DISTINCT_BOOKINGS + 10,
    hospitals: 5,
  });
  say(
    `loaded ${fleet.units.length} units of ${fleet.lenderIds.length} lenders (20 depots), no loans yet`,
  );

  const port = await freePort();
  const first = await startServer(port);
  let second;
  try {
    const session = await signIn(first.url, fleet.buyer.email, benchPassword);
    const useFrom = mondayAfter(60);
    const body = (unitId) =>
      JSON.stringify({
        siteId: fleet.buyer.campusId,
        unitIds: [unitId],
        useFrom,
        useTo: addDays(useFrom, 2),
      });

    // Warm-up on a few units not used below.
    const spare = fleet.units.slice(DISTINCT_BOOKINGS);
    for (const unit of spare.slice(0, 5)) {
      await fetch(`${first.url}/api/loans`, {
        method: 'POST',
        headers: {
          'content-type': 'application/json',
          cookie: session.cookie,
          'x-xsrf-token': session.csrf,
        },
        body: body(unit.id),
      });
    }

    // 1. Distinct units.
    let next = 0;
    const started = Date.now();
    const result = await autocannon({
      url: `${first.url}/api/loans`,
      connections: 16,
      amount: DISTINCT_BOOKINGS,
      method: 'POST',
      headers: {
        'content-type': 'application/json',
        cookie: session.cookie,
        'x-xsrf-token': session.csrf,
      },
      requests: [
        {
          setupRequest: (req) => ({
            ...req,
            body: body(fleet.units[next++ % DISTINCT_BOOKINGS].id),
          }),
        },
      ],
    });
    const seconds = (Date.now() - started) / 1000;
    const [[booked]] = await db.query("SELECT COUNT(*) AS n FROM loans WHERE state = 'requested'");
    const created = result['2xx'];
    say(
      `distinct units: ${created} bookings created of ${DISTINCT_BOOKINGS} sent in ${seconds.toFixed(1)} s → ` +
        `${(created / seconds).toFixed(0)} bookings/s (target ≥ 200/s: ${created / seconds >= 200 ? 'met' : 'NOT met'}); ` +
        `latency p50 ${result.latency.p50} ms, p97.5 ${result.latency.p97_5} ms, p99 ${result.latency.p99} ms; ` +
        `non-2xx ${result.non2xx}, errors ${result.errors}; loans in the database: ${booked.n - 5}`,
    );

    // 2. One unit, 100 simultaneous requests, one server.
    const targetA = spare[5].id;
    const one = await stampede(
      [first],
      [session],
      fleet.buyer.campusId,
      targetA,
      addDays(useFrom, 14),
    );
    report('one unit, 100 simultaneous requests, one server', one);
    const [[holdsA]] = await db.query('SELECT COUNT(*) AS n FROM holds WHERE unit_id = ?', [
      targetA,
    ]);
    say(`  holds of that unit in the database: ${holdsA.n}`);

    // 3. Two server processes on one database.
    second = await startServer(await freePort());
    const targetB = spare[6].id;
    const two = await stampede(
      [first, second],
      [session],
      fleet.buyer.campusId,
      targetB,
      addDays(useFrom, 14),
    );
    report('one unit, 100 simultaneous requests, two servers', two);
    const [[holdsB]] = await db.query('SELECT COUNT(*) AS n FROM holds WHERE unit_id = ?', [
      targetB,
    ]);
    say(`  holds of that unit in the database: ${holdsB.n}`);
  } finally {
    await db.end();
    await first.stop();
    await second?.stop();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
