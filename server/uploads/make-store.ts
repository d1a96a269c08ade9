/**
 * Picks the photo store the config asks for (local disk or S3). The drivers import the
 * interface from ./store; this factory imports the drivers, so nothing loops.
 */
import type { Config } from '../config';
import type { PhotoStore } from './store';

/**
 * The store the config asks for. The S3 driver (and the AWS SDK with it) loads on first use only,
 * so a server on local disk never pays for it.
 */
export function makePhotoStore(config: Config): PhotoStore {
  if (config.PHOTO_STORE === 's3') {
    let store: PhotoStore | undefined;
    const load = (): PhotoStore => {
      if (!store) {
        const { S3PhotoStore } = require('./s3-store') as typeof import('./s3-store');
        store = new S3PhotoStore({
          bucket: config.PHOTO_S3_BUCKET!,
          endpoint: config.PHOTO_S3_ENDPOINT,
          region: config.PHOTO_S3_REGION,
          accessKeyId: config.PHOTO_S3_ACCESS_KEY_ID,
          secretAccessKey: config.PHOTO_S3_SECRET_ACCESS_KEY,
          forcePathStyle: config.PHOTO_S3_FORCE_PATH_STYLE,
        });
      }
      return store;
    };
    return {
      put: (key, bytes, mime) => load().put(key, bytes, mime),
      get: (key) => load().get(key),
      has: (key) => load().has(key),
    };
  }
  const { LocalPhotoStore } = require('./local-store') as typeof import('./local-store');
  return new LocalPhotoStore(config.PHOTO_DIR);
}
