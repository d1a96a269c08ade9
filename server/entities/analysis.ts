import { EntitySchema } from 'typeorm';
import type { Instrument } from './instrument';
import type { Reading } from './reading';
import type { Round } from './round';
import type { Site } from './site';
import type { PlantUnit } from './plant-unit';

/**
 * One analysis of a round (server/analysis): the round's current readings held against its unit's
 * cycle model. Unique per (round, input hash): the same input analysed twice is stored once; a
 * re-take changes the input and adds a newer analysis, which becomes the round's current one
 * (`isCurrent`, at most one per round). State points, balances, performance figures, per-instrument
 * results and the reconciliation summary are kept as the engine gave them (SI, jsonb).
 */
export interface Analysis {
  id: string;
  roundId: string;
  siteId: string;
  unitId: string;
  /** SHA-256 (hex) of the canonical JSON of everything the analysis read. */
  inputHash: string;
  /** The unit's model version the analysis ran on. */
  modelVersion: string;
  /** What the device said it held, when it said (rounds.device_model_version). */
  deviceModelVersion: string | null;
  modelVersionMismatch: boolean;
  barometricPa: number;
  /** 'reading' (the round's barometer) or 'elevation' (standard atmosphere at the site's elevation). */
  barometricSource: string;
  isCurrent: boolean;
  analysedAt: Date;
  statePoints: unknown;
  balances: unknown;
  performance: unknown;
  instruments: unknown;
  reconciliation: unknown;
  findingCount: number;
  round?: Round;
  site?: Site;
  unit?: PlantUnit;
}

export const AnalysisEntity = new EntitySchema<Analysis>({
  name: 'Analysis',
  tableName: 'analyses',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_analyses' },
    roundId: { name: 'round_id', type: 'uuid' },
    siteId: { name: 'site_id', type: 'uuid' },
    unitId: { name: 'unit_id', type: 'uuid' },
    inputHash: { name: 'input_hash', type: 'varchar', length: 64 },
    modelVersion: { name: 'model_version', type: 'varchar', length: 64 },
    deviceModelVersion: { name: 'device_model_version', type: 'varchar', length: 64, nullable: true },
    modelVersionMismatch: { name: 'model_version_mismatch', type: 'boolean', default: false },
    barometricPa: { name: 'barometric_pa', type: 'double precision' },
    barometricSource: { name: 'barometric_source', type: 'varchar', length: 16 },
    isCurrent: { name: 'is_current', type: 'boolean', default: true },
    analysedAt: { name: 'analysed_at', type: 'timestamptz', default: () => 'now()' },
    statePoints: { name: 'state_points', type: 'jsonb' },
    balances: { type: 'jsonb' },
    performance: { type: 'jsonb' },
    instruments: { type: 'jsonb' },
    reconciliation: { type: 'jsonb' },
    findingCount: { name: 'finding_count', type: 'int' },
  },
  relations: {
    round: {
      type: 'many-to-one',
      target: 'Round',
      onDelete: 'CASCADE',
      joinColumn: { name: 'round_id', foreignKeyConstraintName: 'fk_analyses_round' },
    },
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_analyses_site' },
    },
    unit: {
      type: 'many-to-one',
      target: 'PlantUnit',
      onDelete: 'CASCADE',
      joinColumn: { name: 'unit_id', foreignKeyConstraintName: 'fk_analyses_unit' },
    },
  },
  uniques: [{ name: 'uq_analyses_round_input', columns: ['roundId', 'inputHash'] }],
  indices: [
    { name: 'ux_analyses_round_current', columns: ['roundId'], unique: true, where: '"is_current"' },
    { name: 'ix_analyses_site_time', columns: ['siteId', 'analysedAt'] },
  ],
});

/**
 * One finding of an analysis, as the engine worded it. `instrumentIds` are the database ids of the
 * instruments it names (the tags resolved on the round's unit); equipment and point refs are the
 * cycle model's ids. Server-made findings (condenser TTD high) sit beside the engine's.
 */
export interface FindingRow {
  id: string;
  analysisId: string;
  roundId: string;
  siteId: string;
  unitId: string;
  /** Position in the analysis (the engine's order: most severe first). */
  ordinal: number;
  kind: string;
  severity: number;
  instrumentTags: string[];
  instrumentIds: string[];
  equipmentRef: string | null;
  pointRef: string | null;
  message: string;
  evidence: unknown;
  createdAt: Date;
  analysis?: Analysis;
  site?: Site;
}

export const FindingEntity = new EntitySchema<FindingRow>({
  name: 'Finding',
  tableName: 'findings',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_findings' },
    analysisId: { name: 'analysis_id', type: 'uuid' },
    roundId: { name: 'round_id', type: 'uuid' },
    siteId: { name: 'site_id', type: 'uuid' },
    unitId: { name: 'unit_id', type: 'uuid' },
    ordinal: { type: 'int' },
    kind: { type: 'varchar', length: 40 },
    severity: { type: 'smallint' },
    instrumentTags: { name: 'instrument_tags', type: 'jsonb', default: () => `'[]'` },
    instrumentIds: { name: 'instrument_ids', type: 'uuid', array: true, default: () => `'{}'` },
    equipmentRef: { name: 'equipment_ref', type: 'varchar', length: 64, nullable: true },
    pointRef: { name: 'point_ref', type: 'varchar', length: 64, nullable: true },
    message: { type: 'text' },
    evidence: { type: 'jsonb' },
    createdAt: { name: 'created_at', type: 'timestamptz', default: () => 'now()' },
  },
  relations: {
    analysis: {
      type: 'many-to-one',
      target: 'Analysis',
      onDelete: 'CASCADE',
      joinColumn: { name: 'analysis_id', foreignKeyConstraintName: 'fk_findings_analysis' },
    },
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_findings_site' },
    },
  },
  indices: [
    { name: 'ix_findings_analysis', columns: ['analysisId'] },
    { name: 'ix_findings_site_time', columns: ['siteId', 'createdAt'] },
    // GIN (for `instrument_ids @> array[…]`), made by the migration: EntitySchema cannot say "USING gin",
    // so the schema builder is told to leave this index alone.
    { name: 'ix_findings_instruments', columns: ['instrumentIds'], synchronize: false },
  ],
  checks: [{ name: 'ck_findings_severity', expression: `"severity" BETWEEN 1 AND 3` }],
});

/**
 * One instrument in one analysis, as rows: the reading (SI absolute) and its σ, the reconciled
 * value, the estimate with the suspects removed, the normalised correction z. Instrument health
 * and history read these (indexed by instrument and the reading's device time).
 */
export interface AnalysisInstrument {
  analysisId: string;
  instrumentId: string;
  roundId: string;
  siteId: string;
  readingId: string | null;
  /** The reading's device time (evidence of when it was read); null when the instrument was not read. */
  measuredAt: Date | null;
  isCurrent: boolean;
  /** used | not-in-balance | missing | excluded (shared/cycle InstrumentResult.status) */
  status: string;
  readingSi: number | null;
  sigmaSi: number | null;
  reconciledSi: number | null;
  reconciledSigmaSi: number | null;
  estimateSi: number | null;
  estimateSigmaSi: number | null;
  z: number | null;
  /** the sequential evidence's statistic of this reading (shared/cycle InstrumentResult.u) */
  u: number | null;
  suspect: boolean;
  redundant: boolean;
  analysis?: Analysis;
  instrument?: Instrument;
  reading?: Reading | null;
}

export const AnalysisInstrumentEntity = new EntitySchema<AnalysisInstrument>({
  name: 'AnalysisInstrument',
  tableName: 'analysis_instruments',
  columns: {
    analysisId: {
      name: 'analysis_id',
      type: 'uuid',
      primary: true,
      primaryKeyConstraintName: 'pk_analysis_instruments',
    },
    instrumentId: {
      name: 'instrument_id',
      type: 'uuid',
      primary: true,
      primaryKeyConstraintName: 'pk_analysis_instruments',
    },
    roundId: { name: 'round_id', type: 'uuid' },
    siteId: { name: 'site_id', type: 'uuid' },
    readingId: { name: 'reading_id', type: 'uuid', nullable: true },
    measuredAt: { name: 'measured_at', type: 'timestamptz', nullable: true },
    isCurrent: { name: 'is_current', type: 'boolean', default: true },
    status: { type: 'varchar', length: 16 },
    readingSi: { name: 'reading_si', type: 'double precision', nullable: true },
    sigmaSi: { name: 'sigma_si', type: 'double precision', nullable: true },
    reconciledSi: { name: 'reconciled_si', type: 'double precision', nullable: true },
    reconciledSigmaSi: { name: 'reconciled_sigma_si', type: 'double precision', nullable: true },
    estimateSi: { name: 'estimate_si', type: 'double precision', nullable: true },
    estimateSigmaSi: { name: 'estimate_sigma_si', type: 'double precision', nullable: true },
    z: { type: 'double precision', nullable: true },
    u: { type: 'double precision', nullable: true },
    suspect: { type: 'boolean', default: false },
    redundant: { type: 'boolean', default: false },
  },
  relations: {
    analysis: {
      type: 'many-to-one',
      target: 'Analysis',
      onDelete: 'CASCADE',
      joinColumn: { name: 'analysis_id', foreignKeyConstraintName: 'fk_analysis_instruments_analysis' },
    },
    instrument: {
      type: 'many-to-one',
      target: 'Instrument',
      onDelete: 'CASCADE',
      joinColumn: { name: 'instrument_id', foreignKeyConstraintName: 'fk_analysis_instruments_instrument' },
    },
    reading: {
      type: 'many-to-one',
      target: 'Reading',
      nullable: true,
      onDelete: 'CASCADE',
      joinColumn: { name: 'reading_id', foreignKeyConstraintName: 'fk_analysis_instruments_reading' },
    },
  },
  indices: [{ name: 'ix_analysis_instruments_instrument_time', columns: ['instrumentId', 'measuredAt'] }],
});
