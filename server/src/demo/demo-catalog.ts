import type { DemoShipmentStage } from '../shipments';
import { toGtin14, type ModelCategory, type UnitStatus } from '@evalon/contracts';

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

const item = (name: string, gtin: number | null, quantity = 1, serialised = false) => ({
  name,
  gtin: gtin === null ? null : demoGtin(gtin),
  quantity,
  serialised,
});

export const demoModels: DemoModel[] = [
  {
    key: 'robot',
    name: 'Quorvel R2 robotic platform',
    category: 'robotic_platform',
    description:
      'Four-arm robotic platform for minimally invasive urology and general surgery: ' +
      'patient-side cart, surgeon console and vision cart. Loaned with a starter instrument ' +
      'set; in-service training by the lender’s clinical specialist.',
    listValue: 185_000_000,
    depositRule: { percentBps: 200, min: 2_500_000, max: 6_000_000 },
    deviceGtin: demoGtin(10001),
    packingList: [
      item('Patient-side cart', 10001, 1, true),
      item('Surgeon console', 10002, 1, true),
      item('Vision cart with 3D endoscope', 10003, 1, true),
      item('Sterile drape kit (box of 10)', 10004, 2),
      item('Power and fibre-optic cable set', 10005),
      item('Quick reference guide', null),
    ],
  },
  {
    key: 'uretero',
    name: 'Quorvel U75 7.5 Fr digital ureteroscope',
    category: 'flexible_endoscope',
    description:
      'Reusable flexible digital ureteroscope, 7.5 Fr tip, 270° two-way deflection, ' +
      '3.6 Fr working channel. Reprocessed per its instructions for use between loans.',
    listValue: 2_800_000,
    depositRule: { percentBps: 2_000, min: 200_000, max: 800_000 },
    deviceGtin: demoGtin(20001),
    packingList: [
      item('Ureteroscope', 20001, 1, true),
      item('Leak tester', 20002),
      item('Channel cleaning brush (pack of 5)', 20003),
      item('Protective transport case', null),
    ],
  },
  {
    key: 'cysto',
    name: 'Quorvel C11 11 Fr flexible cystoscope',
    category: 'flexible_endoscope',
    description:
      'Reusable flexible video cystoscope, 11 Fr outer diameter, for office and OR cystoscopy ' +
      'and stent removal.',
    listValue: 1_950_000,
    depositRule: { percentBps: 2_000, min: 150_000, max: 500_000 },
    deviceGtin: demoGtin(21001),
    packingList: [
      item('Cystoscope', 21001, 1, true),
      item('Leak tester', 20002),
      item('Video cable', 21002),
    ],
  },
  {
    key: 'laser',
    name: 'Quorvel T60 60 W thulium fibre laser',
    category: 'laser',
    description:
      'Thulium fibre laser console, up to 60 W, for stone dusting and soft-tissue work; ' +
      'reusable fibres 150–550 µm. Laser safety officer sign-off required at the hospital.',
    listValue: 14_500_000,
    depositRule: { percentBps: 1_000, min: 500_000, max: 2_000_000 },
    deviceGtin: demoGtin(30001),
    packingList: [
      item('Laser console', 30001, 1, true),
      item('Foot switch', 30002),
      item('Reusable fibre 200 µm', 30003, 3),
      item('Safety eyewear (pair)', 30004, 4),
      item('Door warning sign', null, 2),
    ],
  },
  {
    key: 'tower',
    name: 'Quorvel V4 4K imaging tower',
    category: 'imaging',
    description:
      '4K camera control unit, LED light source, 32-inch surgical monitor and recorder on one ' +
      'cart; compatible with the U75 and C11 scopes.',
    listValue: 9_500_000,
    depositRule: { percentBps: 1_000, min: 500_000, max: 1_500_000 },
    deviceGtin: demoGtin(40001),
    packingList: [
      item('Camera control unit', 40001, 1, true),
      item('LED light source', 40002, 1, true),
      item('32-inch surgical monitor', 40003, 1, true),
      item('Cart with isolation transformer', 40004),
    ],
  },
  {
    key: 'fluid',
    name: 'Quorvel P1 irrigation and pressure controller',
    category: 'fluid_management',
    description:
      'Irrigation pump with intrarenal pressure limit and flow display for ureteroscopy and ' +
      'laser lithotripsy.',
    listValue: 1_850_000,
    depositRule: { percentBps: 1_500, min: 100_000, max: 400_000 },
    deviceGtin: demoGtin(50001),
    packingList: [
      item('Pump console', 50001, 1, true),
      item('Tubing set (box of 10)', 50002),
      item('Pole clamp', null),
    ],
  },
  {
    key: 'instruments',
    name: 'Quorvel R2 starter instrument set',
    category: 'accessory',
    description:
      'Eight reusable wristed instruments (needle drivers, graspers, scissors, bipolar) for ' +
      'the R2 platform, each good for 10 uses, in a sterilisation tray.',
    listValue: 1_200_000,
    depositRule: { percentBps: 2_500, min: 100_000, max: 300_000 },
    deviceGtin: demoGtin(60001),
    packingList: [
      item('Large needle driver', 60002, 2, true),
      item('Fenestrated bipolar forceps', 60003, 1, true),
      item('Curved scissors', 60004, 1, true),
      item('Grasping retractor', 60005, 2, true),
      item('Sterilisation tray', 60001),
    ],
  },
];

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
