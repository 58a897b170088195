import { Entity, Enum, Unique, ManyToOne, Property } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { User } from './user.entity';

/** `invitation`: the first password of a new account; `reset`: a new password for an account that has one. */
export const ACCOUNT_TOKEN_PURPOSES = ['invitation', 'reset'] as const;

/**
 * A one-time link to set a password (a first one, or a reset). Only the SHA-256 of the token is stored, so a leaked
 * database does not hand out working links.
 */
@Entity({ tableName: 'account_token' })
export class AccountToken extends BaseEntity {
  @ManyToOne({ entity: () => User, deleteRule: 'cascade' })
  user!: User;

  @Unique()
  @Property({ type: 'string', length: 64 })
  tokenHash!: string;

  @Enum({ items: () => ACCOUNT_TOKEN_PURPOSES, nativeEnumName: 'account_token_purpose' })
  purpose: (typeof ACCOUNT_TOKEN_PURPOSES)[number] = 'invitation';

  @Property({ type: 'datetime' })
  expiresAt!: Date;

  @Property({ type: 'datetime', nullable: true })
  usedAt?: Date | null;
}
