import type { Visit } from '@evalon/contracts';

/**
 * An invented proctoring visit for specs: offered, nobody accepted yet, two case days in March
 * 2027 at a Massachusetts campus. Pass the fields a test is about.
 */
export function visit(overrides: Partial<Visit> = {}): Visit {
  return {
    id: 1,
    reference: 'PV-2027-000001',
    kind: 'proctoring',
    state: 'offered',
    hospitalId: 3,
    hospitalName: 'Velmora Health',
    siteId: 4,
    siteName: 'North Campus',
    siteTimeZone: 'America/New_York',
    jurisdiction: 'US-MA',
    modelId: 5,
    modelName: 'Model R2',
    loanId: null,
    from: '2027-03-16',
    to: '2027-03-17',
    cases: 3,
    language: null,
    note: null,
    proctorId: null,
    proctorName: null,
    busyFrom: null,
    busyTo: null,
    travelDays: null,
    feeEstimate: null,
    currentOffer: null,
    createdAt: '2027-02-01T12:00:00Z',
    ...overrides,
  };
}
