import type { Depot, Hold, Loan, Model, Unit } from '@evalon/contracts';
import { organisations } from '../../testing/people';

/*
 * Invented fleet of the invented lender "Dralvik Medical Loans" for the fleet manager's
 * client tests: names, serial numbers and places are made up. GTINs use the GS1
 * restricted-circulation prefix 2 (never assigned to a trade item), with check digits from the
 * GS1 rule (General Specifications §7.9.1).
 */

/** The lender's organisation id. */
export const lenderId = organisations.dralvik.id;

/** A model of the lender, with sensible defaults. */
export function fleetModel(overrides: Partial<Model> = {}): Model {
  const base: Model = {
    id: 41,
    lenderId,
    lenderName: organisations.dralvik.name,
    name: 'Dralvik U8 ureteroscope',
    category: 'flexible_endoscope',
    description: 'Reusable flexible digital ureteroscope, loaned with its leak tester.',
    listValue: 2_800_000,
    currency: 'USD',
    depositRule: { percentBps: 2_000, min: 200_000, max: 800_000, currency: 'USD' },
    depositPerUnit: { amount: 560_000, currency: 'USD' },
    packingList: [
      { id: 901, name: 'Ureteroscope', gtin: '02000000000008', quantity: 1, serialised: true },
      { id: 902, name: 'Leak tester', gtin: null, quantity: 1, serialised: false },
    ],
    compatibleModelIds: [],
    compatibleModels: [],
    photoIds: [],
    photos: [],
    unitCount: 3,
    activeUnitCount: 2,
    editable: true,
  };
  return { ...base, ...overrides };
}

/** A few models of the lender. */
export const fleetModels: Model[] = [
  fleetModel(),
  fleetModel({
    id: 42,
    name: 'Dralvik A5 robotic platform',
    category: 'robotic_platform',
    listValue: 185_000_000,
    depositRule: { percentBps: 200, min: 2_500_000, max: 6_000_000, currency: 'USD' },
    depositPerUnit: { amount: 3_700_000, currency: 'USD' },
    packingList: [],
    unitCount: 2,
    activeUnitCount: 2,
  }),
  fleetModel({
    id: 43,
    name: 'Dralvik L3 laser',
    category: 'laser',
    listValue: 14_500_000,
    depositRule: { percentBps: 1_000, min: 500_000, max: 2_000_000, currency: 'USD' },
    depositPerUnit: { amount: 1_450_000, currency: 'USD' },
    packingList: [],
    unitCount: 1,
    activeUnitCount: 1,
  }),
];

/** Two depots of the lender. */
export const fleetDepots: Depot[] = [
  {
    id: 501,
    organisationId: lenderId,
    kind: 'depot',
    name: 'Dralvik Coast Depot',
    addressLine: '12 Quayside Way',
    city: 'Port Alder',
    postalCode: '02999',
    region: 'MA',
    country: 'US',
    latitude: 42.1,
    longitude: -71.2,
    timeZone: 'America/New_York',
    receivingHours: 'Mon–Fri 08:00–16:00',
    cutoffTime: '15:00',
  },
  {
    id: 502,
    organisationId: lenderId,
    kind: 'depot',
    name: 'Dralvik Central Depot',
    addressLine: 'Lagerweg 4',
    city: 'Weidenfeld',
    postalCode: '55999',
    region: null,
    country: 'DE',
    latitude: 50.0,
    longitude: 8.3,
    timeZone: 'Europe/Berlin',
    receivingHours: null,
    cutoffTime: '14:00',
  },
];

/** A unit of the lender. */
export function fleetUnit(overrides: Partial<Unit> = {}): Unit {
  return {
    id: 7001,
    modelId: 41,
    modelName: 'Dralvik U8 ureteroscope',
    category: 'flexible_endoscope',
    lenderId,
    serialNumber: 'MV-0001',
    udiDi: '02000000000008',
    homeDepotId: 501,
    homeDepotName: 'Dralvik Coast Depot',
    homeDepotTimeZone: 'America/New_York',
    status: 'active',
    ...overrides,
  };
}

/** A hold of a unit. */
export function fleetHold(overrides: Partial<Hold> = {}): Hold {
  return {
    id: 8001,
    unitId: 7001,
    kind: 'loan',
    start: '2027-03-01',
    end: '2027-03-12',
    loanId: 3001,
    loanReference: 'EV-2027-000101',
    hospitalName: 'Velmora Health',
    reason: null,
    label: 'EV-2027-000101',
    ...overrides,
  };
}

/** A loan request waiting for the lender. */
export function waitingLoan(overrides: Partial<Loan> = {}): Loan {
  const milestones = {
    shipBy: '2027-03-01',
    deliverBy: '2027-03-03',
    useFrom: '2027-03-05',
    useTo: '2027-03-08',
    returnShipBy: '2027-03-09',
    backAtDepot: '2027-03-11',
    readyAgain: '2027-03-15',
  };
  return {
    id: 3001,
    reference: 'EV-2027-000101',
    state: 'requested',
    hospitalId: organisations.velmora.id,
    hospitalName: organisations.velmora.name,
    siteId: 601,
    siteName: 'Velmora Lakefront Campus',
    siteTimeZone: 'America/Chicago',
    lenderId,
    lenderName: organisations.dralvik.name,
    useFrom: milestones.useFrom,
    useTo: milestones.useTo,
    milestones,
    units: [
      {
        unitId: 7001,
        modelId: 41,
        modelName: 'Dralvik U8 ureteroscope',
        serialNumber: 'MV-0001',
        depotId: 501,
        depotName: 'Dralvik Coast Depot',
        milestones,
        deposit: { amount: 560_000, currency: 'USD' },
      },
    ],
    deposit: { amount: 560_000, currency: 'USD' },
    note: 'Four stone cases booked in OR 3.',
    requestedBy: 'Dana Whitlock',
    createdAt: '2027-02-01T15:00:00.000Z',
    allowedActions: ['approve', 'decline'],
    ...overrides,
  };
}
