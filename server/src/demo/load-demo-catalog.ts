import { saveShipmentSettings, stageDemoShipments } from '../shipments';
import type { DataSource } from 'typeorm';
import { addCalendarDays, isoWeekday } from '@evalon/scheduling';
import { PlannerCache } from '../availability';
import {
  insertModel,
  insertUnit,
  replacePackingList,
  type CatalogDeps,
  LocalPhotoStore,
  LenderSettingsCache,
  addMaintenanceHold,
} from '../catalog';
import { toAuthContext, type AuthContext, loadSessionUser } from '../identity';
import { requestLoan, type LoanDeps, noLoanNotifications, transitionLoan } from '../loans';
import { createLogger } from '../logger';
import {
  demoCompatibility,
  demoLender,
  demoLoans,
  demoMaintenance,
  demoModels,
  demoUnits,
} from './demo-catalog';

/** What the catalogue part of the demo loaded. */
export interface DemoCatalogSummary {
  models: number;
  units: number;
  maintenanceHolds: number;
  loans: number;
}

/** The first Monday on or after `date`. */
function mondayOnOrAfter(date: string): string {
  let d = date;
  while (isoWeekday(d) !== 1) d = addCalendarDays(d, 1);
  return d;
}

async function authOf(dataSource: DataSource, email: string): Promise<AuthContext> {
  const rows: { id: number }[] = await dataSource.query('SELECT id FROM users WHERE email = ?', [
    email,
  ]);
  const loaded = rows[0] ? await loadSessionUser(dataSource.manager, Number(rows[0].id)) : null;
  if (!loaded) throw new Error(`demo person ${email} is missing`);
  return toAuthContext(loaded.user);
}

async function siteIdByName(dataSource: DataSource, name: string): Promise<number> {
  const rows: { id: number }[] = await dataSource.query('SELECT id FROM sites WHERE name = ?', [
    name,
  ]);
  if (!rows[0]) throw new Error(`demo site ${name} is missing`);
  return Number(rows[0].id);
}

/**
 * Loads Quorvel Surgical's catalogue (models, packing lists, compatibility, units over its three
 * depots), maintenance holds and loans in every early state, dated from `now` so calendars are
 * lived-in whenever the demo is loaded. Loans go through the same booking and approval use cases
 * as the API (footprints, holds, events), so the demo cannot hold a state the product could not
 * reach. Expects the identity part of the demo to be loaded.
 */
export async function loadDemoCatalog(
  dataSource: DataSource,
  now: Date,
  depositWindowMs: number,
): Promise<DemoCatalogSummary> {
  const summary: DemoCatalogSummary = { models: 0, units: 0, maintenanceHolds: 0, loans: 0 };
  const [lender] = (await dataSource.query('SELECT id FROM organisations WHERE name = ?', [
    demoLender.name,
  ])) as { id: number }[];
  if (!lender) throw new Error(`demo lender ${demoLender.name} is missing`);
  const lenderId = Number(lender.id);

  const modelIds = new Map<string, number>();
  const unitIds = new Map<string, number>();
  await dataSource.transaction(async (m) => {
    for (const model of demoModels) {
      const id = await insertModel(
        m,
        {
          lenderId,
          name: model.name,
          category: model.category,
          description: model.description,
          listValue: model.listValue,
          currency: 'USD',
          depositPercentBps: model.depositRule.percentBps,
          depositMin: model.depositRule.min,
          depositMax: model.depositRule.max,
        },
        now,
      );
      await replacePackingList(m, id, model.packingList);
      modelIds.set(model.key, id);
      summary.models++;
    }
    for (const [a, b] of demoCompatibility) {
      const [x, y] = [modelIds.get(a)!, modelIds.get(b)!];
      await m.query(
        'INSERT INTO model_compatibility (model_id, compatible_model_id) VALUES (?, ?), (?, ?)',
        [x, y, y, x],
      );
    }
    const depotIds = new Map<string, number>();
    for (const unit of demoUnits) {
      if (!depotIds.has(unit.depot))
        depotIds.set(unit.depot, await siteIdByName(dataSource, unit.depot));
      const model = demoModels.find((d) => d.key === unit.model)!;
      const id = await insertUnit(
        m,
        {
          modelId: modelIds.get(unit.model)!,
          serialNumber: unit.serialNumber,
          udiDi: model.deviceGtin,
          homeDepotId: depotIds.get(unit.depot)!,
          status: unit.status,
        },
        now,
      );
      unitIds.set(unit.serialNumber, id);
      summary.units++;
    }
  });

  const settingsCache = new LenderSettingsCache();
  const logger = createLogger('silent');
  const catalogDeps: CatalogDeps = {
    dataSource,
    logger,
    // Maintenance holds never touch photos; a store is required by the type only.
    photoStore: new LocalPhotoStore('/nonexistent-demo-photos'),
    settingsCache,
    now: () => now,
  };
  const loanDeps: LoanDeps = {
    dataSource,
    logger,
    settingsCache,
    plans: new PlannerCache(),
    now: () => now,
    notifyLoanEvent: noLoanNotifications,
    depositWindowMs,
  };
  const today = now.toISOString().slice(0, 10);
  const fleet = await authOf(dataSource, demoLender.fleetManager);

  for (const hold of demoMaintenance) {
    const start = addCalendarDays(today, hold.startInDays);
    await addMaintenanceHold(catalogDeps, fleet, unitIds.get(hold.serialNumber)!, {
      start,
      end: addCalendarDays(start, hold.days - 1),
      reason: hold.reason,
    });
    summary.maintenanceHolds++;
  }

  // SSCCs of the demo lender: GS1's documentation example company prefix.
  await saveShipmentSettings(
    dataSource.manager,
    lenderId,
    { gs1CompanyPrefix: '0614141', extensionDigit: 0 },
    now,
  );
  const ssccSerial = { next: 1 };
  for (const loan of demoLoans) {
    const buyer = await authOf(dataSource, loan.buyer);
    const useFrom = mondayOnOrAfter(addCalendarDays(today, loan.startInDays));
    const created = await requestLoan(loanDeps, buyer, {
      siteId: await siteIdByName(dataSource, loan.campus),
      unitIds: loan.serialNumbers.map((s) => unitIds.get(s)!),
      useFrom,
      useTo: addCalendarDays(useFrom, loan.days - 1),
      ...(loan.note ? { note: loan.note } : {}),
    });
    if (loan.outcome === 'approved') {
      await transitionLoan(loanDeps, fleet, created.id, 'approve', null);
      if (loan.shipments) {
        const stage = loan.shipments;
        await dataSource.transaction((m) =>
          stageDemoShipments(m, created.id, stage, fleet.user.id, now, ssccSerial),
        );
      }
    } else if (loan.outcome === 'declined') {
      await transitionLoan(loanDeps, fleet, created.id, 'decline', loan.reason ?? 'Not available');
    } else if (loan.outcome === 'cancelled') {
      await transitionLoan(loanDeps, buyer, created.id, 'cancel', loan.reason ?? 'Plans changed');
    }
    summary.loans++;
  }
  await dataSource.query('UPDATE shipment_settings SET next_serial = ? WHERE lender_id = ?', [
    ssccSerial.next,
    lenderId,
  ]);
  return summary;
}
