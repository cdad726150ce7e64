import fc from 'fast-check';
import { roles, type Role } from '@evalon/contracts';
import { loadSessionUser, sessionUserLoader, toAuthContext } from '../src/identity';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson, unique } from './helpers/factories';

// The fast path (a per-process cache checked against users.auth_version) must answer exactly
// what the plain computation (loading the person and memberships afresh) answers, after any
// sequence of changes made behind its back. Two loaders stand for two server processes; the
// version is handed over the way the session store reads it (with the session row) or not at
// all (the loader reads it itself).
let t: TestApp;
let orgs: { id: number; name: string }[];

beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
  orgs = [
    await makeOrganisation(t.dataSource, 'hospital'),
    await makeOrganisation(t.dataSource, 'lender'),
  ];
});
afterAll(() => t.close());

type Op =
  | { kind: 'setRole'; role: Role }
  | { kind: 'addMembership'; org: number; role: Role }
  | { kind: 'removeMembership' }
  | { kind: 'setActive'; active: boolean }
  | { kind: 'renameUser' }
  | { kind: 'setTimeZone'; zone: string | null }
  | { kind: 'renameOrganisation'; org: number }
  | { kind: 'signedIn' }
  | { kind: 'nothing' };

const role = fc.constantFrom(...roles);
const op: fc.Arbitrary<Op> = fc.oneof(
  fc.record({ kind: fc.constant('setRole' as const), role }),
  fc.record({
    kind: fc.constant('addMembership' as const),
    org: fc.integer({ min: 0, max: 1 }),
    role,
  }),
  fc.constant({ kind: 'removeMembership' as const }),
  fc.record({ kind: fc.constant('setActive' as const), active: fc.boolean() }),
  fc.constant({ kind: 'renameUser' as const }),
  fc.record({
    kind: fc.constant('setTimeZone' as const),
    zone: fc.constantFrom(null, 'Europe/Berlin', 'America/Chicago'),
  }),
  fc.record({
    kind: fc.constant('renameOrganisation' as const),
    org: fc.integer({ min: 0, max: 1 }),
  }),
  fc.constant({ kind: 'signedIn' as const }),
  fc.constant({ kind: 'nothing' as const }),
);

async function apply(userId: number, o: Op): Promise<void> {
  const q = (sql: string, args: unknown[]) => t.dataSource.query(sql, args);
  switch (o.kind) {
    case 'setRole':
      // One of the person's memberships (if any) takes the role, unless it would duplicate one.
      await q(`UPDATE IGNORE memberships SET role = ? WHERE user_id = ? ORDER BY id LIMIT 1`, [
        o.role,
        userId,
      ]);
      return;
    case 'addMembership':
      await q(
        'INSERT IGNORE INTO memberships (user_id, organisation_id, role, created_at) VALUES (?, ?, ?, NOW(3))',
        [userId, orgs[o.org]!.id, o.role],
      );
      return;
    case 'removeMembership':
      await q('DELETE FROM memberships WHERE user_id = ? ORDER BY id DESC LIMIT 1', [userId]);
      return;
    case 'setActive':
      await q('UPDATE users SET active = ? WHERE id = ?', [o.active, userId]);
      return;
    case 'renameUser':
      await q('UPDATE users SET name = ? WHERE id = ?', [`Person ${unique()}`, userId]);
      return;
    case 'setTimeZone':
      await q('UPDATE users SET time_zone = ? WHERE id = ?', [o.zone, userId]);
      return;
    case 'renameOrganisation':
      await q('UPDATE organisations SET name = ? WHERE id = ?', [
        `Test org ${unique()}`,
        orgs[o.org]!.id,
      ]);
      return;
    case 'signedIn':
      await q('UPDATE users SET last_sign_in_at = NOW(3) WHERE id = ?', [userId]);
      return;
    case 'nothing':
      return;
  }
}

describe('signed-in person cache against the plain load (fast-check)', () => {
  it('answers what a fresh load answers after any sequence of changes, on two processes', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.tuple(op, fc.boolean(), fc.boolean()), { minLength: 1, maxLength: 12 }),
        async (steps) => {
          const person = await makePerson(t.dataSource, orgs[0]!.id, 'buyer');
          const processA = sessionUserLoader(t.dataSource);
          const processB = sessionUserLoader(t.dataSource);
          for (const [o, readA, versionWithSession] of steps) {
            await apply(person.userId, o);
            // As the session store hands it over (read with the session row), or not at all.
            const [row] = await t.dataSource.query(
              'SELECT auth_version AS v FROM users WHERE id = ?',
              [person.userId],
            );
            const known = versionWithSession ? Number(row.v) : undefined;
            const plain = await loadSessionUser(t.dataSource.manager, person.userId);
            const expected = plain && { auth: toAuthContext(plain.user), active: plain.active };
            const loader = readA ? processA : processB;
            const got = await loader(person.userId, known);
            expect(got && { auth: got.auth, active: got.active }).toEqual(expected);
          }
        },
      ),
      { numRuns: 40 },
    );
  }, 120_000);
});
