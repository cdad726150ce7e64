import { renderGs1128, renderGs1DataMatrix } from '@evalon/gs1/render';
import PDFDocument from 'pdfkit';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { findItems, findScans, findShipment } from '../data-access/shipment-repository';
import { rolesOn } from './access';
import type { ShipmentsDeps } from './deps';

const CAUTION =
  'Loaned devices are treated as contaminated on arrival and are decontaminated before return, ' +
  'following the manufacturer’s instructions for use and local sterile-processing policy. ' +
  'Evalon documents the shipment; it does not certify the devices.';

/**
 * The packing slip of a packed outbound leg as a PDF (A4): where from and to, the loan's dates,
 * the SSCC as a GS1-128 barcode and as a GS1 DataMatrix (both rendered by @evalon/gs1 with
 * bwip-js), and every checklist line with the lots, serials and expiries scanned into it.
 */
export async function packingSlip(
  deps: ShipmentsDeps,
  auth: AuthContext,
  shipmentId: number,
): Promise<{ filename: string; pdf: Buffer }> {
  const m = deps.dataSource.manager;
  const s = await findShipment(m, shipmentId);
  if (!s || !rolesOn(auth, s).sees) {
    throw AppError.notFound('shipment_not_found', 'There is no such shipment.');
  }
  if (!s.sscc) {
    throw AppError.conflict('not_packed', 'The packing slip exists once the shipment is packed.');
  }
  const [info]: Record<string, string>[] = await m.query(
    `SELECT l.reference AS loan_reference, CAST(l.use_from AS CHAR) AS use_from,
            CAST(l.use_to AS CHAR) AS use_to, d.name AS depot_name, d.address_line AS depot_address,
            d.city AS depot_city, d.country AS depot_country, c.name AS site_name,
            c.address_line AS site_address, c.city AS site_city, c.country AS site_country,
            h.name AS hospital_name, o.name AS lender_name
       FROM loans l JOIN sites d ON d.id = ? JOIN sites c ON c.id = ?
       JOIN organisations h ON h.id = l.hospital_id JOIN organisations o ON o.id = l.lender_id
      WHERE l.id = ?`,
    [s.depotId, s.siteId, s.loanId],
  );
  const items = await findItems(m, shipmentId);
  const scans = (await findScans(m, shipmentId)).filter(
    (x) => x.phase === 'pack' && x.outcome !== 'refused',
  );
  const element = `(00)${s.sscc}`;
  const [linear, matrix] = await Promise.all([
    renderGs1128(element, { scale: 2 }),
    renderGs1DataMatrix(element, { scale: 3 }),
  ]);

  const doc = new PDFDocument({
    size: 'A4',
    margin: 48,
    info: { Title: `Packing slip ${s.reference}` },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<void>((resolve) => doc.on('end', () => resolve()));

  doc.fontSize(18).text(`Packing slip ${s.reference}`);
  doc
    .fontSize(10)
    .fillColor('#444748')
    .text(`Loan ${info.loan_reference} · ${info.lender_name} → ${info.hospital_name}`);
  doc.moveDown(0.8).fillColor('#191c1d');
  const top = doc.y;
  doc.fontSize(9).text('From', 48, top).fontSize(11);
  doc
    .text(info.depot_name)
    .text(info.depot_address)
    .text(`${info.depot_city}, ${info.depot_country}`);
  doc.fontSize(9).text('To', 300, top).fontSize(11);
  doc
    .text(info.site_name, 300)
    .text(info.site_address, 300)
    .text(`${info.site_city}, ${info.site_country}`, 300);
  doc.moveDown(0.8);
  doc
    .fontSize(10)
    .text(
      `Ship by ${s.shipBy} · deliver by ${s.dueBy} · cases ${info.use_from} to ${info.use_to}`,
      48,
    );
  doc.moveDown(0.6);
  const codeTop = doc.y;
  doc.image(linear, 48, codeTop, { height: 70 });
  doc.image(matrix, 420, codeTop, { width: 80 });
  doc.y = codeTop + 92;
  doc.fontSize(9).text(`SSCC ${element}`, 48);
  doc.moveDown(0.8);

  doc.fontSize(12).text('Contents', 48);
  doc.moveDown(0.3);
  for (const i of items) {
    const lines = scans.filter((x) => Number(x.item_id) === i.id);
    const facts = lines
      .map((x) =>
        x.outcome === 'manual'
          ? `ticked by hand: ${x.message}`
          : [
              x.lot && `lot ${x.lot}`,
              x.serial && `serial ${x.serial}`,
              x.expiry_text && `exp. ${x.expiry_text}`,
            ]
              .filter(Boolean)
              .join(', '),
      )
      .filter(Boolean);
    doc
      .fontSize(10)
      .fillColor('#191c1d')
      .text(`${i.scanned}/${i.quantity}  ${i.name}${i.gtin ? `  (01)${i.gtin}` : ''}`, {
        continued: false,
      });
    if (facts.length > 0)
      doc
        .fontSize(9)
        .fillColor('#444748')
        .text(`      ${facts.join('; ')}`);
  }
  doc.moveDown(1).fontSize(8).fillColor('#444748').text(CAUTION, { width: 500 });
  doc.end();
  await done;
  return { filename: `packing-slip-${s.reference}.pdf`, pdf: Buffer.concat(chunks) };
}
