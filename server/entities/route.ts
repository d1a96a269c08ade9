import { EntitySchema } from 'typeorm';
import type { RouteTemplate } from '../../shared/route/template';
import type { Site } from './site';
import type { PlantUnit } from './plant-unit';
import type { User } from './user';
import { syncVersionColumn } from './transformers';

/**
 * A route of a unit; its stops, readings and checks live in numbered RouteVersions. `key` is the
 * template's own id ("boiler-house"), unique per site. `currentVersionId` is the latest published
 * version, the one new rounds start on; a round keeps the version it started with.
 */
export interface Route {
  id: string;
  siteId: string;
  unitId: string;
  key: string;
  name: string;
  currentVersionId: string | null;
  createdAt: Date;
  syncVersion: number;
  site?: Site;
  unit?: PlantUnit;
  currentVersion?: RouteVersion | null;
}

export interface RouteVersion {
  id: string;
  routeId: string;
  number: number;
  template: RouteTemplate;
  publishedAt: Date;
  publishedBy: string | null;
  syncVersion: number;
  route?: Route;
  publisher?: User | null;
}

export const RouteEntity = new EntitySchema<Route>({
  name: 'Route',
  tableName: 'routes',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_routes' },
    siteId: { name: 'site_id', type: 'uuid' },
    unitId: { name: 'unit_id', type: 'uuid' },
    key: { type: 'varchar', length: 64 },
    name: { type: 'varchar', length: 200 },
    currentVersionId: { name: 'current_version_id', type: 'uuid', nullable: true },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
    syncVersion: { ...syncVersionColumn },
  },
  relations: {
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_routes_site' },
    },
    unit: {
      type: 'many-to-one',
      target: 'PlantUnit',
      onDelete: 'CASCADE',
      joinColumn: { name: 'unit_id', foreignKeyConstraintName: 'fk_routes_unit' },
    },
    currentVersion: {
      type: 'many-to-one',
      target: 'RouteVersion',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'current_version_id', foreignKeyConstraintName: 'fk_routes_current_version' },
    },
  },
  uniques: [{ name: 'uq_routes_site_key', columns: ['siteId', 'key'] }],
  indices: [
    { name: 'ix_routes_unit', columns: ['unitId'] },
    { name: 'ix_routes_sync_version', columns: ['syncVersion'] },
  ],
});

export const RouteVersionEntity = new EntitySchema<RouteVersion>({
  name: 'RouteVersion',
  tableName: 'route_versions',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_route_versions' },
    routeId: { name: 'route_id', type: 'uuid' },
    number: { type: 'int' },
    template: { type: 'jsonb' },
    publishedAt: { name: 'published_at', type: 'timestamptz' },
    publishedBy: { name: 'published_by', type: 'uuid', nullable: true },
    syncVersion: { ...syncVersionColumn },
  },
  relations: {
    route: {
      type: 'many-to-one',
      target: 'Route',
      onDelete: 'CASCADE',
      joinColumn: { name: 'route_id', foreignKeyConstraintName: 'fk_route_versions_route' },
    },
    publisher: {
      type: 'many-to-one',
      target: 'User',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'published_by', foreignKeyConstraintName: 'fk_route_versions_published_by' },
    },
  },
  uniques: [{ name: 'uq_route_versions_route_number', columns: ['routeId', 'number'] }],
  checks: [{ name: 'ck_route_versions_number', expression: `"number" >= 1` }],
});
