import { navigationFor } from './navigation';

const labels = (roles: Parameters<typeof navigationFor>[0]) =>
  navigationFor(roles, 7).map((e) => e.label);

describe('navigationFor', () => {
  it('gives each role its own pages, Home first and Members for managing roles', () => {
    expect(labels(['buyer'])).toEqual([
      'Home',
      'Find equipment',
      'Loans',
      'Proctoring',
      'Visit settings',
      'Members',
    ]);
    expect(labels(['clinician'])).toEqual([
      'Home',
      'Loans',
      'Proctoring',
      'My training',
      'Schedule',
      'Case log',
    ]);
    expect(labels(['proctor'])).toEqual(['Home', 'Visit offers', 'Credentials', 'Calendar']);
    expect(labels(['coordinator'])).toEqual(['Home', 'Shipments', 'Units']);
    expect(labels(['fleet_manager'])).toEqual([
      'Home',
      'Shipments',
      'Catalog',
      'Approvals',
      'Credit agreements',
      'Units',
      'Visit settings',
      'Members',
    ]);
    expect(labels(['admin'])).toEqual([
      'Home',
      'Organisations',
      'Audit',
      'E-mail outbox',
      'Members',
    ]);
  });

  it('merges several roles without repeating entries', () => {
    expect(labels(['clinician', 'buyer'])).toEqual([
      'Home',
      'Find equipment',
      'Loans',
      'Proctoring',
      'My training',
      'Schedule',
      'Case log',
      'Visit settings',
      'Members',
    ]);
  });

  it('links Members to the active organisation and leaves it out without one', () => {
    expect(navigationFor(['buyer'], 7).at(-1)?.link).toBe('/organisations/7/members');
    expect(navigationFor(['buyer'], null).map((e) => e.label)).not.toContain('Members');
  });
});
