import { z } from 'zod';
import { id, isoDate } from './common';

/** Which way a shipment goes: depot → campus, or back. */
export const shipmentDirections = ['outbound', 'return'] as const;
export const shipmentDirection = z.enum(shipmentDirections);
export type ShipmentDirection = z.infer<typeof shipmentDirection>;

/**
 * Shipment states (ours). Outbound: `to_pack → packed → handed_over → in_transit → delivered`;
 * return: `awaiting_return → handed_over → in_transit → received → inspected`; `exception` is a
 * side state (the carrier lost the parcel). A shipment never moves backwards.
 */
export const shipmentStates = [
  'to_pack',
  'packed',
  'awaiting_return',
  'handed_over',
  'in_transit',
  'delivered',
  'received',
  'inspected',
  'exception',
] as const;
export const shipmentState = z.enum(shipmentStates);
export type ShipmentState = z.infer<typeof shipmentState>;

export const shipmentStateLabels: Record<ShipmentState, string> = {
  to_pack: 'To pack',
  packed: 'Packed',
  awaiting_return: 'Awaiting return',
  handed_over: 'With the carrier',
  in_transit: 'In transit',
  delivered: 'Delivered',
  received: 'Received at depot',
  inspected: 'Inspected',
  exception: 'Carrier exception',
};

/** The carrier's tracking statuses in people's words (unknown ones are shown as sent). */
export const carrierStatusLabels: Readonly<Partial<Record<string, string>>> = {
  booked: 'Booked with the carrier',
  picked_up: 'Picked up by the carrier',
  in_transit: 'In transit',
  out_for_delivery: 'Out for delivery',
  delivered: 'Delivered',
  exception: 'Carrier exception',
};

/** Whether the shipment is on time, at risk (ETA after the deadline) or overdue. */
export const shipmentRisks = ['on_time', 'at_risk', 'overdue'] as const;
export const shipmentRisk = z.enum(shipmentRisks);
export type ShipmentRisk = z.infer<typeof shipmentRisk>;

export const checklistItem = z
  .object({
    id: z.number(),
    unitId: z.number().nullable(),
    unitSerial: z.string().nullable(),
    name: z.string(),
    gtin: z.string().nullable(),
    quantity: z.number(),
    scanned: z.number(),
    /** Whether the lot must be recorded by a scan. */
    needsLot: z.boolean(),
    /** Whether the serial must be recorded by a scan. */
    needsSerial: z.boolean(),
    /** Whether the expiry must be recorded by a scan. */
    needsExpiry: z.boolean(),
    /** Whether packing waits for this line. */
    required: z.boolean(),
    /** Whether scanned (or ticked by hand) `quantity` times. */
    complete: z.boolean(),
    manualReason: z.string().nullable(),
  })
  .meta({ id: 'ChecklistItem' });
export type ChecklistItem = z.infer<typeof checklistItem>;

export const shipmentScan = z
  .object({
    id: z.number(),
    itemId: z.number().nullable(),
    phase: z.enum(['pack', 'receive']),
    outcome: z.enum(['ticked', 'refused', 'manual']),
    raw: z.string().nullable(),
    code: z.string().nullable(),
    message: z.string().nullable(),
    gtin: z.string().nullable(),
    lot: z.string().nullable(),
    serial: z.string().nullable(),
    expiry: isoDate.nullable(),
    by: z.string().nullable(),
    at: z.string(),
  })
  .meta({ id: 'ShipmentScan' });
export type ShipmentScan = z.infer<typeof shipmentScan>;

export const shipmentEvent = z
  .object({
    id: z.number(),
    kind: z.enum(['state', 'carrier', 'alert', 'note']),
    fromState: shipmentState.nullable(),
    toState: shipmentState.nullable(),
    carrierStatus: z.string().nullable(),
    message: z.string(),
    /** Whether the event was stored but did not move the shipment (late or repeated). */
    ignored: z.boolean(),
    occurredAt: z.string(),
    by: z.string().nullable(),
  })
  .meta({ id: 'ShipmentEvent' });
export type ShipmentEvent = z.infer<typeof shipmentEvent>;

export const shipmentSummary = z
  .object({
    id: z.number(),
    reference: z.string(),
    loanId: z.number(),
    loanReference: z.string(),
    loanState: z.string(),
    direction: shipmentDirection,
    state: shipmentState,
    depotId: z.number(),
    depotName: z.string(),
    siteId: z.number(),
    siteName: z.string(),
    hospitalName: z.string(),
    carrier: z.string().nullable(),
    trackingNumber: z.string().nullable(),
    carrierStatus: z.string().nullable(),
    /**
     * The loan's deadline for this leg: outbound `deliverBy` (campus calendar); a return waiting
     * at the campus `returnShipBy` (campus); a return on its way `backAtDepot` (depot calendar).
     */
    dueBy: isoDate,
    shipBy: isoDate,
    eta: isoDate.nullable(),
    risk: shipmentRisk,
    itemsDone: z.number(),
    itemsTotal: z.number(),
    updatedAt: z.string(),
  })
  .meta({ id: 'ShipmentSummary' });
export type ShipmentSummary = z.infer<typeof shipmentSummary>;

/** Limits of shipment photos: size per file, files per receipt and per inspection finding. */
export const shipmentPhotoLimits = {
  /** Largest photo, in bytes (5 MB, as for model photos). */
  maxBytes: 5 * 1024 * 1024,
  /** Photos one receipt may carry. */
  perReceipt: 8,
  /** Photos one inspection finding may carry. */
  perFinding: 4,
  /** Photos waiting on a return leg for the inspection to claim them. */
  pendingPerReturn: 24,
} as const;

/**
 * A photo on a shipment: taken by the hospital on receipt (outbound leg) or by the depot for an
 * inspection finding (return leg; `findingId` once the inspection is recorded).
 */
export const shipmentPhoto = z
  .object({
    id: z.number(),
    kind: z.enum(['receipt', 'finding']),
    findingId: z.number().nullable(),
    /** The finding's category and note, for the caption. */
    caption: z.string().nullable(),
    contentType: z.enum(['image/jpeg', 'image/png', 'image/webp']),
    sizeBytes: z.number(),
    createdAt: z.string(),
    by: z.string().nullable(),
  })
  .meta({ id: 'ShipmentPhoto' });
export type ShipmentPhoto = z.infer<typeof shipmentPhoto>;

export const shipmentPhotoResponse = z
  .object({ photo: shipmentPhoto })
  .meta({ id: 'ShipmentPhotoResponse' });

export const shipmentPhotoParams = z
  .object({ id, photoId: id })
  .meta({ id: 'ShipmentPhotoParams' });

export const shipmentDetail = shipmentSummary
  .extend({
    photos: z.array(shipmentPhoto),
    sscc: z.string().nullable(),
    service: z.string().nullable(),
    outboundId: z.number().nullable(),
    lastCaseDay: isoDate,
    checklist: z.array(checklistItem),
    scans: z.array(shipmentScan),
    events: z.array(shipmentEvent),
    receipt: z
      .object({
        allPresent: z.boolean(),
        missing: z.array(z.string()),
        notes: z.string(),
        at: z.string(),
      })
      .nullable(),
    decontamination: z.object({ method: z.string(), by: z.string(), at: z.string() }).nullable(),
    /** What the signed-in person may do now. */
    actions: z.array(z.string()),
  })
  .meta({ id: 'ShipmentDetail' });
export type ShipmentDetail = z.infer<typeof shipmentDetail>;

/** A place on the map of shipments in transit. */
const mapPlace = z.object({ name: z.string(), lat: z.number(), lng: z.number() });

/** One leg with the carrier, from where to where, for the map of shipments in transit. */
export const shipmentMapEntry = z
  .object({
    id: z.number(),
    reference: z.string(),
    loanReference: z.string(),
    hospitalName: z.string(),
    direction: shipmentDirection,
    state: shipmentState,
    trackingNumber: z.string().nullable(),
    dueBy: isoDate,
    eta: isoDate.nullable(),
    risk: shipmentRisk,
    from: mapPlace,
    to: mapPlace,
  })
  .meta({ id: 'ShipmentMapEntry' });
export type ShipmentMapEntry = z.infer<typeof shipmentMapEntry>;

export const shipmentMapResponse = z
  .object({
    shipments: z.array(shipmentMapEntry),
    /** Legs in transit in all; the map draws at most the first 300. */
    total: z.number(),
  })
  .meta({ id: 'ShipmentMapResponse' });
export type ShipmentMapResponse = z.infer<typeof shipmentMapResponse>;

export const shipmentParams = z.object({ id }).meta({ id: 'ShipmentParams' });

export const shipmentSorts = ['due', '-due', 'updated', '-updated', 'reference', 'state'] as const;
export const shipmentQuery = z
  .object({
    direction: shipmentDirection.optional(),
    state: shipmentState.optional(),
    depotId: id.optional(),
    loanId: id.optional(),
    risk: z.enum(['at_risk', 'overdue', 'late']).optional(),
    sort: z.enum(shipmentSorts).default('due'),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(100).default(25),
  })
  .meta({ id: 'ShipmentQuery' });
export type ShipmentQuery = z.input<typeof shipmentQuery>;

export const shipmentList = z
  .object({
    shipments: z.array(shipmentSummary),
    total: z.number(),
    page: z.number(),
    pageSize: z.number(),
  })
  .meta({ id: 'ShipmentList' });
export type ShipmentList = z.infer<typeof shipmentList>;

export const shipmentResponse = z
  .object({ shipment: shipmentDetail })
  .meta({ id: 'ShipmentResponse' });

export const scanRequest = z
  .object({ raw: z.string().min(1).max(300) })
  .meta({ id: 'ScanRequest' });
export const manualTickRequest = z
  .object({ itemId: id, reason: z.string().trim().min(3).max(500) })
  .meta({ id: 'ManualTickRequest' });

export const gs1ParseRequest = z
  .object({ raw: z.string().min(1).max(300) })
  .meta({ id: 'Gs1ParseRequest' });
export const gs1ParseResponse = z
  .object({
    elements: z.array(z.object({ ai: z.string(), value: z.string(), title: z.string() })),
    gtin: z.string().optional(),
    expiry: isoDate.optional(),
    lot: z.string().optional(),
    serial: z.string().optional(),
    sscc: z.string().optional(),
  })
  .meta({ id: 'Gs1ParseResponse' });

export const handOverRequest = z
  .object({
    carrier: z.string().trim().min(1).max(32).default('wendrow'),
    service: z.enum(['standard', 'express']).default('standard'),
  })
  .meta({ id: 'HandOverRequest' });

export const receiptRequest = z
  .object({
    /** Checklist lines found missing on unpacking (item ids). */
    missingItemIds: z.array(id).max(200).default([]),
    notes: z.string().trim().max(2000).default(''),
  })
  .meta({ id: 'ReceiptRequest' });

export const decontaminationRequest = z
  .object({
    method: z.string().trim().min(3).max(200),
    by: z.string().trim().min(2).max(120),
    at: z.iso.datetime({ offset: true }),
  })
  .meta({ id: 'DecontaminationRequest' });

export const findingCategories = ['damage', 'missing', 'contamination', 'wear', 'other'] as const;
export const inspectionRequest = z
  .object({
    findings: z
      .array(
        z.object({
          unitId: id.optional(),
          itemId: id.optional(),
          category: z.enum(findingCategories),
          note: z.string().trim().min(1).max(1000),
          /** Charge in minor units of the deposit's currency. */
          charge: z.number().int().min(0).max(100_000_000).default(0),
          /** Whether the unit goes to maintenance before its next loan. */
          needsRepair: z.boolean().default(false),
          /** Photos uploaded to the return leg for this finding (each used once). */
          photoIds: z.array(id).max(shipmentPhotoLimits.perFinding).default([]),
        }),
      )
      .max(100),
  })
  .meta({ id: 'InspectionRequest' });
export type InspectionRequest = z.input<typeof inspectionRequest>;

export const settlementResponse = z
  .object({
    settlement: z.object({
      currency: z.string(),
      strategy: z.string(),
      charged: z.number(),
      kept: z.number(),
      returned: z.number(),
      uncovered: z.number(),
    }),
    loanState: z.string(),
  })
  .meta({ id: 'SettlementResponse' });

export const shipmentSettingsRequest = z
  .object({
    /** The lender's GS1 Company Prefix (4–12 digits, leading zeros kept). */
    gs1CompanyPrefix: z.string().regex(/^\d{4,12}$/, 'A GS1 company prefix is 4 to 12 digits.'),
    /** SSCC extension digit 0–9. */
    extensionDigit: z.number().int().min(0).max(9).default(0),
  })
  .meta({ id: 'ShipmentSettingsRequest' });
export const shipmentSettingsResponse = z
  .object({
    settings: z
      .object({ gs1CompanyPrefix: z.string(), extensionDigit: z.number(), nextSerial: z.number() })
      .nullable(),
  })
  .meta({ id: 'ShipmentSettingsResponse' });

export const scanResponse = z
  .object({
    scanId: z.number(),
    item: z.object({ id: z.number(), name: z.string(), scanned: z.number(), quantity: z.number() }),
    parsed: gs1ParseResponse,
  })
  .meta({ id: 'ScanResponse' });
