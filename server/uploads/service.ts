/**
 * Photo use-cases: receive the bytes of an announced photo, and find one to read.
 *
 * Upload order: the photo must be announced (a push stored its row) on a round the caller may
 * write; a stored photo answers stored:true again without touching anything; the bytes' SHA-256
 * must equal the announced one (409 otherwise: the device sent the wrong file or a torn one); the
 * bytes must be an accepted image (415); then the re-encoded photo and its thumbnail are stored
 * and the row marked stored.
 */
import { createHash } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { PhotoUploadResponse } from '../../shared/api/sync';
import type { ErrorCode } from '../../shared/api/errors';
import { MembershipEntity, PhotoEntity, RoundEntity, type Photo } from '../entities';
import { AppError } from '../errors';
import { mayWriteRound } from '../sync/access';
import { processPhoto } from './images';
import { photoKey, thumbKey, type PhotoStore } from './store';

/** 409: the bytes do not match the photo announced in the push. */
const CONFLICT: ErrorCode = 'conflict';

/**
 * The one 404 of a photo the caller cannot see: unknown, or on a site they are not a member of
 * (the two answer byte for byte alike, so an id of another site reveals nothing).
 */
const photoNotFound = () => new AppError(404, 'not_found', 'Photo not found');
/** The one 404 of a photo the caller cannot upload to: not announced, or on another site. */
const uploadNotFound = () =>
  new AppError(
    404,
    'not_found',
    'No photo with this id was announced on your sites: push its round with the photo first',
  );

async function photoWithRound(ds: DataSource, id: string) {
  const photo = await ds.getRepository(PhotoEntity).findOneBy({ id });
  if (!photo) return null;
  const round = await ds.getRepository(RoundEntity).findOneByOrFail({ id: photo.roundId });
  return { photo, round };
}

/** The photo row if the caller may upload it: announced on a round they may write; 404 otherwise. */
export async function photoForUpload(ds: DataSource, userId: string, id: string): Promise<Photo> {
  const found = await photoWithRound(ds, id);
  if (!found) throw uploadNotFound();
  const m = await ds.getRepository(MembershipEntity).findOneBy({ userId, siteId: found.round.siteId });
  if (!m) throw uploadNotFound();
  if (!mayWriteRound(found.round, userId, m.role)) {
    throw new AppError(403, 'forbidden', 'Only the technician of the round (or a site admin) uploads its photos');
  }
  return found.photo;
}

/** The photo row if the caller is a member of its round's site (and the bytes are there); 404 otherwise. */
export async function photoForReading(ds: DataSource, userId: string, id: string): Promise<Photo> {
  const found = await photoWithRound(ds, id);
  if (!found) throw photoNotFound();
  const m = await ds.getRepository(MembershipEntity).findOneBy({ userId, siteId: found.round.siteId });
  if (!m) throw photoNotFound();
  if (found.photo.status !== 'stored')
    throw new AppError(404, 'not_found', 'The photo has been announced but not uploaded yet');
  return found.photo;
}

export async function storePhoto(
  ds: DataSource,
  store: PhotoStore,
  photo: Photo,
  bytes: Buffer,
): Promise<PhotoUploadResponse> {
  if (photo.status === 'stored') return uploaded(photo, false);
  const sha = createHash('sha256').update(bytes).digest('hex');
  if (sha !== photo.sha256) {
    throw new AppError(
      409,
      CONFLICT,
      `The upload's SHA-256 ${sha} is not the announced ${photo.sha256}; send the photo's own bytes`,
      {
        announced: photo.sha256,
        received: sha,
      },
    );
  }
  const img = await processPhoto(bytes);
  const key = photoKey(photo.id, img.ext);
  const tkey = thumbKey(photo.id);
  try {
    await store.put(key, img.bytes, img.mime);
    await store.put(tkey, img.thumb, 'image/jpeg');
  } catch (err) {
    throw photoStoreError(photo.id, err);
  }
  await ds.getRepository(PhotoEntity).update(
    { id: photo.id },
    {
      status: 'stored',
      storageKey: key,
      thumbKey: tkey,
      mime: img.mime,
      width: img.width,
      height: img.height,
      storedAt: new Date(),
    },
  );
  return {
    id: photo.id,
    stored: true,
    created: true,
    mime: img.mime,
    width: img.width,
    height: img.height,
    thumbWidth: img.thumbWidth,
    thumbHeight: img.thumbHeight,
  };
}

/** errno codes of a full disk or quota (POSIX), answered 507 Insufficient Storage (RFC 4918 §11.5). */
const FULL = new Set(['ENOSPC', 'EDQUOT']);

/**
 * A photo store that cannot take the bytes: 507 when it is full, else 503 (not writable, not
 * reachable); either way the photo stays announced (its round and readings are stored already)
 * and the device's photo queue uploads it again later. The cause goes to the log with the request.
 */
export function photoStoreError(photoId: string, err: unknown): AppError {
  const code =
    typeof (err as { code?: unknown })?.code === 'string'
      ? (err as { code: string }).code
      : ((err as { name?: string })?.name ?? 'unknown');
  const full = FULL.has(code);
  const why = full ? 'the photo store is full' : `the photo store cannot be written (${code})`;
  const e = new AppError(
    full ? 507 : 503,
    'storage_unavailable',
    `Photo ${photoId} was not stored: ${why}; its round and readings are kept, upload the photo again later`,
    {
      photoId,
      reason: code,
    },
  );
  (e as { cause?: unknown }).cause = err;
  return e;
}

function uploaded(photo: Photo, created: boolean): PhotoUploadResponse {
  const w = photo.width ?? 0;
  const h = photo.height ?? 0;
  const scale = Math.min(1, 320 / Math.max(w, h, 1));
  return {
    id: photo.id,
    stored: true,
    created,
    mime: photo.mime,
    width: w,
    height: h,
    thumbWidth: Math.round(w * scale),
    thumbHeight: Math.round(h * scale),
  };
}
