import {
  Gs1ParseError,
  buildSscc,
  parseElementString,
  type ParsedElementString,
} from '@evalon/gs1';
import type { EntityManager } from 'typeorm';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findItems,
  insertScan,
  serialScanned,
  tickItem,
  tickItemAndTouch,
  updateShipment,
  type ItemRow,
  type ShipmentRow,
} from '../data-access/shipment-repository';
import { requireSide } from './access';
import type { ShipmentsDeps } from './deps';
import { lockForChange } from './handling';
import { recordState } from './history';

/** Why a scan was refused (stable codes for programs; the message is for people). */
export type ScanRefusal =
  | 'unreadable'
  | 'check_digit'
  | 'no_gtin'
  | 'not_on_list'
  | 'expires_before_use'
  | 'lot_missing'
  | 'serial_missing'
  | 'expiry_missing'
  | 'serial_already_scanned'
  | 'quantity_complete';

/** The fields of a parsed element string the API answers with. */
export function parsedView(p: ParsedElementString) {
  return {
    elements: p.elements.map((e) => ({ ai: e.ai, value: e.value, title: e.title })),
    ...(p.gtin ? { gtin: p.gtin } : {}),
    ...(p.expiry ? { expiry: p.expiry } : {}),
    ...(p.lot ? { lot: p.lot } : {}),
    ...(p.serial ? { serial: p.serial } : {}),
    ...(p.sscc ? { sscc: p.sscc } : {}),
  };
}

/**
 * Parses a scan with @evalon/gs1, turning its errors into a 422 with the parser's plain
 * message (`check_digit` for a wrong GTIN or SSCC check digit, `unreadable` otherwise).
 */
export function parseScan(raw: string, now: Date): ParsedElementString {
  try {
    return parseElementString(raw, { now });
  } catch (err) {
    if (err instanceof Gs1ParseError) {
      throw new AppError(
        422,
        err.code === 'check_digit' ? 'check_digit' : 'unreadable',
        err.message,
        {
          gs1Code: err.code,
          ...(err.ai ? { ai: err.ai } : {}),
          ...(err.position !== undefined ? { position: err.position } : {}),
        },
      );
    }
    throw err;
  }
}

/**
 * Decides what a scan does to a checklist (pure): the line it ticks, or why it is refused.
 * Refused when: no GTIN, the GTIN is not on the list, (packing) the item expires before the
 * loan's last case day, a lot / serial / expiry the line must record is missing, the serial was
 * already scanned, or every line with that GTIN is complete.
 */
export function planScan(
  items: readonly ItemRow[],
  parsed: ParsedElementString,
  phase: 'pack' | 'receive',
  lastCaseDay: string,
  serialSeen: boolean,
):
  | { ok: true; item: ItemRow }
  | { ok: false; code: ScanRefusal; message: string; details?: object } {
  if (!parsed.gtin) {
    return {
      ok: false,
      code: 'no_gtin',
      message: 'This barcode carries no GTIN (AI 01); scan the item’s UDI label.',
    };
  }
  const lines = items.filter((i) => i.gtin === parsed.gtin);
  if (lines.length === 0) {
    return {
      ok: false,
      code: 'not_on_list',
      message: `GTIN ${parsed.gtin} is not on this shipment’s checklist. Nothing was ticked.`,
      details: { gtin: parsed.gtin },
    };
  }
  const line = lines.find((i) => i.scanned < i.quantity) ?? lines[0];
  if (phase === 'pack' && parsed.expiry && parsed.expiry < lastCaseDay) {
    return {
      ok: false,
      code: 'expires_before_use',
      message: `${line.name} expires on ${parsed.expiry}, before the loan’s last case day ${lastCaseDay}. Pack another one.`,
      details: { expiry: parsed.expiry, lastCaseDay },
    };
  }
  if (line.needsLot && !parsed.lot) {
    return {
      ok: false,
      code: 'lot_missing',
      message: `${line.name} needs its lot (AI 10) recorded; scan the full UDI label.`,
    };
  }
  if (line.needsSerial && !parsed.serial) {
    return {
      ok: false,
      code: 'serial_missing',
      message: `${line.name} needs its serial number (AI 21) recorded; scan the full UDI label.`,
    };
  }
  if (phase === 'pack' && line.needsExpiry && !parsed.expiry) {
    return {
      ok: false,
      code: 'expiry_missing',
      message: `${line.name} needs its expiry date (AI 17) recorded; scan the full UDI label.`,
    };
  }
  if (serialSeen) {
    return {
      ok: false,
      code: 'serial_already_scanned',
      message: `Serial ${parsed.serial} of ${line.name} was already scanned on this shipment.`,
      details: { serial: parsed.serial },
    };
  }
  const open = lines.find((i) => i.scanned < i.quantity);
  if (!open) {
    return {
      ok: false,
      code: 'quantity_complete',
      message: `${line.name}: all ${lines.reduce((n, i) => n + i.quantity, 0)} already scanned.`,
    };
  }
  return { ok: true, item: open };
}

function scanPhase(s: ShipmentRow): 'pack' | 'receive' {
  if (s.direction === 'outbound' && s.state === 'to_pack') return 'pack';
  if (s.direction === 'return' && ['handed_over', 'in_transit', 'exception'].includes(s.state)) {
    return 'receive';
  }
  throw AppError.conflict(
    'illegal_state',
    s.direction === 'outbound'
      ? 'Scans are taken while the shipment is being packed.'
      : 'Returned items are scanned when the return arrives at the depot.',
    { state: s.state },
  );
}

async function lastCaseDay(m: EntityManager, loanId: number): Promise<string> {
  const [r]: { use_to: string }[] = await m.query(
    'SELECT CAST(use_to AS CHAR) AS use_to FROM loans WHERE id = ?',
    [loanId],
  );
  return r.use_to;
}

/**
 * Records a scan against the checklist (packing outbound, or receiving a return): ticks the
 * line it matches, or refuses it with a plain reason and ticks nothing. Refusals are kept in
 * the shipment's scans (its history) and answered 422 `{code, message, details}`.
 */
export async function recordScan(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  raw: string,
) {
  const outcome = await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { shipment } = await lockForChange(m, shipmentId);
    requireSide(auth, shipment, 'lender');
    const phase = scanPhase(shipment);
    const refuse = async (error: AppError, parsed: ParsedElementString | null) => {
      await insertScan(
        m,
        {
          shipmentId,
          itemId: null,
          phase,
          outcome: 'refused',
          raw: raw.slice(0, 300),
          code: error.code,
          message: error.message,
          gtin: parsed?.gtin ?? null,
          lot: parsed?.lot ?? null,
          serial: parsed?.serial ?? null,
          expiry: parsed?.expiry ?? null,
          serialKey: null,
          actorUserId: auth.user.id,
        },
        now,
      );
      return { error };
    };
    let parsed: ParsedElementString;
    try {
      parsed = parseScan(raw, now);
    } catch (err) {
      if (err instanceof AppError) return refuse(err, null);
      throw err;
    }
    const items = await findItems(m, shipmentId);
    const serialKey = parsed.gtin && parsed.serial ? `${parsed.gtin}:${parsed.serial}` : null;
    const seen = serialKey ? await serialScanned(m, shipmentId, phase, serialKey) : false;
    const plan = planScan(items, parsed, phase, await lastCaseDay(m, shipment.loanId), seen);
    if (!plan.ok) {
      return refuse(new AppError(422, plan.code, plan.message, plan.details), parsed);
    }
    await tickItemAndTouch(m, plan.item.id, shipmentId, now);
    const scanId = await insertScan(
      m,
      {
        shipmentId,
        itemId: plan.item.id,
        phase,
        outcome: 'ticked',
        raw: raw.slice(0, 300),
        code: null,
        message: null,
        gtin: parsed.gtin ?? null,
        lot: parsed.lot ?? null,
        serial: parsed.serial ?? null,
        expiry: parsed.expiry ?? null,
        serialKey,
        actorUserId: auth.user.id,
      },
      now,
    );
    return {
      scanId,
      item: { ...plan.item, scanned: plan.item.scanned + 1 },
      parsed: parsedView(parsed),
    };
  });
  if ('error' in outcome) throw outcome.error;
  return outcome;
}

/** Ticks a line by hand (a label that will not scan); the reason is kept on the line and scan. */
export async function tickByHand(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
  itemId: number,
  reason: string,
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { shipment } = await lockForChange(m, shipmentId);
    requireSide(auth, shipment, 'lender');
    const phase = scanPhase(shipment);
    const item = (await findItems(m, shipmentId)).find((i) => i.id === itemId);
    if (!item)
      throw AppError.field('unknown_item', 'itemId', 'That line is not on this checklist.');
    if (item.scanned >= item.quantity) {
      throw new AppError(422, 'quantity_complete', `${item.name} is complete already.`);
    }
    await tickItem(m, itemId, reason);
    await insertScan(
      m,
      {
        shipmentId,
        itemId,
        phase,
        outcome: 'manual',
        raw: null,
        code: null,
        message: reason,
        gtin: item.gtin,
        lot: null,
        serial: null,
        expiry: null,
        serialKey: null,
        actorUserId: auth.user.id,
      },
      now,
    );
  });
}

/**
 * Packs an outbound leg once every required line is complete: gives it an SSCC (AI 00) from
 * the lender's GS1 company prefix and its next serial reference, and moves it to `packed`.
 */
export async function pack(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
): Promise<void> {
  await deps.dataSource.transaction('READ COMMITTED', async (m) => {
    const now = deps.now();
    const { shipment } = await lockForChange(m, shipmentId);
    requireSide(auth, shipment, 'lender');
    if (shipment.direction !== 'outbound' || shipment.state !== 'to_pack') {
      throw AppError.conflict('illegal_state', 'Only a shipment being packed can be packed.', {
        state: shipment.state,
      });
    }
    const missing = (await findItems(m, shipmentId)).filter(
      (i) => i.required && i.scanned < i.quantity,
    );
    if (missing.length > 0) {
      throw AppError.conflict(
        'checklist_incomplete',
        `Still to scan: ${missing.map((i) => `${i.name} (${i.quantity - i.scanned})`).join(', ')}.`,
        {
          missing: missing.map((i) => ({
            itemId: i.id,
            name: i.name,
            left: i.quantity - i.scanned,
          })),
        },
      );
    }
    const [settings]: {
      gs1_company_prefix: string;
      sscc_extension_digit: number;
      next_serial: string;
    }[] = await m.query('SELECT * FROM shipment_settings WHERE lender_id = ? FOR UPDATE', [
      shipment.lenderId,
    ]);
    if (!settings) {
      throw AppError.conflict(
        'gs1_prefix_missing',
        'Set the lender’s GS1 company prefix (shipment settings) before packing: the SSCC is built from it.',
      );
    }
    const prefix = settings.gs1_company_prefix;
    // The next serial reference whose SSCC is not taken yet (a prefix entered twice, or a
    // counter reset, must not stop packing; the unique key on `sscc` stays the last guard).
    let serial = Number(settings.next_serial);
    let sscc = '';
    for (let tries = 0; tries < 1_000; tries += 1, serial += 1) {
      sscc = buildSscc({
        extensionDigit: Number(settings.sscc_extension_digit),
        companyPrefix: prefix,
        serialReference: String(serial).padStart(16 - prefix.length, '0'),
      });
      const taken: unknown[] = await m.query('SELECT id FROM shipments WHERE sscc = ? LIMIT 1', [
        sscc,
      ]);
      if (taken.length === 0) break;
    }
    await m.query(
      'UPDATE shipment_settings SET next_serial = ?, updated_at = ? WHERE lender_id = ?',
      [serial + 1, now, shipment.lenderId],
    );
    await updateShipment(m, shipmentId, { state: 'packed', sscc }, now);
    await recordState(
      m,
      shipmentId,
      'to_pack',
      'packed',
      `Packed; SSCC ${sscc}.`,
      auth.user.id,
      now,
    );
  });
}

/** The lender's SSCC settings, or null. */
export async function getShipmentSettings(m: EntityManager, lenderId: number) {
  const [r]: { gs1_company_prefix: string; sscc_extension_digit: number; next_serial: string }[] =
    await m.query('SELECT * FROM shipment_settings WHERE lender_id = ?', [lenderId]);
  return r
    ? {
        gs1CompanyPrefix: r.gs1_company_prefix,
        extensionDigit: Number(r.sscc_extension_digit),
        nextSerial: Number(r.next_serial),
      }
    : null;
}

/** Sets the lender's GS1 company prefix and SSCC extension digit (the serial counter stays). */
export async function saveShipmentSettings(
  m: EntityManager,
  lenderId: number,
  input: { gs1CompanyPrefix: string; extensionDigit: number },
  now: Date,
): Promise<void> {
  await m.query(
    `INSERT INTO shipment_settings (lender_id, gs1_company_prefix, sscc_extension_digit, next_serial, updated_at)
     VALUES (?, ?, ?, 1, ?)
     ON DUPLICATE KEY UPDATE gs1_company_prefix = VALUES(gs1_company_prefix),
       sscc_extension_digit = VALUES(sscc_extension_digit), updated_at = VALUES(updated_at)`,
    [lenderId, input.gs1CompanyPrefix, input.extensionDigit, now],
  );
}
