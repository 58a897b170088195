import { Check, Entity, Enum, Index, ManyToOne, Property, type Opt } from '@mikro-orm/core';
import { ROLES, type Role } from '@shared/auth';
import { BaseEntity } from './base.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/**
 * A person who signs in. E-mail is unique regardless of case (a unique index on lower(email),
 * created by the migration); it is stored as typed, trimmed.
 */
@Entity({ tableName: 'app_user' })
@Index({ name: 'app_user_email_lower_unique', expression: 'create unique index "app_user_email_lower_unique" on "app_user" (lower("email"))' })
@Check({ name: 'app_user_vendor_organisation_check', expression: "(role = 'vendor') = (vendor_organisation_id is not null)" })
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
