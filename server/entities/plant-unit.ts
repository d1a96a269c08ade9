import { EntitySchema } from 'typeorm';
import type { Site } from './site';
import { syncVersionColumn } from './transformers';

/**
 * A plant unit: one steam cycle of a site (table `units`; "unit" alone in shared/units is a unit
 * of measure). `model` is the cycle model (shared/cycle) as JSON; `modelVersion`
 * is its content hash (shared/cycle modelVersion, "fnv1a64:…"), new with every change. `syncVersion` is stamped from the global `sync_seq` on every insert
 * and update (a trigger), and is what pull cursors compare against.
 */
export interface PlantUnit {
  id: string;
  siteId: string;
  name: string;
  model: unknown;
  modelVersion: string;
  createdAt: Date;
  updatedAt: Date;
  syncVersion: number;
  site?: Site;
}

export const PlantUnitEntity = new EntitySchema<PlantUnit>({
  name: 'PlantUnit',
  tableName: 'units',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_units' },
    siteId: { name: 'site_id', type: 'uuid' },
    name: { type: 'varchar', length: 200 },
    model: { type: 'jsonb' },
    modelVersion: { name: 'model_version', type: 'varchar', length: 64 },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
    updatedAt: { name: 'updated_at', type: 'timestamptz', updateDate: true },
    syncVersion: { ...syncVersionColumn },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_units_site' },
    },
  },
  uniques: [{ name: 'uq_units_site_name', columns: ['siteId', 'name'] }],
  indices: [{ name: 'ix_units_sync_version', columns: ['syncVersion'] }],
});
