/**
 * Photo store on S3-compatible object storage through @aws-sdk/client-s3 (AWS S3, MinIO, Ceph…;
 * tested against s3rver). Path-style addressing by default, which most S3-compatible servers need.
 * Request checksums only where the API requires them: several S3-compatible servers do not
 * understand the SDK's newer default CRC headers.
 */
import { Readable } from 'node:stream';
import {
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { assertSafeKey, type PhotoStore, type StoredObject } from './store';

export interface S3StoreOptions {
  bucket: string;
  endpoint?: string;
  region: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  forcePathStyle: boolean;
}

const notFound = (e: unknown) =>
  e instanceof S3ServiceException &&
  (e.name === 'NoSuchKey' || e.name === 'NotFound' || e.$metadata?.httpStatusCode === 404);

export class S3PhotoStore implements PhotoStore {
  readonly client: S3Client;
  readonly bucket: string;

  constructor(o: S3StoreOptions) {
    this.bucket = o.bucket;
    this.client = new S3Client({
      endpoint: o.endpoint,
      region: o.region,
      forcePathStyle: o.forcePathStyle,
      credentials:
        o.accessKeyId && o.secretAccessKey
          ? { accessKeyId: o.accessKeyId, secretAccessKey: o.secretAccessKey }
          : undefined,
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    });
  }

  async put(key: string, bytes: Buffer, mime: string): Promise<void> {
    assertSafeKey(key);
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.bucket,
        Key: key,
        Body: bytes,
        ContentType: mime,
        ContentLength: bytes.length,
      }),
    );
  }

  async get(key: string): Promise<StoredObject | null> {
    assertSafeKey(key);
    try {
      const r = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }));
      if (!r.Body) return null;
      const body =
        r.Body instanceof Readable ? r.Body : Readable.from(Buffer.from(await r.Body.transformToByteArray()));
      return { body, bytes: r.ContentLength, mime: r.ContentType };
    } catch (e) {
      if (notFound(e)) return null;
      throw e;
    }
  }

  async has(key: string): Promise<boolean> {
    assertSafeKey(key);
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: key }));
      return true;
    } catch (e) {
      if (notFound(e)) return false;
      throw e;
    }
  }

  destroy(): void {
    this.client.destroy();
  }
}
