import type { DemoShipmentStage } from '../shipments';
import { toGtin14, type ModelCategory, type UnitStatus } from '@evalon/contracts';
import modelsFile from './demo-models.json';

/**
 * The demo catalogue of the invented lender Quorvel Surgical: models, units over its three
 * depots, maintenance and loans placed relative to the day the demo is loaded, so calendars
 * look lived-in whenever it is loaded. Every name here is made up.
 *
 * GTINs use the GS1 "restricted circulation" range (GTIN-13 bodies starting with 2), which GS1
 * keeps out of trade between companies, so no demo number can belong to a real product; the
 * check digits are computed with the shared GS1 helper.
 */

/** A GTIN-14 of the demo range: indicator 0, prefix 2904711, a 5-digit item reference. */
export function demoGtin(item: number): string {
  return toGtin14(`02904711${String(item).padStart(5, '0')}`);
}

export interface DemoPackingItem {
  name: string;
  gtin: string | null;
  quantity: number;
  serialised: boolean;
}

export interface DemoModel {
  /** Short key the units, loans and compatibility below refer to. */
  key: string;
  name: string;
  category: ModelCategory;
  description: string;
  /** List value in USD cents. */
  listValue: number;
  depositRule: { percentBps: number; min: number; max: number };
  /** GTIN of the device itself (the units' UDI device identifier). */
  deviceGtin: string;
  packingList: DemoPackingItem[];
}

/** One row of the data file: the model with item numbers where the code builds GTINs. */
interface ModelRecord {
  key: string;
  name: string;
  category: ModelCategory;
  description: string;
  listValueUsdCents: number;
  deposit: { percentBps: number; min: number; max: number };
  deviceItem: number;
  /** [item, GTIN item number or null, quantity, serialised] */
  packingList: [string, number | null, number, boolean][];
}

/** The models are data (demo-models.json, one record per model); GTINs are derived here. */
export const demoModels: DemoModel[] = (modelsFile.models as ModelRecord[]).map((m) => ({
  key: m.key,
  name: m.name,
  category: m.category,
  description: m.description,
  listValue: m.listValueUsdCents,
  depositRule: m.deposit,
  deviceGtin: demoGtin(m.deviceItem),
  packingList: m.packingList.map(([name, gtin, quantity, serialised]) => ({
    name,
    gtin: gtin === null ? null : demoGtin(gtin),
    quantity,
    serialised,
  })),
}));

/** Pairs of compatible models (stored both ways). */
export const demoCompatibility: [string, string][] = [
  ['robot', 'uretero'],
  ['robot', 'cysto'],
  ['robot', 'laser'],
  ['robot', 'instruments'],
  ['laser', 'uretero'],
  ['laser', 'cysto'],
  ['tower', 'uretero'],
  ['tower', 'cysto'],
  ['fluid', 'uretero'],
  ['fluid', 'laser'],
];

/** Which depot of Quorvel Surgical (by name in demo-data.ts). */
export type DemoDepot = 'Quorvel East Depot' | 'Quorvel West Depot' | 'Quorvel Europe Depot';

export interface DemoUnit {
  model: string;
  serialNumber: string;
  depot: DemoDepot;
  status: UnitStatus;
}

const east: DemoDepot = 'Quorvel East Depot';
const west: DemoDepot = 'Quorvel West Depot';
const europe: DemoDepot = 'Quorvel Europe Depot';

function units(model: string, prefix: string, depots: DemoDepot[], statuses: UnitStatus[] = []) {
  return depots.map((depot, i) => ({
    model,
    serialNumber: `${prefix}-${String(i + 1).padStart(4, '0')}`,
    depot,
    status: statuses[i] ?? 'active',
  }));
}

/** 37 units over the three depots; one in maintenance and one retired. */
export const demoUnits: DemoUnit[] = [
  ...units('robot', 'QR2', [east, east, west, europe]),
  ...units('uretero', 'QU75', [east, east, east, west, west, west, europe, europe, europe]),
  ...units('cysto', 'QC11', [east, east, west, europe, europe]),
  ...units(
    'laser',
    'QT60',
    [east, east, west, west, europe, europe],
    ['active', 'active', 'active', 'maintenance'],
  ),
  ...units('tower', 'QV4', [east, west, europe, europe]),
  ...units('fluid', 'QP1', [east, west, europe, europe]),
  ...units(
    'instruments',
    'QR2S',
    [east, west, europe, east, west],
    ['active', 'active', 'active', 'active', 'retired'],
  ),
];

/** A maintenance hold, `startInDays` days from the load day for `days` days. */
export interface DemoMaintenance {
  serialNumber: string;
  startInDays: number;
  days: number;
  reason: string;
}

export const demoMaintenance: DemoMaintenance[] = [
  { serialNumber: 'QR2-0003', startInDays: 10, days: 8, reason: 'Annual preventive maintenance' },
  { serialNumber: 'QT60-0001', startInDays: 40, days: 5, reason: 'Fibre port recalibration' },
  { serialNumber: 'QV4-0001', startInDays: 5, days: 5, reason: 'Monitor panel replacement' },
  { serialNumber: 'QU75-0004', startInDays: 24, days: 4, reason: 'Deflection cable service' },
];

/** What happens to a demo loan after it is requested. */
export type DemoLoanOutcome = 'requested' | 'approved' | 'declined' | 'cancelled';

export interface DemoLoan {
  buyer: string;
  /** Campus name (demo-data.ts). */
  campus: string;
  serialNumbers: string[];
  /** First case day: the first Monday at least this many days after the load day. */
  startInDays: number;
  /** Case days, both ends counted. */
  days: number;
  note: string | null;
  outcome: DemoLoanOutcome;
  /** Why it was declined or cancelled. */
  reason?: string;
  /** For approved loans: confirm them and take their shipments this far. */
  shipments?: DemoShipmentStage;
}

export const demoLoans: DemoLoan[] = [
  {
    buyer: 'buyer@velmora.example',
    campus: 'Velmora East Campus',
    serialNumbers: ['QR2-0001', 'QR2S-0001'],
    startInDays: 21,
    days: 5,
    note: 'Five partial nephrectomies booked in OR 7; proctor requested for the first two.',
    outcome: 'approved',
  },
  {
    buyer: 'buyer@velmora.example',
    campus: 'Velmora Lakefront Campus',
    serialNumbers: ['QU75-0001', 'QU75-0002', 'QT60-0002', 'QP1-0001'],
    startInDays: 35,
    days: 4,
    note: 'Stone list comparing dusting settings; two scopes so reprocessing does not hold up the list.',
    outcome: 'requested',
  },
  {
    buyer: 'buyer@velmora.example',
    campus: 'Velmora East Campus',
    serialNumbers: ['QV4-0002'],
    startInDays: 49,
    days: 3,
    note: null,
    outcome: 'declined',
    reason: 'That tower is committed to a service campaign that week; please pick the next week.',
  },
  {
    buyer: 'buyer@velmora.example',
    campus: 'Velmora Lakefront Campus',
    serialNumbers: ['QC11-0001'],
    startInDays: 28,
    days: 2,
    note: 'Office cystoscopy clinic trial.',
    outcome: 'cancelled',
    reason: 'The clinic sessions moved to the autumn.',
  },
  {
    buyer: 'buyer@orlenbach.example',
    campus: 'Orlenbach Hauptstandort',
    serialNumbers: ['QR2-0004'],
    startInDays: 30,
    days: 5,
    note: 'Evaluation for the value-analysis committee; cases in OP 3.',
    outcome: 'requested',
  },
  {
    buyer: 'buyer@orlenbach.example',
    campus: 'Orlenbach Hauptstandort',
    serialNumbers: ['QT60-0005', 'QP1-0003'],
    startInDays: 42,
    days: 3,
    note: null,
    outcome: 'approved',
  },
  {
    buyer: 'buyer@orlenbach.example',
    campus: 'Orlenbach Hauptstandort',
    serialNumbers: ['QU75-0007'],
    startInDays: 63,
    days: 2,
    note: 'Second scope for the same stone list.',
    outcome: 'requested',
  },
];

/** Loans on their way, one per shipment stage the coordinator's board shows. */
const staged = (
  serial: string,
  campus: string,
  buyer: string,
  startInDays: number,
  shipments: DemoShipmentStage,
): DemoLoan => ({
  buyer,
  campus,
  serialNumbers: [serial],
  startInDays,
  days: 2,
  note: null,
  outcome: 'approved',
  shipments,
});
const velmora = 'buyer@velmora.example';
const orlenbach = 'buyer@orlenbach.example';
demoLoans.push(
  staged('QC11-0002', 'Velmora East Campus', velmora, 14, 'to_pack'),
  staged('QU75-0003', 'Velmora East Campus', velmora, 14, 'packed'),
  staged('QP1-0002', 'Velmora Lakefront Campus', velmora, 16, 'handed_over'),
  staged('QU75-0005', 'Velmora Lakefront Campus', velmora, 18, 'at_risk'),
  staged('QC11-0003', 'Velmora East Campus', velmora, 20, 'overdue'),
  staged('QU75-0006', 'Velmora East Campus', velmora, 22, 'lost'),
  staged('QR2S-0004', 'Velmora East Campus', velmora, 24, 'delivered'),
  staged('QV4-0003', 'Orlenbach Hauptstandort', orlenbach, 14, 'returning'),
  staged('QC11-0004', 'Orlenbach Hauptstandort', orlenbach, 18, 'awaiting_inspection'),
  staged('QU75-0008', 'Orlenbach Hauptstandort', orlenbach, 22, 'inspected'),
);

/** The demo lender and the person who approves or declines its loans. */
export const demoLender = { name: 'Quorvel Surgical', fleetManager: 'fleet@quorvel.example' };
