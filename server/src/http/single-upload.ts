import type { RequestHandler } from 'express';
import multer from 'multer';
import { AppError } from '../errors';

/** What one upload route accepts and how it words its refusals. */
export interface SingleUploadOptions {
  /** Multipart form field that carries the file. */
  field: string;
  /** Largest accepted file, in bytes. */
  maxBytes: number;
  /** Error code and message for a missing file. */
  missing: { code: string; message: string };
  /** Error code and message (413) for a file over `maxBytes`. */
  tooLarge: { code: string; message: string };
}

/**
 * One file from one multipart field, kept in memory, with multer's errors turned into ours:
 * 413 for too large, 422 for a missing or extra file. The content type is sniffed later by the
 * route (never trusted from the client).
 */
export function singleUpload(options: SingleUploadOptions): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: options.maxBytes, files: 1, fields: 5, parts: 10 },
  }).single(options.field);
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) {
        if (!req.file) {
          return next(AppError.field(options.missing.code, options.field, options.missing.message));
        }
        return next();
      }
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          return next(new AppError(413, options.tooLarge.code, options.tooLarge.message));
        }
        return next(
          AppError.field(
            'invalid_upload',
            options.field,
            `The upload was refused: ${err.message}.`,
          ),
        );
      }
      next(err);
    });
  };
}
