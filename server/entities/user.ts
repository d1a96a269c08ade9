import { EntitySchema } from 'typeorm';

export interface User {
  id: string;
  /** Stored lower-case (a CHECK constraint holds it so), unique. */
  email: string;
  name: string;
  /** argon2id PHC string. */
  passwordHash: string;
  createdAt: Date;
  disabled: boolean;
}

export const UserEntity = new EntitySchema<User>({
  name: 'User',
  tableName: 'users',
  columns: {
    id: { type: 'uuid', primary: true, generated: 'uuid', primaryKeyConstraintName: 'pk_users' },
    email: { type: 'varchar', length: 320 },
    name: { type: 'varchar', length: 200 },
    passwordHash: { name: 'password_hash', type: 'varchar', length: 255 },
    createdAt: { name: 'created_at', type: 'timestamptz', createDate: true },
    disabled: { type: 'boolean', default: false },
  },
  uniques: [{ name: 'uq_users_email', columns: ['email'] }],
  checks: [{ name: 'ck_users_email_lower', expression: `"email" = lower("email")` }],
});
