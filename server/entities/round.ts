import { EntitySchema } from 'typeorm';
import { ROUND_STATUSES, type Dismissal, type RoundStatus } from '../../shared/api/sync';
import type { RouteVersion } from './route';
import type { Site } from './site';
import type { User } from './user';
import { numberFromText } from './transformers';

export { ROUND_STATUSES, type RoundStatus };

/**
 * One walk of a route version. The id is the device's UUID. Device times are evidence;
 * `receivedAt` and `serverSeq` (from the global sync_seq) are the server's order.
 * `clientClockSkewMs` = server receive time − the batch's `sentAt` (positive: the device is behind).
 */
export interface Round {
  id: string;
  siteId: string;
  routeVersionId: string;
  technicianId: string;
  startedAtDevice: Date;
  finishedAtDevice: Date | null;
  receivedAt: Date;
  status: RoundStatus;
  dismissals: Dismissal[];
  clientClockSkewMs: number;
  deviceId: string;
  serverSeq: number;
  /** When the analysis of the round's current readings was stored (server/analysis); null: not analysed yet. */
  analysedAt: Date | null;
  /** The cycle model version the device held when it recorded the round, when it says (for the analysis' mismatch flag). */
  deviceModelVersion: string | null;
  site?: Site;
  routeVersion?: RouteVersion;
  technician?: User;
}

export const RoundEntity = new EntitySchema<Round>({
  name: 'Round',
  tableName: 'rounds',
  columns: {
    id: { type: 'uuid', primary: true, primaryKeyConstraintName: 'pk_rounds' },
    siteId: { name: 'site_id', type: 'uuid' },
    routeVersionId: { name: 'route_version_id', type: 'uuid' },
    technicianId: { name: 'technician_id', type: 'uuid' },
    startedAtDevice: { name: 'started_at_device', type: 'timestamptz' },
    finishedAtDevice: { name: 'finished_at_device', type: 'timestamptz', nullable: true },
    receivedAt: { name: 'received_at', type: 'timestamptz', default: () => 'now()' },
    status: { type: 'enum', enum: [...ROUND_STATUSES], enumName: 'round_status' },
    dismissals: { type: 'jsonb', default: () => `'[]'` },
    clientClockSkewMs: { name: 'client_clock_skew_ms', type: 'bigint', transformer: numberFromText },
    deviceId: { name: 'device_id', type: 'varchar', length: 128 },
    serverSeq: {
      name: 'server_seq',
      type: 'bigint',
      default: () => "nextval('sync_seq')",
      insert: false,
      update: false,
      transformer: numberFromText,
    },
    analysedAt: { name: 'analysed_at', type: 'timestamptz', nullable: true },
    deviceModelVersion: { name: 'device_model_version', type: 'varchar', length: 64, nullable: true },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_rounds_site' },
    },
    routeVersion: {
      type: 'many-to-one',
      target: 'RouteVersion',
      joinColumn: { name: 'route_version_id', foreignKeyConstraintName: 'fk_rounds_route_version' },
    },
    technician: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'technician_id', foreignKeyConstraintName: 'fk_rounds_technician' },
    },
  },
  indices: [
    { name: 'ix_rounds_site_seq', columns: ['siteId', 'serverSeq'] },
    { name: 'ix_rounds_route_version', columns: ['routeVersionId'] },
    { name: 'ix_rounds_technician', columns: ['technicianId'] },
  ],
});
