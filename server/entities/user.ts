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
  /** Failed sign-ins since failedSignInsSince (reset by a sign-in and when a lock starts). */
  failedSignIns: number;
  /** The first failed sign-in of the current 15-minute count; null: none counted. */
  failedSignInsSince: Date | null;
  /** Sign-in refused until then (server/auth/lockout.ts); null: not locked. */
  lockedUntil: Date | null;
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
    failedSignIns: { name: 'failed_sign_ins', type: 'int', default: 0 },
    failedSignInsSince: { name: 'failed_sign_ins_since', type: 'timestamptz', nullable: true },
    lockedUntil: { name: 'locked_until', type: 'timestamptz', nullable: true },
  },
  uniques: [{ name: 'uq_users_email', columns: ['email'] }],
  checks: [
    { name: 'ck_users_email_lower', expression: `"email" = lower("email")` },
    { name: 'ck_users_failed_sign_ins', expression: `"failed_sign_ins" >= 0` },
  ],
});
