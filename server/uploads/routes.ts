/**
 * /api/photos/:id — the bytes of photos announced in a push.
 *   POST /api/photos/:id        multipart/form-data, field "photo" (≤ PHOTO_MAX_BYTES) → PhotoUploadResponse
 *   GET  /api/photos/:id        the stored (re-encoded, metadata-free) photo, to site members
 *   GET  /api/photos/:id/thumb  its thumbnail (JPEG, ≤ 320 px)
 * The id must be a UUID (anything else, "../x" included, is a 400 before any lookup).
 */
import type { Request, RequestHandler } from 'express';
import { Router } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { authOf, requireAuth } from '../auth/middleware';
import type { Config } from '../config';
import { deps } from '../context';
import { AppError } from '../errors';
import { photoForReading, photoForUpload, storePhoto } from './service';
import type { PhotoStore } from './store';
import type { Photo } from '../entities';

interface PhotoLocals {
  photo?: Photo;
}

const PhotoId = z.uuid({ error: 'Must be a photo UUID' });

function photoId(req: Request): string {
  const r = PhotoId.safeParse(req.params.id);
  if (!r.success)
    throw new AppError(400, 'validation', 'Invalid photo id: must be a UUID', [
      { path: 'id', message: 'Must be a photo UUID' },
    ]);
  return r.data;
}

/** multer in memory with the configured limit; its errors become our 400/413s. */
function receiveOne(config: Config): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: config.PHOTO_MAX_BYTES, files: 1, fields: 5, fieldSize: 1024, parts: 6 },
  }).single('photo');
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) {
      return next(
        new AppError(415, 'unsupported_media_type', 'Send the photo as multipart/form-data in the field "photo"'),
      );
    }
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          return next(
            new AppError(413, 'too_large', `The photo is larger than the limit of ${config.PHOTO_MAX_BYTES} bytes`, {
              limit: config.PHOTO_MAX_BYTES,
            }),
          );
        }
        return next(
          new AppError(
            400,
            'bad_request',
            `Upload refused: ${err.message}${err.field ? ` (field "${err.field}")` : ''}; send one file in the field "photo"`,
          ),
        );
      }
      next(err);
    });
  };
}

export function photosRouter(config: Config, store: PhotoStore): Router {
  const r = Router();
  r.use(requireAuth);

  r.post(
    '/:id',
    async (req, res, next) => {
      // who and what before the bytes: an unannounced or foreign photo is refused unread
      (res.locals as PhotoLocals).photo = await photoForUpload(deps(req).dataSource, authOf(req).userId, photoId(req));
      next();
    },
    receiveOne(config),
    async (req, res) => {
      if (!req.file) throw new AppError(400, 'bad_request', 'No file in the field "photo"');
      const photo = (res.locals as PhotoLocals).photo!;
      const out = await storePhoto(deps(req).dataSource, store, photo, req.file.buffer);
      res.status(out.created ? 201 : 200).json(out);
    },
  );

  const serve =
    (which: 'photo' | 'thumb'): RequestHandler =>
    async (req, res) => {
      const photo = await photoForReading(deps(req).dataSource, authOf(req).userId, photoId(req));
      const key = which === 'photo' ? photo.storageKey : photo.thumbKey;
      const obj = key ? await store.get(key) : null;
      if (!obj) throw new AppError(404, 'not_found', 'The photo is not in the store');
      res.setHeader('Content-Type', which === 'photo' ? photo.mime : 'image/jpeg');
      if (obj.bytes !== undefined) res.setHeader('Content-Length', String(obj.bytes));
      // The bytes of an id never change once stored.
      res.setHeader('Cache-Control', 'private, max-age=31536000, immutable');
      res.setHeader('X-Content-Type-Options', 'nosniff');
      obj.body.on('error', (err) => {
        req.log?.error({ err }, 'photo stream failed');
        res.destroy(err);
      });
      obj.body.pipe(res);
    };
  r.get('/:id', serve('photo'));
  r.get('/:id/thumb', serve('thumb'));
  return r;
}
