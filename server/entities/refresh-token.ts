import { EntitySchema } from 'typeorm';
import type { User } from './user';

/**
 * One refresh token. Only the SHA-256 of the token is stored. Tokens of one sign-in share a
 * family: each refresh retires the token (revoked_at, replaced_by) and issues the next of the
 * family; presenting a retired token again revokes the whole family.
 */
export interface RefreshToken {
  id: string;
  userId: string;
  /** Hex SHA-256 of the token. */
  tokenHash: string;
  familyId: string;
  expiresAt: Date;
  revokedAt: Date | null;
  replacedBy: string | null;
  createdAt: Date;
  user?: User;
  replacement?: RefreshToken | null;
}

export const RefreshTokenEntity = new EntitySchema<RefreshToken>({
  name: 'RefreshToken',
  tableName: 'refresh_tokens',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_refresh_tokens' },
    userId: { name: 'user_id', type: 'uuid' },
    tokenHash: { name: 'token_hash', type: 'varchar', length: 64 },
    familyId: { name: 'family_id', type: 'uuid' },
    expiresAt: { name: 'expires_at', type: 'timestamptz' },
    revokedAt: { name: 'revoked_at', type: 'timestamptz', nullable: true },
    replacedBy: { name: 'replaced_by', type: 'uuid', nullable: true },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
  },
  relations: {
    user: {
      type: 'many-to-one',
      target: 'User',
      onDelete: 'CASCADE',
      joinColumn: { name: 'user_id', foreignKeyConstraintName: 'fk_refresh_tokens_user' },
    },
    replacement: {
      type: 'many-to-one',
      target: 'RefreshToken',
      nullable: true,
      onDelete: 'SET NULL',
      joinColumn: { name: 'replaced_by', foreignKeyConstraintName: 'fk_refresh_tokens_replaced_by' },
    },
  },
  uniques: [{ name: 'uq_refresh_tokens_hash', columns: ['tokenHash'] }],
  indices: [
    { name: 'ix_refresh_tokens_family', columns: ['familyId'] },
    { name: 'ix_refresh_tokens_user', columns: ['userId'] },
    { name: 'ix_refresh_tokens_expires', columns: ['expiresAt'] },
  ],
});
