import { z } from 'zod';
import {
  availabilityPreview,
  availabilitySettings,
  credential,
  credentialInput,
  errorBody,
  id,
  proctorProfileInput,
  proctorProfileResponse,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { validationError } from '../../http/errors';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { singleUpload } from '../../http/single-upload';
import { previewMyAvailability } from '../domain/availability';
import type { ProctorDeps } from '../domain/deps';
import {
  addMyCredential,
  getMyProfile,
  readMyCredentialFile,
  saveMyAvailability,
  saveMyProfile,
} from '../domain/profile';

const error = (description: string) => ({ description, schema: errorBody });
/** Largest credential PDF accepted. */
export const maxCredentialBytes = 10 * 1024 * 1024;

/** `/api/proctors/me`: the signed-in proctor's profile, credentials and availability. */
export function proctorRoutes(deps: ProctorDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/proctors', 'Proctors', catalogue);

  api.route(
    {
      method: 'get',
      path: '/me',
      summary: 'Your proctor profile (null before you first save it)',
      access: { roles: ['proctor'] },
      responses: { 200: { description: 'The profile.', schema: proctorProfileResponse } },
    },
    async ({ req, res }) => {
      res.json({ profile: await getMyProfile(deps, currentAuth(req)) });
    },
  );

  api.route(
    {
      method: 'put',
      path: '/me',
      summary: 'Create or update your proctor profile and declared experience per model',
      access: { roles: ['proctor'] },
      body: proctorProfileInput,
      responses: {
        200: { description: 'Saved.', schema: proctorProfileResponse },
        422: error('`validation_failed`, `unknown_model`.'),
      },
    },
    async ({ req, res, body }) => {
      res.json({ profile: await saveMyProfile(deps, currentAuth(req), body) });
    },
  );

  api.route(
    {
      method: 'put',
      path: '/me/availability',
      summary: 'Replace your weekly pattern, exceptions and blackout days',
      description:
        'Rules are RFC 5545 recurrences (a `DTSTART` line and an `RRULE` line) in your home zone, ' +
        'read with the same code the candidate search uses; an unreadable rule answers 422 ' +
        'naming it (`rules.0`).',
      access: { roles: ['proctor'] },
      body: availabilitySettings,
      responses: {
        200: { description: 'Saved.', schema: proctorProfileResponse },
        404: error('No profile yet.'),
        422: error('`validation_failed`, `invalid_availability`.'),
      },
    },
    async ({ req, res, body }) => {
      res.json({ profile: await saveMyAvailability(deps, currentAuth(req), body) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/me/availability/preview',
      summary: 'The next 8 weeks (or one month), day by day, as the candidate search sees them',
      access: { roles: ['proctor'] },
      query: z.object({
        month: z
          .string()
          .regex(/^(20\d\d)-(0[1-9]|1[0-2])$/, 'Give the month as YYYY-MM (2000–2099).')
          .optional(),
      }),
      responses: {
        200: { description: 'Days.', schema: availabilityPreview },
        404: error('No profile yet.'),
        400: error('`month` is not YYYY-MM.'),
      },
    },
    async ({ req, res, query }) => {
      res.json(await previewMyAvailability(deps, currentAuth(req), query.month));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/me/credentials',
      summary: 'Your credentials with their standing (valid, expiring within 60 days, expired)',
      access: { roles: ['proctor'] },
      responses: {
        200: { description: 'Credentials.', schema: z.object({ items: z.array(credential) }) },
      },
    },
    async ({ req, res }) => {
      const profile = await getMyProfile(deps, currentAuth(req));
      res.json({ items: profile?.credentials ?? [] });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/me/credentials',
      summary: 'Record a licence, hospital privileges or a certificate with its PDF (≤ 10 MB)',
      description:
        'multipart/form-data: `file` (a PDF, recognised from its bytes), `kind`, `title`, ' +
        '`jurisdiction` (ISO 3166-1 country or ISO 3166-2 subdivision), `validFrom`, `validTo`. ' +
        'Evalon records credentials; privileging remains the hospital’s decision.',
      access: { roles: ['proctor'] },
      before: [
        singleUpload({
          field: 'file',
          maxBytes: maxCredentialBytes,
          missing: { code: 'file_missing', message: 'Attach the PDF in the form field “file”.' },
          tooLarge: {
            code: 'document_too_large',
            message: 'The file is larger than 10 MB; attach a smaller PDF.',
          },
        }),
      ],
      responses: {
        201: { description: 'Recorded.', schema: z.object({ credential }) },
        404: error('No profile yet.'),
        413: error('`document_too_large`.'),
        415: error('`unsupported_document_type`: not a PDF.'),
        422: error('`file_missing`, `validation_failed`.'),
      },
    },
    async ({ req, res }) => {
      const fields = credentialInput.safeParse(req.body ?? {});
      if (!fields.success) throw validationError('body', fields.error);
      const saved = await addMyCredential(deps, currentAuth(req), fields.data, req.file!);
      res.status(201).json({ credential: saved });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/me/credentials/:credentialId/file',
      summary: 'Download one of your credential PDFs',
      access: { roles: ['proctor'] },
      params: z.object({ credentialId: id }),
      responses: { 200: { description: 'The PDF.' }, 404: error('No such file.') },
    },
    async ({ req, res, params }) => {
      const file = await readMyCredentialFile(deps, currentAuth(req), params.credentialId);
      res
        .status(200)
        .set({
          'Content-Type': 'application/pdf',
          'Content-Disposition': `attachment; filename="${file.fileName.replace(/[^\x20-\x7e]/g, '_')}"`,
          'X-Content-Type-Options': 'nosniff',
          'Cache-Control': 'private, no-store',
        })
        .send(file.data);
    },
  );
  return api;
}
