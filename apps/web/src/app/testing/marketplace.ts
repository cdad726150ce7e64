import type {
  AlternativeItem,
  AvailabilityItem,
  Loan,
  Milestones,
  Model,
  Site,
} from '@evalon/contracts';
import { addDays, todayIn } from '../shared/iso-date';
import { organisations } from './people';

/*
 * Invented marketplace data for client tests: Velmora Health's campuses, the lender
 * Dralvik Medical Loans with its depots, models, search results and loans. No real names.
 */

/** A day `days` ahead of today in New York, so form dates stay in the future whenever tests run. */
export function future(days: number): string {
  return addDays(todayIn('America/New_York'), days);
}

/** An ISO date as a person types it into a US date field: `3/1/2027`. */
export function typed(iso: string): string {
  const [y, m, d] = iso.split('-').map(Number);
  return `${m}/${d}/${y}`;
}

export const campusBoston: Site = {
  id: 11,
  organisationId: organisations.velmora.id,
  organisationName: organisations.velmora.name,
  kind: 'campus',
  name: 'Velmora East Campus',
  addressLine: '1 Pier Road',
  city: 'Boston',
  country: 'US',
  latitude: 42.34,
  longitude: -71.07,
  timeZone: 'America/New_York',
  receivingHours: 'Mon–Fri 06:30–15:00',
  cutoffTime: null,
};

export const campusChicago: Site = {
  ...campusBoston,
  id: 12,
  name: 'Velmora Lakefront Campus',
  city: 'Chicago',
  latitude: 41.86,
  longitude: -87.62,
  timeZone: 'America/Chicago',
};

export const depotEast: Site = {
  id: 21,
  organisationId: organisations.dralvik.id,
  organisationName: organisations.dralvik.name,
  kind: 'depot',
  name: 'Dralvik East Depot',
  addressLine: '5 Dockside Way',
  city: 'Edison',
  country: 'US',
  latitude: 40.52,
  longitude: -74.35,
  timeZone: 'America/New_York',
  receivingHours: 'Mon–Fri 08:00–17:00',
  cutoffTime: '15:00',
};

export const depotEurope: Site = {
  ...depotEast,
  id: 22,
  name: 'Dralvik Europe Depot',
  city: 'Frankfurt',
  country: 'DE',
  latitude: 50.0,
  longitude: 8.57,
  timeZone: 'Europe/Berlin',
};

export const sites: Site[] = [campusBoston, campusChicago, depotEast, depotEurope];

/** A model with the fields screens read. */
export function model(overrides: Partial<Model> & Pick<Model, 'id' | 'name' | 'category'>): Model {
  return {
    lenderId: organisations.dralvik.id,
    lenderName: organisations.dralvik.name,
    description: 'An invented model for tests.',
    listValue: 2_800_000,
    currency: 'USD',
    depositRule: { percentBps: 2000, min: 200_000, max: 800_000, currency: 'USD' },
    depositPerUnit: { amount: 560_000, currency: 'USD' },
    packingList: [],
    compatibleModelIds: [],
    compatibleModels: [],
    photoIds: [],
    photos: [],
    unitCount: 3,
    activeUnitCount: 3,
    editable: false,
    ...overrides,
  };
}

export const scopeModel = model({
  id: 2,
  name: 'Dralvik U6 slim ureteroscope',
  category: 'flexible_endoscope',
});
export const towerModel = model({
  id: 5,
  name: 'Dralvik V2 imaging tower',
  category: 'imaging',
});
export const models: Model[] = [scopeModel, towerModel];

/** Milestones of a window, shaped like the server's (dates are only read, never checked). */
export function milestonesFor(useFrom: string, useTo: string): Milestones {
  return {
    shipBy: addDays(useFrom, -7),
    deliverBy: addDays(useFrom, -5),
    useFrom,
    useTo,
    returnShipBy: addDays(useTo, 1),
    backAtDepot: addDays(useTo, 5),
    readyAgain: addDays(useTo, 7),
  };
}

/** A search result for a unit. */
export function availabilityItem(
  overrides: Partial<AvailabilityItem> & Pick<AvailabilityItem, 'unitId' | 'serialNumber'>,
): AvailabilityItem {
  return {
    modelId: scopeModel.id,
    modelName: scopeModel.name,
    category: scopeModel.category,
    lenderId: organisations.dralvik.id,
    lenderName: organisations.dralvik.name,
    depotId: depotEast.id,
    depotName: depotEast.name,
    depotTimeZone: depotEast.timeZone,
    feasible: true,
    milestones: milestonesFor('2027-03-01', '2027-03-03'),
    distanceKm: 339.8,
    transitDays: 2,
    leadDays: 2,
    firstLoanOfModel: false,
    deposit: { amount: 560_000, currency: 'USD' },
    earliestUseFrom: null,
    earliestUseTo: null,
    reasonCode: null,
    reason: null,
    ...overrides,
  };
}

/** An alternative for a unit. */
export function alternative(
  forUnitId: number,
  overrides: Partial<AvailabilityItem> & Pick<AvailabilityItem, 'unitId' | 'serialNumber'>,
): AlternativeItem {
  return { ...availabilityItem(overrides), forUnitId, relation: 'same_model' };
}

/** The answer of `GET /api/availability`. */
export function availabilityResponse(items: AvailabilityItem[]) {
  return {
    items,
    horizonDays: 180,
    truncated: false,
    caution: 'Dates and deposits are estimates until the lender confirms the loan.',
  };
}

/** A loan of Velmora Health. */
export function loan(overrides: Partial<Loan> & Pick<Loan, 'id' | 'reference' | 'state'>): Loan {
  const useFrom = overrides.useFrom ?? '2027-03-01';
  const useTo = overrides.useTo ?? '2027-03-03';
  const milestones = milestonesFor(useFrom, useTo);
  return {
    hospitalId: organisations.velmora.id,
    hospitalName: organisations.velmora.name,
    siteId: campusBoston.id,
    siteName: campusBoston.name,
    siteTimeZone: campusBoston.timeZone,
    lenderId: organisations.dralvik.id,
    lenderName: organisations.dralvik.name,
    useFrom,
    useTo,
    milestones,
    units: [
      {
        unitId: 5,
        modelId: scopeModel.id,
        modelName: scopeModel.name,
        serialNumber: 'MSU-0001',
        depotId: depotEast.id,
        depotName: depotEast.name,
        milestones,
        deposit: { amount: 560_000, currency: 'USD' },
      },
    ],
    deposit: { amount: 560_000, currency: 'USD' },
    note: null,
    requestedBy: 'Dana Whitlock',
    createdAt: '2026-11-30T14:05:00.000Z',
    events: [],
    allowedActions: [],
    ...overrides,
  };
}
