import { EntitySchema } from 'typeorm';
import { PRESSURE_REFERENCES, QUANTITIES, type PressureRef, type Quantity } from '../../shared/units';
import { INSTRUMENT_STATUSES, type InstrumentStatus } from '../../shared/api/sync';
import type { PlantUnit } from './plant-unit';
import { syncVersionColumn } from './transformers';

export { INSTRUMENT_STATUSES, type InstrumentStatus };

/**
 * A field instrument of a unit (ISA-5.1 tag, unique per unit). `range` is the scale in SI in the
 * instrument's own reference (as the cycle model has it); `accuracy` an accuracy specification of
 * shared/uncertainty; `gaugeUnit` the unit on the instrument's face.
 */
export interface Instrument {
  id: string;
  unitId: string;
  tag: string;
  quantity: Quantity;
  pointRef: string | null;
  equipmentRef: string | null;
  reference: PressureRef | null;
  range: { min: number; max: number } | null;
  accuracy: unknown;
  gaugeUnit: string;
  /** YYYY-MM-DD (pg `date`). */
  calibrationDate: string | null;
  calibrationIntervalDays: number | null;
  status: InstrumentStatus;
  /** Reads the site's barometric pressure (absolute): gauge and vacuum readings of its round refer to it. */
  isBarometer: boolean;
  createdAt: Date;
  updatedAt: Date;
  /** Optimistic-concurrency counter, +1 per save. */
  rowVersion: number;
  syncVersion: number;
  unit?: PlantUnit;
}

export const InstrumentEntity = new EntitySchema<Instrument>({
  name: 'Instrument',
  tableName: 'instruments',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_instruments' },
    unitId: { name: 'unit_id', type: 'uuid' },
    tag: { type: 'varchar', length: 40 },
    quantity: { type: 'enum', enum: [...QUANTITIES], enumName: 'instrument_quantity' },
    pointRef: { name: 'point_ref', type: 'varchar', length: 64, nullable: true },
    equipmentRef: { name: 'equipment_ref', type: 'varchar', length: 64, nullable: true },
    reference: { type: 'enum', enum: [...PRESSURE_REFERENCES], enumName: 'pressure_reference', nullable: true },
    range: { type: 'jsonb', nullable: true },
    accuracy: { type: 'jsonb', nullable: true },
    gaugeUnit: { name: 'gauge_unit', type: 'varchar', length: 16 },
    calibrationDate: { name: 'calibration_date', type: 'date', nullable: true },
    calibrationIntervalDays: { name: 'calibration_interval_days', type: 'int', nullable: true },
    status: { type: 'enum', enum: [...INSTRUMENT_STATUSES], enumName: 'instrument_status', default: 'ok' },
    isBarometer: { name: 'is_barometer', type: 'boolean', default: false },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
    updatedAt: { name: 'updated_at', type: 'timestamptz', updateDate: true },
    rowVersion: { name: 'row_version', type: 'int', version: true },
    syncVersion: { ...syncVersionColumn },
  },
  relations: {
    unit: {
      type: 'many-to-one',
      target: 'PlantUnit',
      onDelete: 'CASCADE',
      joinColumn: { name: 'unit_id', foreignKeyConstraintName: 'fk_instruments_unit' },
    },
  },
  uniques: [{ name: 'uq_instruments_unit_tag', columns: ['unitId', 'tag'] }],
  indices: [{ name: 'ix_instruments_sync_version', columns: ['syncVersion'] }],
});
