import { Entity, Index, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/** A vendor organisation asked to bid on a tender. Only invited vendors see the tender. */
@Entity({ tableName: 'invitation' })
@Unique({ properties: ['tender', 'vendorOrganisation'] })
// A vendor's tender list starts from its invitations: their tenders read from this index alone
// (an index-only scan, Migration20261209100000).
@Index({ name: 'invitation_vendor_organisation_id_tender_id_index', properties: ['vendorOrganisation', 'tender'] })
export class Invitation extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  invitedBy!: User;

  /** When the invitation e-mail was queued (at publication, or at once for an open tender). */
  @Property({ type: 'datetime', nullable: true })
  notifiedAt?: Date | null;
}
