import { EntitySchema } from 'typeorm';
import { ROLES, type Role } from '../../shared/api/auth';
import type { Site } from './site';
import type { User } from './user';

export { ROLES, type Role };

/** A user's role on one site; a user has at most one membership per site. */
export interface Membership {
  id: string;
  userId: string;
  siteId: string;
  role: Role;
  /** The name the inviting admin typed, shown on this site instead of the account's own (null: the account's own). */
  displayName: string | null;
  createdAt: Date;
  user?: User;
  site?: Site;
}

export const MembershipEntity = new EntitySchema<Membership>({
  name: 'Membership',
  tableName: 'memberships',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_memberships' },
    userId: { name: 'user_id', type: 'uuid' },
    siteId: { name: 'site_id', type: 'uuid' },
    role: { type: 'enum', enum: [...ROLES], enumName: 'membership_role' },
    displayName: { name: 'display_name', type: 'varchar', length: 200, nullable: true },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
  },
  relations: {
    user: {
      type: 'many-to-one',
      target: 'User',
      onDelete: 'CASCADE',
      joinColumn: { name: 'user_id', foreignKeyConstraintName: 'fk_memberships_user' },
    },
    site: {
      type: 'many-to-one',
      target: 'Site',
      onDelete: 'CASCADE',
      joinColumn: { name: 'site_id', foreignKeyConstraintName: 'fk_memberships_site' },
    },
  },
  uniques: [{ name: 'uq_memberships_user_site', columns: ['userId', 'siteId'] }],
  indices: [{ name: 'ix_memberships_site', columns: ['siteId'] }],
});
