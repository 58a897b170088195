import { Entity, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';

/** A firm that bids. Its people are users with the vendor role. */
@Entity({ tableName: 'vendor_organisation' })
export class VendorOrganisation extends BaseEntity {
  @Property({ type: 'string', length: 160 })
  name!: string;

  @Unique()
  @Property({ type: 'string', length: 40 })
  registrationNumber!: string;

  /** Small or medium-sized enterprise: counts towards a tender's SME share rule. */
  @Property({ type: 'boolean', default: false })
  sme: boolean = false;

  @Property({ type: 'string', length: 254 })
  contactEmail!: string;
}
