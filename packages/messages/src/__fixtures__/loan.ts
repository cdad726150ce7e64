import type { Loan, Milestones } from '@evalon/contracts';

/**
 * An invented loan for the tests (demo-data style: made-up organisations, people and models,
 * `.example` addresses). The hospital site is in New York so that its dates sit next to the US
 * daylight-saving change of 2027-03-14 (docs/references.md).
 */
export const MILESTONES: Milestones = {
  shipBy: '2027-03-08',
  deliverBy: '2027-03-11',
  useFrom: '2027-03-15',
  useTo: '2027-03-19',
  returnShipBy: '2027-03-22',
  backAtDepot: '2027-03-25',
  readyAgain: '2027-03-29',
};

/** Builds the test loan, with overrides. */
export function makeLoan(overrides: Partial<Loan> = {}): Loan {
  const milestones = overrides.milestones ?? MILESTONES;
  return {
    id: 42,
    reference: 'EV-2027-000042',
    state: 'confirmed',
    hospitalId: 11,
    hospitalName: 'Quillfield Teaching Hospital',
    siteId: 31,
    siteName: 'East Campus',
    siteTimeZone: 'America/New_York',
    lenderId: 21,
    lenderName: 'Brightlathe Loaner Program',
    useFrom: milestones.useFrom,
    useTo: milestones.useTo,
    milestones,
    units: [
      {
        unitId: 7,
        modelId: 3,
        modelName: 'Calder arm robotic platform',
        serialNumber: 'CA-0007',
        depotId: 5,
        depotName: 'Lakeside depot',
        milestones,
      },
      {
        unitId: 9,
        modelId: 4,
        modelName: 'Tessel flexible ureteroscope',
        serialNumber: 'TF-0119',
        depotId: 6,
        depotName: 'Ridgeway depot',
        milestones,
      },
    ],
    deposit: { amount: 250_000, currency: 'USD' },
    note: 'Cases are booked in OR 4.',
    requestedBy: 'Dana Orrin',
    createdAt: '2027-02-01T14:00:00Z',
    ...overrides,
  };
}

/** Site address used as LOCATION. */
export const SITE_ADDRESS = '100 Harbor Road\nPortwell, NY 10001';

/** Organizer of the test invite. */
export const ORGANIZER = { name: 'Evalon loans', email: 'loans@evalon.example' };

/** Attendees of the test invite: one of each role. */
export const ATTENDEES = [
  { name: 'Dana Orrin', email: 'dana.orrin@quillfield.example' },
  { name: 'Ravi Tamsin', email: 'ravi.tamsin@brightlathe.example', role: 'optional' as const },
  {
    name: 'Dr. Ines Varga',
    email: 'ines.varga@quillfield.example',
    role: 'informational' as const,
  },
];
