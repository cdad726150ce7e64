import { singleUpload } from '../../http/single-upload';
import type { RequestHandler } from 'express';
import {
  depotInput,
  depotList,
  depotParams,
  depotResponse,
  errorBody,
  holdList,
  holdResponse,
  holdsQuery,
  lenderParams,
  maintenanceHoldInput,
  modelInput,
  modelPage,
  modelParams,
  modelPhotoParams,
  modelQuery,
  modelResponse,
  photoParams,
  photoResponse,
  shippingSettings,
  shippingSettingsResponse,
  unitHoldParams,
  unitInput,
  unitPage,
  unitParams,
  unitQuery,
  unitResponse,
  unitUpdate,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import type { CatalogDeps } from '../domain/deps';
import {
  changeDepot,
  createDepot,
  lenderDepots,
  saveShippingSettings,
  shippingSettingsOf,
} from '../domain/depots';
import {
  assertModelChangeable,
  changeModel,
  createModel,
  getModel,
  listModels,
} from '../domain/models';
import { addPhoto, maxPhotoBytes, readPhoto, removePhoto } from '../domain/photos';
import {
  addMaintenanceHold,
  assertUnitChangeable,
  changeUnit,
  createUnit,
  getUnit,
  listUnitsFor,
  removeMaintenanceHold,
  unitHolds,
} from '../domain/units';

const error = (description: string) => ({ description, schema: errorBody });
const fleetManagers = { roles: ['fleet_manager'] } as const;
const lenderStaff = { roles: ['fleet_manager', 'coordinator'] } as const;

/** One photo from the multipart field `photo` (at most 5 MB). */
function photoUpload(): RequestHandler {
  return singleUpload({
    field: 'photo',
    maxBytes: maxPhotoBytes,
    missing: { code: 'photo_missing', message: 'Attach the photo in the form field “photo”.' },
    tooLarge: {
      code: 'photo_too_large',
      message: 'The photo is larger than 5 MB; use a smaller one.',
    },
  });
}

/** `/api/lenders/:orgId/...`: a lender's depots and shipping settings. */
export function lenderRoutes(deps: CatalogDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/lenders', 'Catalogue', catalogue);

  api.route(
    {
      method: 'get',
      path: '/:orgId/depots',
      summary: 'A lender’s depots, with postal code and region',
      access: { roles: ['fleet_manager', 'coordinator', 'admin'], org: 'param:orgId' },
      params: lenderParams,
      responses: {
        200: { description: 'By name.', schema: depotList },
        404: error('No such lender.'),
      },
    },
    async ({ res, params }) => {
      res.json({ items: await lenderDepots(deps, params.orgId) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:orgId/depots',
      summary: 'Add a depot',
      description:
        'The country picks the public-holiday calendar that shipping days skip; the cut-off is ' +
        'the last hand-over to the carrier on a ship date, in the depot’s time zone.',
      access: { ...fleetManagers, org: 'param:orgId' },
      params: lenderParams,
      body: depotInput,
      responses: {
        201: { description: 'Added.', schema: depotResponse },
        422: error('A field is not valid (e.g. `unknown_holiday_calendar`).'),
      },
    },
    async ({ res, params, body }) => {
      res.status(201).json({ depot: await createDepot(deps, params.orgId, body) });
    },
  );

  api.route(
    {
      method: 'put',
      path: '/:orgId/depots/:siteId',
      summary: 'Change a depot',
      description: 'Loans already booked keep their milestones; new searches use the new values.',
      access: { ...fleetManagers, org: 'param:orgId' },
      params: depotParams,
      body: depotInput,
      responses: {
        200: { description: 'Changed.', schema: depotResponse },
        404: error('No such depot of this lender.'),
      },
    },
    async ({ res, params, body }) => {
      res.json({ depot: await changeDepot(deps, params.orgId, params.siteId, body) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:orgId/shipping-settings',
      summary: 'A lender’s shipping settings (the product defaults until it saves its own)',
      access: { roles: ['fleet_manager', 'coordinator', 'admin'], org: 'param:orgId' },
      params: lenderParams,
      responses: { 200: { description: 'Settings.', schema: shippingSettingsResponse } },
    },
    async ({ res, params }) => {
      res.json(await shippingSettingsOf(deps, params.orgId));
    },
  );

  api.route(
    {
      method: 'put',
      path: '/:orgId/shipping-settings',
      summary: 'Save a lender’s shipping settings',
      description:
        'Distance bands (km → transit business days, last band open), customs days across ' +
        'borders, hospital lead days (regular and first loan of a model), decontamination and ' +
        'depot turnaround days. Used by every later search and booking of this lender’s units.',
      access: { ...fleetManagers, org: 'param:orgId' },
      params: lenderParams,
      body: shippingSettings,
      responses: {
        200: { description: 'Saved.', schema: shippingSettingsResponse },
        422: error('A field is not valid.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json(await saveShippingSettings(deps, currentAuth(req), params.orgId, body));
    },
  );
  return api;
}

/** `/api/models` and `/api/photos`: the catalogue of models and their photos. */
export function modelRoutes(deps: CatalogDeps, catalogue: CatalogueEntry[]): ApiRouter[] {
  const api = new ApiRouter('/api/models', 'Catalogue', catalogue);

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Models of every lender, filtered',
      description:
        '`category`, `q` (name or description contains), `compatibleWith` (models compatible ' +
        'with that model), `lenderId`; one page (`page`, `size`, `sort=field,dir`), by lender ' +
        'then name unless `sort` says otherwise. Deposits are estimates until the lender ' +
        'confirms a loan.',
      access: { authenticated: true },
      query: modelQuery,
      responses: { 200: { description: 'One page of models.', schema: modelPage } },
    },
    async ({ req, res, query }) => {
      res.json(await listModels(deps, currentAuth(req), query));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id',
      summary: 'One model',
      access: { authenticated: true },
      params: modelParams,
      responses: {
        200: { description: 'The model.', schema: modelResponse },
        404: error('No such model.'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ model: await getModel(deps, currentAuth(req), params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/',
      summary: 'List a new model',
      description:
        'Compatibility is kept symmetric and limited to the same lender’s models. GTINs must ' +
        'carry a valid GS1 check digit.',
      access: fleetManagers,
      body: modelInput,
      responses: {
        201: { description: 'Listed.', schema: modelResponse },
        403: error('Not a fleet manager of that lender.'),
        409: error('`model_name_taken`.'),
        422: error('A field is not valid.'),
      },
    },
    async ({ req, res, body }) => {
      res.status(201).json({ model: await createModel(deps, currentAuth(req), body) });
    },
  );

  api.route(
    {
      method: 'put',
      path: '/:id',
      summary: 'Change a model (replaces packing list and compatibility)',
      access: fleetManagers,
      params: modelParams,
      scope: (req, params) => assertModelChangeable(deps, currentAuth(req), params.id),
      body: modelInput,
      responses: {
        200: { description: 'Changed.', schema: modelResponse },
        403: error('Not a fleet manager of the model’s lender.'),
        404: error('No such model.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ model: await changeModel(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/photos',
      summary: 'Add a photo (multipart form field `photo`, JPEG, PNG or WebP, at most 5 MB)',
      description:
        'The type is read from the file’s bytes, not its name. Stored under a random name ' +
        'outside the web root.',
      access: fleetManagers,
      params: modelParams,
      // Before the upload is read: another lender's fleet manager sends no bytes to disk.
      scope: (req, params) => assertModelChangeable(deps, currentAuth(req), params.id),
      before: [photoUpload()],
      responses: {
        201: { description: 'Stored.', schema: photoResponse },
        409: error('`too_many_photos`.'),
        413: error('`photo_too_large`.'),
        415: error('`unsupported_photo_type`: not a JPEG, PNG or WebP.'),
        422: error('`photo_missing`.'),
      },
    },
    async ({ req, res, params }) => {
      const photo = await addPhoto(deps, currentAuth(req), params.id, req.file!.buffer);
      res.status(201).json({ photo });
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/:id/photos/:photoId',
      summary: 'Delete a photo',
      access: fleetManagers,
      params: modelPhotoParams,
      responses: { 204: { description: 'Deleted.' }, 404: error('No such photo of this model.') },
    },
    async ({ req, res, params }) => {
      await removePhoto(deps, currentAuth(req), params.id, params.photoId);
      res.status(204).end();
    },
  );

  const photos = new ApiRouter('/api/photos', 'Catalogue', catalogue);
  photos.route(
    {
      method: 'get',
      path: '/:id',
      summary: 'A model photo (signed-in people only)',
      description: 'Served with the type sniffed at upload and `X-Content-Type-Options: nosniff`.',
      access: { authenticated: true },
      params: photoParams,
      responses: { 200: { description: 'The image bytes.' }, 404: error('No such photo.') },
    },
    async ({ res, params }) => {
      const { data, contentType } = await readPhoto(deps, params.id);
      res.setHeader('Content-Type', contentType);
      res.setHeader('X-Content-Type-Options', 'nosniff');
      res.setHeader('Content-Disposition', 'inline');
      // Private: only signed-in people may see photos, so shared caches must not keep them.
      res.setHeader('Cache-Control', 'private, max-age=3600');
      res.end(data);
    },
  );
  return [api, photos];
}

/** `/api/units`: units and their holds. */
export function unitRoutes(deps: CatalogDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/units', 'Catalogue', catalogue);

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Units of a model or a lender',
      description:
        'The lender’s own people see every status; others see units that are not retired. ' +
        'Without a filter, a person who works for one lender gets that lender’s fleet. ' +
        '`q` matches serial number, UDI-DI or model; one page (`page`, `size`, `sort=field,dir`), ' +
        'by model then serial number unless `sort` says otherwise.',
      access: { authenticated: true },
      query: unitQuery,
      responses: {
        200: { description: 'One page of units.', schema: unitPage },
        400: error('`filter_required`.'),
      },
    },
    async ({ req, res, query }) => {
      res.json(await listUnitsFor(deps, currentAuth(req), query));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id',
      summary: 'One unit',
      access: { authenticated: true },
      params: unitParams,
      responses: {
        200: { description: 'The unit.', schema: unitResponse },
        404: error('No such unit.'),
      },
    },
    async ({ req, res, params }) => {
      res.json({ unit: await getUnit(deps, currentAuth(req), params.id) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/',
      summary: 'Add a unit to a model',
      description:
        'Serial numbers are unique per model; the UDI device identifier is a 14-digit GTIN with ' +
        'a valid check digit; the base depot must be one of the lender’s depots.',
      access: fleetManagers,
      body: unitInput,
      responses: {
        201: { description: 'Added.', schema: unitResponse },
        403: error('Not a fleet manager of the model’s lender.'),
        409: error('`serial_taken`.'),
        422: error('A field is not valid.'),
      },
    },
    async ({ req, res, body }) => {
      res.status(201).json({ unit: await createUnit(deps, currentAuth(req), body) });
    },
  );

  api.route(
    {
      method: 'put',
      path: '/:id',
      summary: 'Change a unit (serial, UDI, base depot, status)',
      description:
        'A unit in maintenance or retired drops out of new searches; loans already booked keep ' +
        'their holds.',
      access: fleetManagers,
      params: unitParams,
      scope: (req, params) => assertUnitChangeable(deps, currentAuth(req), params.id, 'fleet'),
      body: unitUpdate,
      responses: {
        200: { description: 'Changed.', schema: unitResponse },
        409: error('`serial_taken`.'),
      },
    },
    async ({ req, res, params, body }) => {
      res.json({ unit: await changeUnit(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/:id/holds',
      summary: 'A unit’s calendar: loan footprints and maintenance',
      description:
        'Dates are in the unit’s depot calendar, both ends included. Hospitals see other ' +
        'hospitals’ loans as “Reserved”, without names.',
      access: { authenticated: true },
      params: unitParams,
      query: holdsQuery,
      responses: { 200: { description: 'By start.', schema: holdList } },
    },
    async ({ req, res, params, query }) => {
      res.json({ items: await unitHolds(deps, currentAuth(req), params.id, query) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/holds',
      summary: 'Block a unit for maintenance',
      access: lenderStaff,
      params: unitParams,
      scope: (req, params) => assertUnitChangeable(deps, currentAuth(req), params.id, 'lender'),
      body: maintenanceHoldInput,
      responses: {
        201: { description: 'Blocked.', schema: holdResponse },
        409: error('`hold_conflict`: overlaps a loan or another maintenance hold.'),
      },
    },
    async ({ req, res, params, body }) => {
      res
        .status(201)
        .json({ hold: await addMaintenanceHold(deps, currentAuth(req), params.id, body) });
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/:id/holds/:holdId',
      summary: 'Remove a maintenance hold',
      access: lenderStaff,
      params: unitHoldParams,
      responses: {
        204: { description: 'Removed.' },
        409: error('`loan_hold`: loan holds go with their loan.'),
      },
    },
    async ({ req, res, params }) => {
      await removeMaintenanceHold(deps, currentAuth(req), params.id, params.holdId);
      res.status(204).end();
    },
  );
  return api;
}
