/**
 * Photo intake with sharp: checks the bytes are an image of an accepted kind, re-encodes them
 * (which drops EXIF, GPS, XMP and IPTC: sharp writes no metadata unless asked), turns the pixels
 * upright first (EXIF orientation would be lost with the metadata), and makes a thumbnail of at
 * most THUMB_PX on the long side.
 */
import sharp from 'sharp';
import { AppError } from '../errors';

export const THUMB_PX = 320;
/** Decompression-bomb guard: 50 megapixels is more than any phone camera writes today. */
export const MAX_INPUT_PIXELS = 50_000_000;

const ACCEPTED = ['jpeg', 'png', 'webp', 'heif'] as const;
type Accepted = (typeof ACCEPTED)[number];

export interface ProcessedPhoto {
  bytes: Buffer;
  mime: string;
  ext: string;
  width: number;
  height: number;
  thumb: Buffer;
  thumbWidth: number;
  thumbHeight: number;
}

const unsupported = (message: string) => new AppError(415, 'unsupported_media_type', message);

export async function processPhoto(input: Buffer): Promise<ProcessedPhoto> {
  let format: string | undefined;
  try {
    format = (await sharp(input, { limitInputPixels: MAX_INPUT_PIXELS }).metadata()).format;
  } catch {
    throw unsupported('The upload is not an image this server can read; send a JPEG, PNG or WebP photo');
  }
  if (!format || !(ACCEPTED as readonly string[]).includes(format)) {
    throw unsupported(`Photos must be JPEG, PNG, WebP or HEIC; this upload is ${format ?? 'of an unknown kind'}`);
  }
  const kind = format as Accepted;
  // Output: the same kind, except HEIC/HEIF, which browsers do not show: it becomes JPEG.
  const out = kind === 'heif' ? 'jpeg' : kind;
  try {
    const base = sharp(input, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' }).rotate();
    const encoded =
      out === 'jpeg'
        ? base.jpeg({ quality: 85, mozjpeg: true })
        : out === 'png'
          ? base.png({ compressionLevel: 9 })
          : base.webp({ quality: 85 });
    const main = await encoded.toBuffer({ resolveWithObject: true });
    const thumb = await sharp(main.data)
      .resize(THUMB_PX, THUMB_PX, { fit: 'inside', withoutEnlargement: true })
      .flatten({ background: '#ffffff' })
      .jpeg({ quality: 75 })
      .toBuffer({ resolveWithObject: true });
    return {
      bytes: main.data,
      mime: `image/${out}`,
      ext: out === 'jpeg' ? 'jpg' : out,
      width: main.info.width,
      height: main.info.height,
      thumb: thumb.data,
      thumbWidth: thumb.info.width,
      thumbHeight: thumb.info.height,
    };
  } catch (e) {
    if (e instanceof AppError) throw e;
    const why = e instanceof Error ? e.message.split('\n')[0] : String(e);
    throw unsupported(
      kind === 'heif'
        ? `This HEIC/HEIF photo cannot be decoded here (${why}); set the camera to JPEG ("Most compatible") and send it again`
        : `The ${kind} image cannot be decoded (${why})`,
    );
  }
}
