import { Entity, Enum, ManyToOne, Property, type Opt } from '@mikro-orm/core';
import { ROLES, type Role } from '@shared/auth';
import { BaseEntity } from './base.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/**
 * A person who signs in. E-mail is unique regardless of case (a unique index on lower(email),
 * created by the migration); it is stored as typed, trimmed.
 */
@Entity({ tableName: 'app_user' })
export class User extends BaseEntity {
  @Property({ type: 'string', length: 254 })
  email!: string;

  @Property({ type: 'string', length: 120 })
  name!: string;

  @Enum({ items: () => ROLES, nativeEnumName: 'user_role' })
  role!: Role;

  @ManyToOne({ entity: () => VendorOrganisation, nullable: true, deleteRule: 'restrict' })
  vendorOrganisation?: VendorOrganisation | null;

  /** scrypt hash (see server/auth/password.ts); null until the person sets a password. */
  @Property({ type: 'string', length: 255, nullable: true, hidden: true, lazy: true })
  passwordHash?: string | null;

  @Property({ type: 'boolean', default: true })
  active: boolean & Opt = true;

  @Property({ type: 'datetime', nullable: true })
  lastSignInAt?: Date | null;
}
