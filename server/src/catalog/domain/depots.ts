import type { EntityManager } from 'typeorm';
import type {
  Depot,
  DepotInput,
  ShippingSettings,
  ShippingSettingsResponse,
} from '@evalon/contracts';
import { publicHolidays } from '@evalon/scheduling';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findDepot,
  findOrganisationKind,
  insertDepot,
  listDepots,
  updateDepot,
} from '../../organisations';
import { saveLenderSettings } from '../data-access/lender-settings-repository';
import type { CatalogDeps } from './deps';
import { loadLenderSettings } from './shipping-settings';

/** 404 unless the organisation exists and is a lender. */
async function requireLender(m: EntityManager, lenderId: number): Promise<void> {
  const org = await findOrganisationKind(m, lenderId);
  if (!org || org.kind !== 'lender') {
    throw AppError.notFound('lender_not_found', 'There is no such lender.');
  }
}

/**
 * Shipping days skip the origin country's public holidays, so a depot needs a country whose
 * calendar we know; an unknown one would silently ship on holidays.
 */
function requireHolidayCalendar(country: string, year: number): void {
  try {
    publicHolidays(country, year);
  } catch {
    throw AppError.field(
      'unknown_holiday_calendar',
      'country',
      `We have no public-holiday calendar for ${country}; use an ISO country code such as US or DE.`,
    );
  }
}

/** A lender's depots. */
export async function lenderDepots(deps: CatalogDeps, lenderId: number): Promise<Depot[]> {
  const m = deps.dataSource.manager;
  await requireLender(m, lenderId);
  return listDepots(m, lenderId);
}

/** Adds a depot to a lender. */
export async function createDepot(
  deps: CatalogDeps,
  lenderId: number,
  input: DepotInput,
): Promise<Depot> {
  requireHolidayCalendar(input.country, deps.now().getUTCFullYear());
  return deps.dataSource.transaction(async (m) => {
    await requireLender(m, lenderId);
    const id = await insertDepot(m, lenderId, input, deps.now());
    return (await findDepot(m, lenderId, id))!;
  });
}

/**
 * Changes a depot. Loans already booked keep the milestones they were computed with; new
 * searches use the new address, zone and cut-off.
 */
export async function changeDepot(
  deps: CatalogDeps,
  lenderId: number,
  siteId: number,
  input: DepotInput,
): Promise<Depot> {
  requireHolidayCalendar(input.country, deps.now().getUTCFullYear());
  return deps.dataSource.transaction(async (m) => {
    await requireLender(m, lenderId);
    if (!(await findDepot(m, lenderId, siteId))) {
      throw AppError.notFound('depot_not_found', 'This lender has no such depot.');
    }
    await updateDepot(m, siteId, input);
    return (await findDepot(m, lenderId, siteId))!;
  });
}

function toResponse(
  lenderId: number,
  loaded: Awaited<ReturnType<typeof loadLenderSettings>>,
): ShippingSettingsResponse {
  return {
    lenderId,
    settings: loaded.settings,
    isDefault: loaded.isDefault,
    updatedAt: loaded.updatedAt ? loaded.updatedAt.toISOString() : null,
  };
}

/** A lender's shipping settings (the product defaults until it saves its own). */
export async function shippingSettingsOf(
  deps: CatalogDeps,
  lenderId: number,
): Promise<ShippingSettingsResponse> {
  const m = deps.dataSource.manager;
  await requireLender(m, lenderId);
  return toResponse(lenderId, await loadLenderSettings(m, lenderId));
}

/** Saves a lender's shipping settings; later searches and bookings use them. */
export async function saveShippingSettings(
  deps: CatalogDeps,
  auth: AuthContext,
  lenderId: number,
  settings: ShippingSettings,
): Promise<ShippingSettingsResponse> {
  const result = await deps.dataSource.transaction(async (m) => {
    await requireLender(m, lenderId);
    await saveLenderSettings(m, lenderId, settings, auth.user.id, deps.now());
    return toResponse(lenderId, await loadLenderSettings(m, lenderId));
  });
  deps.settingsCache.invalidate(lenderId);
  return result;
}
