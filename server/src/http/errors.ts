import type { ErrorRequestHandler, RequestHandler } from 'express';
import { z } from 'zod';
import { AppError } from '../errors';

/** Field messages keyed by dotted path, plus messages about the whole request. */
export function validationDetails(error: z.ZodError): {
  fieldErrors: Record<string, string[]>;
  formErrors: string[];
} {
  const fieldErrors: Record<string, string[]> = {};
  const formErrors: string[] = [];
  for (const issue of error.issues) {
    if (issue.path.length === 0) {
      formErrors.push(issue.message);
      continue;
    }
    const key = issue.path.map(String).join('.');
    (fieldErrors[key] ??= []).push(issue.message);
  }
  return { fieldErrors, formErrors };
}

/** Where a request part failed validation; bodies answer 422, paths and queries 400. */
export type RequestPart = 'body' | 'params' | 'query';

/** Turns a zod failure on one part of the request into an {@link AppError}. */
export function validationError(part: RequestPart, error: z.ZodError): AppError {
  const details = validationDetails(error);
  if (part === 'body') {
    return new AppError(422, 'validation_failed', 'Some fields need attention.', details);
  }
  return new AppError(
    400,
    'invalid_request',
    `The request ${part === 'params' ? 'path' : 'query'} is not valid.`,
    details,
  );
}

/** 404 in our JSON shape for anything under /api that no route answered. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(
    AppError.notFound(
      'not_found',
      `There is no ${req.method} ${req.baseUrl}${req.path} in the Evalon API.`,
    ),
  );
};

interface HttpLikeError {
  status?: number;
  statusCode?: number;
  type?: string;
  expose?: boolean;
  message?: string;
}

/** Maps errors from body-parser and similar http-errors to our codes. */
function fromHttpError(err: HttpLikeError): AppError | null {
  const status = err.status ?? err.statusCode;
  if (typeof status !== 'number' || status < 400 || status >= 500) return null;
  switch (err.type) {
    case 'entity.parse.failed':
      return new AppError(400, 'malformed_json', 'The request body is not valid JSON.');
    case 'entity.too.large':
      return new AppError(413, 'payload_too_large', 'The request body is too large.');
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new AppError(
        415,
        'unsupported_encoding',
        'The request body encoding is not supported.',
      );
    default:
      return new AppError(
        status,
        'bad_request',
        err.expose && err.message ? err.message : 'The request is not valid.',
      );
  }
}

/**
 * The one error middleware: known errors keep their status and words; anything else is a 500
 * with a generic message (the details go to the log with the request id).
 */
export const errorHandler: ErrorRequestHandler = (err: unknown, req, res, next) => {
  if (res.headersSent) {
    next(err);
    return;
  }
  let appError: AppError;
  if (err instanceof AppError) appError = err;
  else if (err instanceof z.ZodError) appError = validationError('body', err);
  else
    appError =
      fromHttpError(err as HttpLikeError) ??
      new AppError(
        500,
        'internal_error',
        'Something went wrong on our side. Try again in a moment.',
      );

  if (appError.status >= 500) req.log?.error({ err }, 'request failed');
  for (const [name, value] of Object.entries(appError.headers ?? {})) res.setHeader(name, value);
  const body: { error: { code: string; message: string; details?: unknown } } = {
    error: { code: appError.code, message: appError.message },
  };
  if (appError.details !== undefined) body.error.details = appError.details;
  res.status(appError.status).json(body);
};
