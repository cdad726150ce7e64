import { invitableRoles } from '@evalon/contracts';
import { toAuthContext } from './auth-context';
import {
  assignableRoles,
  keepsAManager,
  managesOrganisation,
  type ManagingCandidate,
} from './policy';

const person = (
  memberships: {
    organisationId: number;
    role: 'admin' | 'buyer' | 'clinician' | 'fleet_manager' | 'coordinator' | 'proctor';
  }[],
) =>
  toAuthContext({
    id: 1,
    email: 'p@test.example',
    name: 'P',
    memberships: memberships.map((m) => ({
      ...m,
      organisationName: `Org ${m.organisationId}`,
      organisationKind: 'hospital' as const,
    })),
  });

describe('who may hand out which role', () => {
  it('follows the matrix', () => {
    expect(invitableRoles('hospital', ['buyer'], false)).toEqual(['buyer', 'clinician']);
    expect(invitableRoles('hospital', ['clinician'], false)).toEqual([]);
    expect(invitableRoles('lender', ['fleet_manager'], false)).toEqual([
      'fleet_manager',
      'coordinator',
    ]);
    expect(invitableRoles('lender', ['coordinator'], false)).toEqual([]);
    expect(invitableRoles('proctor_practice', ['proctor'], false)).toEqual([]);
    // A buyer role in a lender would be a data error; it still grants nothing there.
    expect(invitableRoles('lender', ['buyer'], false)).toEqual([]);
    expect(invitableRoles('proctor_practice', [], true)).toEqual(['proctor']);
    expect(invitableRoles('platform', [], true)).toEqual(['admin']);
  });

  it('scopes a person’s rights to the organisation they hold the role in', () => {
    const buyer = person([{ organisationId: 10, role: 'buyer' }]);
    expect(assignableRoles(buyer, 10, 'hospital')).toEqual(['buyer', 'clinician']);
    expect(assignableRoles(buyer, 11, 'hospital')).toEqual([]);
    expect(managesOrganisation(buyer, 10)).toBe(true);
    expect(managesOrganisation(buyer, 11)).toBe(false);
    const admin = person([{ organisationId: 1, role: 'admin' }]);
    expect(managesOrganisation(admin, 11)).toBe(true);
    expect(assignableRoles(admin, 11, 'lender')).toEqual(['fleet_manager', 'coordinator']);
  });
});

describe('the last manager stays', () => {
  const members: ManagingCandidate[] = [
    { membershipId: 1, userId: 101, role: 'buyer', active: true },
    { membershipId: 2, userId: 102, role: 'clinician', active: true },
    { membershipId: 3, userId: 103, role: 'buyer', active: false },
  ];

  it('refuses to demote or deactivate the only active buyer', () => {
    expect(keepsAManager('hospital', members, { membershipId: 1, role: 'clinician' })).toBe(false);
    expect(keepsAManager('hospital', members, { membershipId: 1, deactivateUserId: 101 })).toBe(
      false,
    );
  });

  it('allows it when another active manager remains, and for non-managers', () => {
    const two = [
      ...members,
      { membershipId: 4, userId: 104, role: 'buyer' as const, active: true },
    ];
    expect(keepsAManager('hospital', two, { membershipId: 1, role: 'clinician' })).toBe(true);
    expect(keepsAManager('hospital', members, { membershipId: 2, deactivateUserId: 102 })).toBe(
      true,
    );
  });

  it('leaves organisations that never had a manager to the admin', () => {
    const practice: ManagingCandidate[] = [
      { membershipId: 9, userId: 109, role: 'proctor', active: true },
    ];
    expect(
      keepsAManager('proctor_practice', practice, { membershipId: 9, deactivateUserId: 109 }),
    ).toBe(true);
  });
});
