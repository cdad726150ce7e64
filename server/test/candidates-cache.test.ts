import fc from 'fast-check';
import { addCalendarDays } from '@evalon/scheduling';
import { visitSettingsFromConfig } from '../src/visits';
import { matchVisit } from '../src/visits/domain/matching';
import { findCampus, findModelSettings } from '../src/visits/data-access/visit-repository';
import { startTestApp, type TestApp } from './helpers/app';
import { makeHospital, makeLender, makeModel, mondayAfter, places } from './helpers/catalog';
import { signedInClient, type Client } from './helpers/http';
import { homes, makeProctor, setSubdivision } from './helpers/proctors';

// The candidates route serves a cached, serialised ranking and lets concurrent first searches
// share one computation. Whatever it serves must equal the plain computation: the matching
// package's ranking of every proctor, read afresh from the database.
let t: TestApp;
let buyer: Client;
let campusId: number;
let modelId: number;
let from: string;
let to: string;

beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
  const lender = await makeLender(t.dataSource, places.eastDepot);
  const hospital = await makeHospital(t.dataSource, places.bostonCampus);
  await setSubdivision(t.dataSource, hospital.campusId, 'US-MA');
  campusId = hospital.campusId;
  modelId = await makeModel(t.dataSource, lender.id);
  from = mondayAfter(90);
  to = addCalendarDays(from, 1);
  buyer = await signedInClient(t.app, hospital.buyer.email, hospital.buyer.password);
});
afterAll(() => t.close());

/** The plain computation, as the route's items. */
async function plainRanking() {
  const m = t.dataSource.manager;
  const campus = (await findCampus(m, campusId))!;
  const model = (await findModelSettings(m, modelId))!;
  const matches = await matchVisit(
    m,
    {
      campus,
      modelId,
      minSupervisedCases: model.minSupervisedCases,
      from,
      to,
      cases: 1,
      language: null,
    },
    visitSettingsFromConfig(t.config),
    new Date(),
  );
  return matches.map((x) => ({
    proctorId: Number(x.proctorId),
    name: x.name,
    eligible: x.eligible,
    score: x.score,
    reasons: x.reasons,
    exclusions: x.exclusions,
    distanceKm: x.distanceKm,
    travelDays: x.travelDays,
    feeEstimate: x.feeEstimate,
  }));
}

const url = () =>
  `/api/visits/candidates?siteId=${campusId}&modelId=${modelId}&from=${from}&to=${to}`;

const proctorOptions = fc.record({
  home: fc.constantFrom(homes.nearBoston, homes.chicago, homes.munich),
  radiusKm: fc.constantFrom(50, 500, 3000),
  cases: fc.integer({ min: 0, max: 60 }),
  jurisdiction: fc.constantFrom('US-MA', 'US-IL', 'US-NY'),
  languages: fc.constantFrom(['en-US'], ['es'], ['en-US', 'de']),
});

describe('candidates served from the cache', () => {
  it('concurrent first searches get one identical answer, equal to the plain ranking', async () => {
    await makeProctor(t.dataSource, { experience: { [modelId]: 40 } });
    await makeProctor(t.dataSource, { home: homes.chicago, experience: { [modelId]: 25 } });
    const answers = await Promise.all(
      Array.from({ length: 6 }, () => buyer.agent.get(url()).expect(200)),
    );
    expect(new Set(answers.map((a) => a.text)).size).toBe(1);
    expect(answers[0]!.headers['content-type']).toMatch(/^application\/json/);
    expect(answers[0]!.body.items).toEqual(await plainRanking());
  });

  it('after random new proctors the served list equals the plain ranking (fast-check)', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(proctorOptions, { minLength: 1, maxLength: 3 }), async (list) => {
        // Served before the change, so a stale cache entry exists for this exact search.
        await buyer.agent.get(url()).expect(200);
        for (const o of list) {
          await makeProctor(t.dataSource, {
            home: o.home,
            radiusKm: o.radiusKm,
            languages: [...o.languages],
            experience: { [modelId]: o.cases },
            licences: [
              { jurisdiction: o.jurisdiction, validFrom: '2020-01-01', validTo: '2035-12-31' },
            ],
          });
        }
        const served = await buyer.agent.get(url()).expect(200);
        expect(served.body.items).toEqual(await plainRanking());
      }),
      { numRuns: 8 },
    );
  }, 120_000);
});
