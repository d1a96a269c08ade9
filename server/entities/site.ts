import { EntitySchema } from 'typeorm';

/** A plant site. Elevation in m gives the standard-atmosphere barometric pressure. */
export interface Site {
  id: string;
  name: string;
  slug: string;
  /** IANA time zone name. */
  timezone: string;
  elevationM: number;
  createdAt: Date;
}

export const SiteEntity = new EntitySchema<Site>({
  name: 'Site',
  tableName: 'sites',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_sites' },
    name: { type: 'varchar', length: 200 },
    slug: { type: 'varchar', length: 64 },
    timezone: { type: 'varchar', length: 64 },
    elevationM: { name: 'elevation_m', type: 'double precision' },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
  },
  uniques: [{ name: 'uq_sites_slug', columns: ['slug'] }],
});
