import { EntitySchema } from 'typeorm';
import type { Role } from '@evalon/contracts';
import { idColumn, instantColumn, refColumn } from '../../database/columns';

/** A row of `users`. */
export interface UserRow {
  id: number;
  /** Lower-case, unique. */
  email: string;
  name: string;
  /** Argon2id PHC string; null until the person sets a password (invited, or Google only). */
  passwordHash: string | null;
  /** Whether the person may sign in. */
  active: boolean;
  timeZone: string | null;
  /** Google `sub`, linked at the first Google sign-in. */
  googleSubject: string | null;
  lastSignInAt: Date | null;
  /**
   * Bumped by database triggers whenever what a session knows about the person changes
   * (migration 1765300000000); the signed-in person cache compares it on every request.
   */
  authVersion: number;
  createdAt: Date;
  updatedAt: Date;
}

export const UserEntity = new EntitySchema<UserRow>({
  name: 'User',
  tableName: 'users',
  columns: {
    id: idColumn,
    email: { type: 'varchar', length: 254 },
    name: { type: 'varchar', length: 120 },
    passwordHash: { type: 'varchar', length: 255, name: 'password_hash', nullable: true },
    active: { type: 'boolean', width: 1, default: true },
    timeZone: { type: 'varchar', length: 64, name: 'time_zone', nullable: true },
    googleSubject: { type: 'varchar', length: 255, name: 'google_subject', nullable: true },
    lastSignInAt: instantColumn('last_sign_in_at', true),
    authVersion: { type: 'int', unsigned: true, name: 'auth_version', default: 0 },
    createdAt: instantColumn('created_at'),
    updatedAt: instantColumn('updated_at'),
  },
  indices: [
    { name: 'uq_users_email', columns: ['email'], unique: true },
    { name: 'uq_users_google_subject', columns: ['googleSubject'], unique: true },
    { name: 'ix_users_updated', columns: ['updatedAt'] },
  ],
});

/** A row of `memberships`: one role of one person in one organisation. */
export interface MembershipRow {
  id: number;
  userId: number;
  organisationId: number;
  role: Role;
  createdAt: Date;
}

export const MembershipEntity = new EntitySchema<MembershipRow>({
  name: 'Membership',
  tableName: 'memberships',
  columns: {
    id: idColumn,
    userId: refColumn('user_id'),
    organisationId: refColumn('organisation_id'),
    role: { type: 'varchar', length: 32 },
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_memberships_organisation', columns: ['organisationId'] },
    {
      name: 'uq_memberships_user_org_role',
      columns: ['userId', 'organisationId', 'role'],
      unique: true,
    },
  ],
  foreignKeys: [
    {
      name: 'fk_memberships_organisation',
      target: 'Organisation',
      columnNames: ['organisationId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_memberships_user',
      target: 'User',
      columnNames: ['userId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** What a one-time token is for. */
export type TokenPurpose = 'invitation' | 'password_reset';

/** A row of `user_tokens`. Only the SHA-256 of the token is stored. */
export interface UserTokenRow {
  id: number;
  userId: number;
  purpose: TokenPurpose;
  /** Hex SHA-256 of the token sent by e-mail. */
  tokenHash: string;
  /** Organisation of an invitation (null for resets). */
  organisationId: number | null;
  createdByUserId: number | null;
  expiresAt: Date;
  usedAt: Date | null;
  createdAt: Date;
}

export const UserTokenEntity = new EntitySchema<UserTokenRow>({
  name: 'UserToken',
  tableName: 'user_tokens',
  columns: {
    id: idColumn,
    userId: refColumn('user_id'),
    purpose: { type: 'varchar', length: 32 },
    tokenHash: { type: 'char', length: 64, name: 'token_hash' },
    organisationId: refColumn('organisation_id', true),
    createdByUserId: refColumn('created_by_user_id', true),
    expiresAt: instantColumn('expires_at'),
    usedAt: instantColumn('used_at', true),
    createdAt: instantColumn('created_at'),
  },
  indices: [
    { name: 'ix_user_tokens_user', columns: ['userId', 'purpose'] },
    { name: 'uq_user_tokens_hash', columns: ['tokenHash'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_user_tokens_created_by',
      target: 'User',
      columnNames: ['createdByUserId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_user_tokens_organisation',
      target: 'Organisation',
      columnNames: ['organisationId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
    {
      name: 'fk_user_tokens_user',
      target: 'User',
      columnNames: ['userId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});
