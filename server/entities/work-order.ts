import { EntitySchema } from 'typeorm';
import { PRESSURE_REFERENCES, type PressureRef } from '../../shared/units';
import {
  WORK_ORDER_KINDS,
  WORK_ORDER_STATUSES,
  type WorkOrderKind,
  type WorkOrderStatus,
} from '../../shared/api/work-orders';
import type { FindingRow } from './analysis';
import type { Instrument } from './instrument';
import type { Site } from './site';
import type { PlantUnit } from './plant-unit';
import type { User } from './user';

export { WORK_ORDER_KINDS, WORK_ORDER_STATUSES, type WorkOrderKind, type WorkOrderStatus };

/** Statuses a work order is finished in; any other counts as open (one open order per target and kind). */
export const CLOSED_STATUSES: readonly WorkOrderStatus[] = ['done', 'cancelled'];

/**
 * A work order of a site, opened by an analysis' finding (server/work-orders). Its target is an
 * instrument or, for a balance that does not close, a piece of equipment of the unit's model.
 * `number` counts per site from 1 (shown "WO-0001", kept in `code` for search); the counter row
 * (work_order_counters) is locked in the transaction that takes the next number. At most one open
 * order per (site, instrument, kind) and per (unit, equipment, kind): partial unique indexes.
 */
export interface WorkOrder {
  id: string;
  siteId: string;
  unitId: string;
  number: number;
  code: string;
  kind: WorkOrderKind;
  status: WorkOrderStatus;
  /** 1 most urgent … 3 */
  priority: number;
  title: string;
  instrumentId: string | null;
  instrumentTag: string | null;
  equipmentRef: string | null;
  assigneeId: string | null;
  /** YYYY-MM-DD */
  dueDate: string | null;
  /** YYYY-MM-DD */
  scheduledFor: string | null;
  cancelReason: string | null;
  mergedIntoId: string | null;
  reopenCount: number;
  openedAt: Date;
  updatedAt: Date;
  closedAt: Date | null;
  site?: Site;
  unit?: PlantUnit;
  instrument?: Instrument | null;
  assignee?: User | null;
  mergedInto?: WorkOrder | null;
}

const statusEnum = { type: 'enum', enum: [...WORK_ORDER_STATUSES], enumName: 'work_order_status' } as const;
// the partial unique indexes' predicate, as the migration wrote it, from the one list of closed statuses
const OPEN_WHERE = `"status" NOT IN (${CLOSED_STATUSES.map((s) => `'${s}'`).join(', ')})`;

export const WorkOrderEntity = new EntitySchema<WorkOrder>({
  name: 'WorkOrder',
  tableName: 'work_orders',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_work_orders' },
    siteId: { name: 'site_id', type: 'uuid' },
    unitId: { name: 'unit_id', type: 'uuid' },
    number: { type: 'int' },
    code: { type: 'varchar', length: 16 },
    kind: { type: 'enum', enum: [...WORK_ORDER_KINDS], enumName: 'work_order_kind' },
    status: { ...statusEnum, default: 'open' },
    priority: { type: 'smallint' },
    title: { type: 'varchar', length: 300 },
    instrumentId: { name: 'instrument_id', type: 'uuid', nullable: true },
    instrumentTag: { name: 'instrument_tag', type: 'varchar', length: 40, nullable: true },
    equipmentRef: { name: 'equipment_ref', type: 'varchar', length: 64, nullable: true },
    assigneeId: { name: 'assignee_id', type: 'uuid', nullable: true },
    dueDate: { name: 'due_date', type: 'date', nullable: true },
    scheduledFor: { name: 'scheduled_for', type: 'date', nullable: true },
    cancelReason: { name: 'cancel_reason', type: 'text', nullable: true },
    mergedIntoId: { name: 'merged_into_id', type: 'uuid', nullable: true },
    reopenCount: { name: 'reopen_count', type: 'int', default: 0 },
    openedAt: { name: 'opened_at', type: 'timestamptz', default: () => 'now()' },
    updatedAt: { name: 'updated_at', type: 'timestamptz', default: () => 'now()' },
    closedAt: { name: 'closed_at', type: 'timestamptz', nullable: true },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_work_orders_site' },
    },
    unit: {
      type: 'many-to-one',
      target: 'PlantUnit',
      onDelete: 'CASCADE',
      joinColumn: { name: 'unit_id', foreignKeyConstraintName: 'fk_work_orders_unit' },
    },
    instrument: {
      type: 'many-to-one',
      target: 'Instrument',
      nullable: true,
      onDelete: 'CASCADE',
      joinColumn: { name: 'instrument_id', foreignKeyConstraintName: 'fk_work_orders_instrument' },
    },
    assignee: {
      type: 'many-to-one',
      target: 'User',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'assignee_id', foreignKeyConstraintName: 'fk_work_orders_assignee' },
    },
    mergedInto: {
      type: 'many-to-one',
      target: 'WorkOrder',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'merged_into_id', foreignKeyConstraintName: 'fk_work_orders_merged_into' },
    },
  },
  uniques: [{ name: 'uq_work_orders_site_number', columns: ['siteId', 'number'] }],
  indices: [
    {
      name: 'ux_work_orders_open_instrument',
      columns: ['siteId', 'instrumentId', 'kind'],
      unique: true,
      where: `${OPEN_WHERE} AND "instrument_id" IS NOT NULL`,
    },
    {
      name: 'ux_work_orders_open_equipment',
      columns: ['unitId', 'equipmentRef', 'kind'],
      unique: true,
      where: `${OPEN_WHERE} AND "instrument_id" IS NULL`,
    },
    { name: 'ix_work_orders_site_status', columns: ['siteId', 'status', 'priority'] },
    { name: 'ix_work_orders_site_opened', columns: ['siteId', 'openedAt'] },
    { name: 'ix_work_orders_site_kind', columns: ['siteId', 'kind'] },
    { name: 'ix_work_orders_site_tag', columns: ['siteId', 'instrumentTag'] },
    { name: 'ix_work_orders_unit', columns: ['unitId'] },
    { name: 'ix_work_orders_instrument', columns: ['instrumentId'] },
    { name: 'ix_work_orders_assignee', columns: ['assigneeId'] },
  ],
  checks: [
    { name: 'ck_work_orders_priority', expression: `"priority" BETWEEN 1 AND 3` },
    { name: 'ck_work_orders_number', expression: `"number" >= 1` },
    { name: 'ck_work_orders_target', expression: `("instrument_id" IS NOT NULL) OR ("equipment_ref" IS NOT NULL)` },
  ],
});

/** The last work-order number given out on a site; its row is the lock that numbers and dedups. */
export interface WorkOrderCounter {
  siteId: string;
  lastNumber: number;
  site?: Site;
}

export const WorkOrderCounterEntity = new EntitySchema<WorkOrderCounter>({
  name: 'WorkOrderCounter',
  tableName: 'work_order_counters',
  columns: {
    siteId: { name: 'site_id', type: 'uuid', primary: true, primaryKeyConstraintName: 'pk_work_order_counters' },
    lastNumber: { name: 'last_number', type: 'int', default: 0 },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_work_order_counters_site' },
    },
  },
});

/** A finding attached to a work order as its evidence (the one that opened it, and later ones). */
export interface WorkOrderFinding {
  workOrderId: string;
  findingId: string;
  attachedAt: Date;
  workOrder?: WorkOrder;
  finding?: FindingRow;
}

export const WorkOrderFindingEntity = new EntitySchema<WorkOrderFinding>({
  name: 'WorkOrderFinding',
  tableName: 'work_order_findings',
  columns: {
    workOrderId: {
      name: 'work_order_id',
      type: 'uuid',
      primary: true,
      primaryKeyConstraintName: 'pk_work_order_findings',
    },
    findingId: { name: 'finding_id', type: 'uuid', primary: true, primaryKeyConstraintName: 'pk_work_order_findings' },
    attachedAt: { name: 'attached_at', type: 'timestamptz', default: () => 'now()' },
  },
  relations: {
    workOrder: {
      type: 'many-to-one',
      target: 'WorkOrder',
      onDelete: 'CASCADE',
      joinColumn: { name: 'work_order_id', foreignKeyConstraintName: 'fk_work_order_findings_work_order' },
    },
    finding: {
      type: 'many-to-one',
      target: 'Finding',
      onDelete: 'CASCADE',
      joinColumn: { name: 'finding_id', foreignKeyConstraintName: 'fk_work_order_findings_finding' },
    },
  },
  indices: [{ name: 'ix_work_order_findings_finding', columns: ['findingId'] }],
});

/**
 * The history of a work order: who (null: the server, for what an analysis did), when, what
 * changed (status from → to, and the fields in `changes`), and a comment.
 */
export interface WorkOrderEvent {
  id: string;
  workOrderId: string;
  at: Date;
  actorId: string | null;
  type: string;
  fromStatus: WorkOrderStatus | null;
  toStatus: WorkOrderStatus | null;
  changes: Record<string, unknown>;
  comment: string | null;
  workOrder?: WorkOrder;
  actor?: User | null;
}

export const WorkOrderEventEntity = new EntitySchema<WorkOrderEvent>({
  name: 'WorkOrderEvent',
  tableName: 'work_order_events',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_work_order_events' },
    workOrderId: { name: 'work_order_id', type: 'uuid' },
    at: { type: 'timestamptz', default: () => 'now()' },
    actorId: { name: 'actor_id', type: 'uuid', nullable: true },
    type: { type: 'varchar', length: 32 },
    fromStatus: { name: 'from_status', ...statusEnum, nullable: true },
    toStatus: { name: 'to_status', ...statusEnum, nullable: true },
    changes: { type: 'jsonb', default: () => `'{}'` },
    comment: { type: 'text', nullable: true },
  },
  relations: {
    workOrder: {
      type: 'many-to-one',
      target: 'WorkOrder',
      onDelete: 'CASCADE',
      joinColumn: { name: 'work_order_id', foreignKeyConstraintName: 'fk_work_order_events_work_order' },
    },
    actor: {
      type: 'many-to-one',
      target: 'User',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'actor_id', foreignKeyConstraintName: 'fk_work_order_events_actor' },
    },
  },
  indices: [{ name: 'ix_work_order_events_work_order', columns: ['workOrderId', 'at'] }],
});

/**
 * A calibration that closed a calibrate work order: as found and as left in the instrument's own
 * unit and reference (what the calibrator's sheet says), the date and who did it.
 */
export interface CalibrationRecord {
  id: string;
  workOrderId: string;
  instrumentId: string;
  siteId: string;
  asFound: number;
  asLeft: number;
  unit: string;
  reference: PressureRef | null;
  /** YYYY-MM-DD */
  calibratedOn: string;
  calibratedBy: string;
  note: string | null;
  createdAt: Date;
  workOrder?: WorkOrder;
  instrument?: Instrument;
  calibrator?: User;
}

export const CalibrationRecordEntity = new EntitySchema<CalibrationRecord>({
  name: 'CalibrationRecord',
  tableName: 'calibration_records',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_calibration_records' },
    workOrderId: { name: 'work_order_id', type: 'uuid' },
    instrumentId: { name: 'instrument_id', type: 'uuid' },
    siteId: { name: 'site_id', type: 'uuid' },
    asFound: { name: 'as_found', type: 'double precision' },
    asLeft: { name: 'as_left', type: 'double precision' },
    unit: { type: 'varchar', length: 16 },
    reference: { type: 'enum', enum: [...PRESSURE_REFERENCES], enumName: 'pressure_reference', nullable: true },
    calibratedOn: { name: 'calibrated_on', type: 'date' },
    calibratedBy: { name: 'calibrated_by', type: 'uuid' },
    note: { type: 'text', nullable: true },
    createdAt: { name: 'created_at', type: 'timestamptz', default: () => 'now()' },
  },
  relations: {
    workOrder: {
      type: 'many-to-one',
      target: 'WorkOrder',
      onDelete: 'CASCADE',
      joinColumn: { name: 'work_order_id', foreignKeyConstraintName: 'fk_calibration_records_work_order' },
    },
    instrument: {
      type: 'many-to-one',
      target: 'Instrument',
      onDelete: 'CASCADE',
      joinColumn: { name: 'instrument_id', foreignKeyConstraintName: 'fk_calibration_records_instrument' },
    },
    calibrator: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'calibrated_by', foreignKeyConstraintName: 'fk_calibration_records_calibrated_by' },
    },
  },
  indices: [
    { name: 'ix_calibration_records_instrument', columns: ['instrumentId', 'calibratedOn'] },
    { name: 'ix_calibration_records_work_order', columns: ['workOrderId'] },
  ],
});
