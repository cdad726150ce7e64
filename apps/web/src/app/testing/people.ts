import type { Membership, OrganisationKind, Role, SessionUser } from '@evalon/contracts';

/** Invented organisations for client tests (no real names). */
export const organisations = {
  velmora: { id: 7, name: 'Velmora Health', kind: 'hospital' },
  zelvara: { id: 9, name: 'Zelvara Hospitals', kind: 'hospital' },
  dralvik: { id: 12, name: 'Dralvik Medical Loans', kind: 'lender' },
} as const satisfies Record<string, { id: number; name: string; kind: OrganisationKind }>;

type OrganisationName = keyof typeof organisations;

/** A membership in one of the invented organisations. */
export function membership(organisation: OrganisationName, role: Role): Membership {
  const o = organisations[organisation];
  return { organisationId: o.id, organisationName: o.name, organisationKind: o.kind, role };
}

/** A signed-in person with the given memberships. */
export function person(
  memberships: Membership[],
  overrides: Partial<SessionUser> = {},
): SessionUser {
  return {
    id: 101,
    email: 'dana.whitlock@velmora.example',
    name: 'Dana Whitlock',
    timeZone: 'America/New_York',
    memberships,
    ...overrides,
  };
}
