import { Check, Entity, Enum, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import { ROLES, type Role } from '@shared/roles';
import { BaseEntity } from './base.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/**
 * Whether a vendor account belongs to its organisation yet: an account an administrator adds to an
 * organisation that already has people stays `pending` until the organisation's contact approves
 * it (it cannot sign in, and no set-password link exists, until then); `refused` when they refuse.
 */
export const MEMBERSHIP_STATES = ['approved', 'pending', 'refused'] as const;
export type MembershipState = (typeof MEMBERSHIP_STATES)[number];

/**
 * A person who signs in. The e-mail is stored normalised (`normaliseEmail` in shared/auth.ts:
 * NFKC, lower case, trimmed) and is unique as stored; every lookup normalises and compares exactly.
 */
@Entity({ tableName: 'app_user' })
@Check({ name: 'app_user_vendor_organisation_check', expression: "(role = 'vendor') = (vendor_organisation_id is not null)" })
export class User extends BaseEntity {
  @Unique({ name: 'app_user_email_unique' })
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

  @Enum({ items: () => MEMBERSHIP_STATES, nativeEnumName: 'membership_state', default: 'approved' })
  membership: MembershipState & Opt = 'approved';
}
