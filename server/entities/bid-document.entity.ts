import { Entity, ManyToOne, Property } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/** An uploaded bid workbook, kept byte for byte (sealed like the bid until closing). */
@Entity({ tableName: 'bid_document' })
export class BidDocument extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  uploadedBy!: User;

  @Property({ type: 'string', length: 255 })
  filename!: string;

  @Property({ type: 'integer' })
  size!: number;

  /** SHA-256 of the bytes, hex. */
  @Property({ type: 'string', length: 64 })
  digest!: string;

  @Property({ type: 'blob', lazy: true })
  content!: Buffer;
}
