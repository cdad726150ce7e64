import type { RequestHandler } from 'express';
import multer from 'multer';
import { shipmentPhotoLimits } from '@evalon/contracts';
import { AppError } from '../../errors';
import { photoTooLarge } from '../domain/photos';

/**
 * One photo from the multipart field `photo`, kept in memory. Unlike the shared single-file
 * upload (413 for size), a photo over the limit answers 422 like every other photo the person
 * has to pick again; the type is sniffed from the bytes afterwards, never taken from the client.
 */
export function photoUpload(): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: shipmentPhotoLimits.maxBytes, files: 1, fields: 2, parts: 3 },
  }).single('photo');
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') return next(photoTooLarge());
        return next(
          AppError.field('invalid_upload', 'photo', `The upload was refused: ${err.message}.`),
        );
      }
      if (err) return next(err);
      if (!req.file) {
        return next(
          AppError.field(
            'photo_missing',
            'photo',
            'Choose a photo to upload (form field `photo`).',
          ),
        );
      }
      next();
    });
  };
}
