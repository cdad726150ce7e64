import express from 'express';
import { z } from 'zod';
import {
  decontaminationRequest,
  errorBody,
  handOverRequest,
  id,
  gs1ParseRequest,
  gs1ParseResponse,
  inspectionRequest,
  manualTickRequest,
  receiptRequest,
  scanRequest,
  scanResponse,
  shipmentSettingsRequest,
  shipmentSettingsResponse,
  settlementResponse,
  shipmentList,
  shipmentParams,
  shipmentQuery,
  shipmentResponse,
  shipmentPhotoParams,
  shipmentPhotoResponse,
  shipmentMapResponse,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { AppError } from '../../errors';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import type { ShipmentsDeps } from '../domain/deps';
import { attestDecontamination, confirmReceipt, handOver, receiveReturn } from '../domain/handling';
import { recordInspection, settleLoan } from '../domain/inspection';
import {
  assertLenderOfLoan,
  assertShipmentSide,
  getShipment,
  listShipments,
} from '../domain/queries';
import { handleTrackingEvent } from '../domain/tracking';
import { packingSlip } from '../domain/packing-slip';
import { addShipmentPhoto, readShipmentPhoto } from '../domain/photos';
import { shipmentsInTransit } from '../domain/transit-map';
import { photoUpload } from './photo-upload';
import {
  getShipmentSettings,
  pack,
  parseScan,
  parsedView,
  recordScan,
  saveShipmentSettings,
  tickByHand,
} from '../domain/scanning';

const error = (description: string) => ({ description, schema: errorBody });
const loanParams = z.object({ id }).meta({ id: 'LoanIdParams' });
const receiveAnswer = z
  .object({ shipment: shipmentResponse.shape.shipment, missing: z.array(z.string()) })
  .meta({ id: 'ReceiveResponse' });
const trackingAnswer = z
  .object({ received: z.literal(true), outcome: z.string() })
  .meta({ id: 'CarrierWebhookResponse' });

/** `/api/shipments`: the board, one shipment, and the steps of the journey. */
export function shipmentRoutes(deps: ShipmentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/shipments', 'Shipments', catalogue);
  const detail = async (req: express.Request, shipmentId: number) =>
    getShipment(deps.dataSource.manager, currentAuth(req), shipmentId, deps.now());

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Shipments you may see, filtered, sorted and paged',
      description:
        'Lender people see their lender’s legs, hospital people their hospital’s. Filters: ' +
        '`direction`, `state`, `depotId`, `loanId`, `risk` (`at_risk`, `overdue`, or `late` for ' +
        'both). Sort by `due` (deadline), `updated`, `reference` or `state`.',
      access: { authenticated: true },
      query: shipmentQuery,
      responses: { 200: { description: 'One page.', schema: shipmentList } },
    },
    async ({ req, res, query }) => {
      res.json(await listShipments(deps.dataSource.manager, currentAuth(req), query, deps.now()));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/in-transit',
      summary: 'Legs with the carrier now, from where to where, for the map',
      description:
        'Handed over, in transit or with a carrier exception, both directions, with the depot’s ' +
        'and the campus’s coordinates and the risk. Lender people (and the platform admin); ' +
        'at most 300, by deadline, with `total` saying how many there are.',
      access: { authenticated: true },
      responses: {
        200: { description: 'The legs.', schema: shipmentMapResponse },
        403: error('Not a lender’s coordinator or fleet manager.'),
      },
    },
    async ({ req, res }) => {
      res.json(await shipmentsInTransit(deps.dataSource.manager, currentAuth(req), deps.now()));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id',
      summary: 'One shipment: checklist, scans, timeline, ETA and risk',
      access: { authenticated: true },
      params: shipmentParams,
      responses: {
        200: { description: 'The shipment.', schema: shipmentResponse },
        404: error('No such shipment, or not yours.'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ shipment: await detail(req, params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/scans',
      summary: 'Scan a GS1 element string against the checklist',
      description:
        'Any form a scanner sends: raw with FNC1 as GS (0x1D), behind a symbology identifier ' +
        '(`]d2`, `]C1`), or the bracketed human-readable form. Ticks the matching line (packing ' +
        'outbound, or receiving a return) or refuses with nothing ticked: `unreadable`, ' +
        '`check_digit`, `no_gtin`, `not_on_list`, `expires_before_use` (AI 17 before the ' +
        'loan’s last case day), `lot_missing`, `serial_missing`, `expiry_missing`, ' +
        '`serial_already_scanned`, `quantity_complete`. Refusals are kept in the shipment’s scans.',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'lender'),
      body: scanRequest,
      responses: {
        201: { description: 'Ticked.', schema: scanResponse },
        409: error('Not in a state that takes scans.'),
        422: error('Refused, with `code`, `message` and `details`.'),
      },
    },
    async ({ req, res, params, body }) => {
      const r = await recordScan(deps, currentAuth(req), params.id, body.raw);
      res.status(201).json({
        scanId: r.scanId,
        item: {
          id: r.item.id,
          name: r.item.name,
          scanned: r.item.scanned,
          quantity: r.item.quantity,
        },
        parsed: r.parsed,
      });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/manual-ticks',
      summary: 'Tick a checklist line by hand (a reason is required)',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'lender'),
      body: manualTickRequest,
      responses: {
        200: { description: 'Ticked.', schema: shipmentResponse },
        422: error('No reason, unknown line, or the line is complete.'),
      },
    },
    async ({ req, res, params, body }) => {
      await tickByHand(deps, currentAuth(req), params.id, body.itemId, body.reason);
      res.json({ shipment: await detail(req, params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/pack',
      summary: 'Close the checklist: SSCC from the lender’s GS1 company prefix, state packed',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'lender'),
      responses: {
        200: { description: 'Packed.', schema: shipmentResponse },
        409: error('`checklist_incomplete` (details list what is left) or `gs1_prefix_missing`.'),
      },
    },
    async ({ req, res, params }) => {
      await pack(deps, currentAuth(req), params.id);
      res.json({ shipment: await detail(req, params.id) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/packing-slip.pdf',
      summary: 'The packing slip (PDF) with the SSCC as GS1-128 and GS1 DataMatrix',
      access: { authenticated: true },
      params: shipmentParams,
      responses: {
        200: { description: 'application/pdf' },
        409: error('Not packed yet.'),
      },
    },
    async ({ req, res, params }) => {
      const slip = await packingSlip(deps, currentAuth(req), params.id);
      res
        .type('application/pdf')
        .set('Content-Disposition', `inline; filename="${slip.filename}"`)
        .send(slip.pdf);
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/hand-over',
      summary: 'Book the carrier and hand the shipment over',
      description:
        'Outbound: the lender once packed. Return: the hospital’s buyer once the decontamination ' +
        'is recorded. Books with the carrier (idempotency key from the shipment id) and answers ' +
        'the shipment with its tracking number.',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'by-direction'),
      body: handOverRequest,
      responses: {
        200: { description: 'Handed over.', schema: shipmentResponse },
        409: error('`illegal_state` or `decontamination_required`.'),
        502: error('`carrier_unavailable` or `carrier_refused`.'),
      },
    },
    async ({ req, res, params, body }) => {
      await handOver(deps, currentAuth(req), params.id, body);
      res.json({ shipment: await detail(req, params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/receipt',
      summary: 'The hospital confirms receipt (missing items, condition notes)',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'buyer'),
      body: receiptRequest,
      responses: {
        200: { description: 'Recorded.', schema: shipmentResponse },
        409: error('Not delivered yet, or confirmed already.'),
      },
    },
    async ({ req, res, params, body }) => {
      await confirmReceipt(deps, currentAuth(req), params.id, body);
      res.json({ shipment: await detail(req, params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/decontamination',
      summary: 'The hospital attests decontamination before the return ships',
      description:
        'Method, by whom and when. Loaned devices are treated as contaminated on arrival and ' +
        'decontaminated before return per the manufacturer’s instructions for use and local ' +
        'sterile-processing policy; Evalon records the attestation.',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'buyer'),
      body: decontaminationRequest,
      responses: {
        200: { description: 'Recorded.', schema: shipmentResponse },
        409: error('Not a return waiting to ship.'),
      },
    },
    async ({ req, res, params, body }) => {
      await attestDecontamination(deps, currentAuth(req), params.id, body);
      res.json({ shipment: await detail(req, params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/photos',
      summary: 'Add a receipt or inspection photo (multipart field `photo`)',
      description:
        'Outbound, delivered and not yet confirmed: the hospital’s buyer adds receipt photos ' +
        '(at most 8). Return, received at the depot and not yet inspected: the coordinator adds ' +
        'photos that findings then name in `photoIds` (at most 4 each). JPEG, PNG or WebP as ' +
        'the bytes say, at most 5 MB; anything else (SVG, HTML, PDF, an empty file) answers 422 ' +
        'and stores nothing.',
      access: { authenticated: true },
      params: shipmentParams,
      before: [photoUpload()],
      responses: {
        201: { description: 'Stored.', schema: shipmentPhotoResponse },
        403: error('The other side’s step.'),
        409: error('`illegal_state` or `too_many_photos`.'),
        422: error(
          '`photo_missing`, `photo_empty`, `photo_too_large` or `unsupported_photo_type`.',
        ),
      },
    },
    async ({ req, res, params }) => {
      const photo = await addShipmentPhoto(deps, currentAuth(req), params.id, req.file!.buffer);
      res.status(201).json({ photo });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/photos/:photoId',
      summary: 'A shipment photo (people who may see the shipment)',
      description:
        'Served with the type sniffed at upload, `X-Content-Type-Options: nosniff`, inline (an ' +
        'image only) and a sandboxing Content-Security-Policy.',
      access: { authenticated: true },
      params: shipmentPhotoParams,
      responses: { 200: { description: 'The image bytes.' }, 404: error('No such photo.') },
    },
    async ({ req, res, params }) => {
      const photo = await readShipmentPhoto(deps, currentAuth(req), params.id, params.photoId);
      res.setHeader('Content-Type', photo.contentType);
      res.setHeader('X-Content-Type-Options', 'nosniff');
      // Only JPEG, PNG or WebP are ever stored, so inline is an image; the policy keeps it inert.
      res.setHeader('Content-Disposition', `inline; filename="${photo.filename}"`);
      res.setHeader('Content-Security-Policy', "default-src 'none'; sandbox");
      res.setHeader('Cache-Control', 'private, max-age=3600');
      res.end(photo.data);
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/receive',
      summary: 'The depot receives a return (missing items listed)',
      access: { authenticated: true },
      params: shipmentParams,
      scope: (req, params) =>
        assertShipmentSide(deps.dataSource.manager, currentAuth(req), params.id, 'lender'),
      responses: {
        200: { description: 'Received.', schema: receiveAnswer },
        409: error('Not a return on its way back.'),
      },
    },
    async ({ req, res, params }) => {
      const { missing } = await receiveReturn(deps, currentAuth(req), params.id);
      res.json({ shipment: await detail(req, params.id), missing });
    },
  );

  return api;
}

/** `/api/gs1/parse`: what a scan says, for the scan field's preview. */
export function gs1Routes(deps: ShipmentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/gs1', 'Shipments', catalogue);
  api.route(
    {
      method: 'post',
      path: '/parse',
      summary: 'Parse a GS1 element string (any scanner form)',
      access: { authenticated: true },
      body: gs1ParseRequest,
      responses: {
        200: { description: 'Parsed.', schema: gs1ParseResponse },
        422: error('`check_digit` or `unreadable`, with the parser’s message.'),
      },
    },
    async ({ res, body }) => {
      res.json(parsedView(parseScan(body.raw, deps.now())));
    },
  );
  return api;
}

/** `/api/lenders/:orgId/shipment-settings`: the GS1 company prefix the SSCCs are built from. */
export function shipmentSettingsRoutes(
  deps: ShipmentsDeps,
  catalogue: CatalogueEntry[],
): ApiRouter {
  const api = new ApiRouter('/api/lenders', 'Shipments', catalogue);
  const params = z.object({ orgId: id });
  api.route(
    {
      method: 'get',
      path: '/:orgId/shipment-settings',
      summary: 'The lender’s SSCC settings',
      access: { roles: ['fleet_manager', 'coordinator', 'admin'], org: 'param:orgId' },
      params,
      responses: { 200: { description: 'Settings.', schema: shipmentSettingsResponse } },
    },
    async ({ res, params: p }) => {
      res.json({ settings: await getShipmentSettings(deps.dataSource.manager, p.orgId) });
    },
  );
  api.route(
    {
      method: 'put',
      path: '/:orgId/shipment-settings',
      summary: 'Set the lender’s GS1 company prefix and SSCC extension digit',
      access: { roles: ['fleet_manager', 'admin'], org: 'param:orgId' },
      params,
      body: shipmentSettingsRequest,
      responses: { 200: { description: 'Saved.', schema: shipmentSettingsResponse } },
    },
    async ({ res, params: p, body }) => {
      await saveShipmentSettings(deps.dataSource.manager, p.orgId, body, deps.now());
      res.json({ settings: await getShipmentSettings(deps.dataSource.manager, p.orgId) });
    },
  );
  return api;
}

/** `/api/loans/:id/inspection` and `/settle`: the end of the journey. */
export function loanInspectionRoutes(deps: ShipmentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/loans', 'Shipments', catalogue);
  api.route(
    {
      method: 'post',
      path: '/:id/inspection',
      summary: 'Record the return inspection (findings, charges, repairs)',
      access: { authenticated: true },
      params: loanParams,
      scope: (req, params) =>
        assertLenderOfLoan(deps.dataSource.manager, currentAuth(req), params.id),
      body: inspectionRequest,
      responses: {
        204: { description: 'Recorded.' },
        409: error('`illegal_state` (not every return received) or `already_inspected`.'),
      },
    },
    async ({ req, res, params, body }) => {
      await recordInspection(deps, currentAuth(req), params.id, body.findings);
      res.status(204).end();
    },
  );
  api.route(
    {
      method: 'post',
      path: '/:id/settle',
      summary: 'Settle the deposit and close the loan',
      description:
        'Deducts the inspection charges from the deposit (never more than was paid; the rest is ' +
        '`uncovered`), refunds or releases the remainder through the payment provider with ' +
        'idempotency keys, closes the loan and e-mails the buyer a statement. Repeating it ' +
        'answers the same settlement; while one runs, 409 `settlement_in_progress`.',
      access: { authenticated: true },
      params: loanParams,
      scope: (req, params) =>
        assertLenderOfLoan(deps.dataSource.manager, currentAuth(req), params.id),
      responses: {
        200: { description: 'Settled.', schema: settlementResponse },
        409: error('`not_inspected` or `settlement_in_progress`.'),
      },
    },
    async ({ req, res, params }) => {
      res.json(await settleLoan(deps, currentAuth(req), params.id));
    },
  );
  return api;
}

/**
 * `/api/webhooks/carrier`: the carrier's signed tracking events. Mounted before the JSON parser
 * and the session (the signature covers the raw bytes; there is no session).
 */
export function carrierWebhookRoutes(deps: ShipmentsDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/webhooks', 'Shipments', catalogue);
  api.router.use(express.raw({ type: 'application/json', limit: '256kb' }));
  api.route(
    {
      method: 'post',
      path: '/carrier',
      summary: 'Carrier tracking events (signed webhook)',
      description:
        'Header `Carrier-Signature: t=<unix>,v1=<hex HMAC-SHA256 of "<t>.<raw body>">`, 300 s ' +
        'tolerance; a bad signature answers 400 and changes nothing. Each event id is stored ' +
        'once (`duplicate`); an event behind the status already reached is kept on the timeline ' +
        'but moves nothing (`stale`); an unknown tracking number answers 200 `unknown_tracking` ' +
        'so the carrier stops retrying.',
      access: { public: true },
      responses: {
        200: { description: 'Handled.', schema: trackingAnswer },
        400: error('`invalid_signature` or `invalid_payload`.'),
      },
    },
    async ({ req, res }) => {
      if (!Buffer.isBuffer(req.body)) {
        throw AppError.badRequest('invalid_payload', 'Send the event as application/json.');
      }
      const event = deps.carrier.verifyWebhook(req.body, req.get('carrier-signature'));
      const outcome = await handleTrackingEvent(deps, event);
      res.json({ received: true, outcome });
    },
  );
  return api;
}
