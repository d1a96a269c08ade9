import { EntitySchema } from 'typeorm';
import { PRESSURE_REFERENCES, type PressureRef } from '../../shared/units';
import type { ReadingFlag } from '../../shared/api/sync';
import type { Instrument } from './instrument';
import type { Round } from './round';
import type { User } from './user';
import { numberFromText } from './transformers';

/**
 * One reading, append-only (a trigger refuses UPDATE): a correction is a new reading whose
 * `supersedes` names the old one. The value is kept as typed (value, unit, reference) and in SI
 * (Pa absolute, K, kg/s, W; level as a fraction or m). A skipped reading has no value and a skip
 * reason. Indexed by (instrument, device time) for trends and by round.
 */
export interface Reading {
  id: string;
  roundId: string;
  instrumentId: string;
  valueTyped: number | null;
  unit: string;
  reference: PressureRef | null;
  valueSi: number | null;
  deviceTime: Date;
  receivedAt: Date;
  note: string | null;
  skipReason: string | null;
  supersedes: string | null;
  confirmedAfterFlag: boolean;
  flags: ReadingFlag[];
  /** Who pushed it: the round's technician, or a site admin acting on the round; null on readings stored before this was kept. */
  recordedBy: string | null;
  round?: Round;
  recorder?: User | null;
  instrument?: Instrument;
  superseded?: Reading | null;
}

export const ReadingEntity = new EntitySchema<Reading>({
  name: 'Reading',
  tableName: 'readings',
  columns: {
    id: { type: 'uuid', primary: true, primaryKeyConstraintName: 'pk_readings' },
    roundId: { name: 'round_id', type: 'uuid' },
    instrumentId: { name: 'instrument_id', type: 'uuid' },
    valueTyped: { name: 'value_typed', type: 'numeric', nullable: true, transformer: numberFromText },
    unit: { type: 'varchar', length: 16 },
    reference: { type: 'enum', enum: [...PRESSURE_REFERENCES], enumName: 'pressure_reference', nullable: true },
    valueSi: { name: 'value_si', type: 'double precision', nullable: true },
    deviceTime: { name: 'device_time', type: 'timestamptz' },
    receivedAt: { name: 'received_at', type: 'timestamptz', default: () => 'now()' },
    note: { type: 'text', nullable: true },
    skipReason: { name: 'skip_reason', type: 'text', nullable: true },
    supersedes: { type: 'uuid', nullable: true },
    confirmedAfterFlag: { name: 'confirmed_after_flag', type: 'boolean', default: false },
    flags: { type: 'jsonb', default: () => `'[]'` },
    recordedBy: { name: 'recorded_by', type: 'uuid', nullable: true },
  },
  relations: {
    round: {
      type: 'many-to-one',
      target: 'Round',
      onDelete: 'CASCADE',
      joinColumn: { name: 'round_id', foreignKeyConstraintName: 'fk_readings_round' },
    },
    instrument: {
      type: 'many-to-one',
      target: 'Instrument',
      joinColumn: { name: 'instrument_id', foreignKeyConstraintName: 'fk_readings_instrument' },
    },
    recorder: {
      type: 'many-to-one',
      target: 'User',
      nullable: true,
      joinColumn: { name: 'recorded_by', foreignKeyConstraintName: 'fk_readings_recorded_by' },
    },
    superseded: {
      type: 'many-to-one',
      target: 'Reading',
      nullable: true,
      joinColumn: { name: 'supersedes', foreignKeyConstraintName: 'fk_readings_supersedes' },
    },
  },
  indices: [
    { name: 'ix_readings_instrument_time', columns: ['instrumentId', 'deviceTime'] },
    { name: 'ix_readings_round', columns: ['roundId'] },
  ],
  checks: [
    { name: 'ck_readings_value_or_skip', expression: `("value_typed" IS NOT NULL) OR ("skip_reason" IS NOT NULL)` },
    { name: 'ck_readings_si_with_value', expression: `("value_typed" IS NULL) = ("value_si" IS NULL)` },
  ],
});
