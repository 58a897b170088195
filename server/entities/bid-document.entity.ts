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

  /**
   * The figures read from the workbook at upload, and the cell each price came from: a bid saved
   * with this workbook attached must carry exactly these figures. Null for a workbook stored
   * before figures were kept.
   */
  @Property({ type: 'json', nullable: true })
  figures?: BidDocumentFigures | null;
}

export interface BidDocumentFigures {
  fixedFee: number;
  capacity: number | null;
  prices: Record<string, number>;
  /** Region code → cell, e.g. `Bid!E9`. */
  priceCells: Record<string, string>;
}
