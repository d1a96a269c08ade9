import { EntitySchema } from 'typeorm';
import type { Reading } from './reading';
import type { Round } from './round';

export const PHOTO_STATUSES = ['pending', 'stored'] as const;
export type PhotoStatus = (typeof PHOTO_STATUSES)[number];

/**
 * A photo of a round (of a reading's gauge face, or for a check). The row comes with the push
 * (status pending, announced sha256/mime/bytes); the bytes come by POST /api/photos/:id, are
 * re-encoded without metadata and stored with a thumbnail (status stored; mime, width and height
 * then describe the stored image).
 */
export interface Photo {
  id: string;
  roundId: string;
  readingId: string | null;
  checkId: string | null;
  /** SHA-256 (hex) of the bytes as the device announced and uploaded them. */
  sha256: string;
  mime: string;
  /** Size of the upload as announced, bytes. */
  bytes: number;
  width: number | null;
  height: number | null;
  storageKey: string | null;
  thumbKey: string | null;
  status: PhotoStatus;
  receivedAt: Date;
  storedAt: Date | null;
  round?: Round;
  reading?: Reading | null;
}

export const PhotoEntity = new EntitySchema<Photo>({
  name: 'Photo',
  tableName: 'photos',
  columns: {
    id: { type: 'uuid', primary: true, primaryKeyConstraintName: 'pk_photos' },
    roundId: { name: 'round_id', type: 'uuid' },
    readingId: { name: 'reading_id', type: 'uuid', nullable: true },
    checkId: { name: 'check_id', type: 'varchar', length: 64, nullable: true },
    sha256: { type: 'varchar', length: 64 },
    mime: { type: 'varchar', length: 32 },
    bytes: { type: 'int' },
    width: { type: 'int', nullable: true },
    height: { type: 'int', nullable: true },
    storageKey: { name: 'storage_key', type: 'varchar', length: 200, nullable: true },
    thumbKey: { name: 'thumb_key', type: 'varchar', length: 200, nullable: true },
    status: { type: 'enum', enum: [...PHOTO_STATUSES], enumName: 'photo_status', default: 'pending' },
    receivedAt: { name: 'received_at', type: 'timestamptz', default: () => 'now()' },
    storedAt: { name: 'stored_at', type: 'timestamptz', nullable: true },
  },
  relations: {
    round: {
      type: 'many-to-one',
      target: 'Round',
      onDelete: 'CASCADE',
      joinColumn: { name: 'round_id', foreignKeyConstraintName: 'fk_photos_round' },
    },
    reading: {
      type: 'many-to-one',
      target: 'Reading',
      nullable: true,
      onDelete: 'CASCADE',
      joinColumn: { name: 'reading_id', foreignKeyConstraintName: 'fk_photos_reading' },
    },
  },
  indices: [{ name: 'ix_photos_round', columns: ['roundId'] }],
});
