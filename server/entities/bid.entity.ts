import { Collection, DecimalType, Entity, Enum, ManyToOne, OneToMany, Property, Unique, type Opt } from '@mikro-orm/core';
import type { ComplianceDecision, ExclusionGround } from '@shared/compliance';
import { BID_STATUSES, type BidStatus } from '@shared/tenders';
import { BaseEntity } from './base.entity';
import { BidLine } from './bid-line.entity';
import type { BidDocument } from './bid-document.entity';
import { Tender } from './tender.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/**
 * A vendor organisation's one live bid on a tender. `version` guards against two tabs saving over
 * each other (optimistic locking); `revision` counts submissions; `digest` is the commitment to the
 * content at the last submission (the vendor's receipt carries it), keyed with `nonce`, 256 random
 * bits drawn for that submission and never served before closing (services/bid-commitment.ts).
 */
@Entity({ tableName: 'bid' })
@Unique({ properties: ['tender', 'vendorOrganisation'] })
export class Bid extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  @Enum({ items: () => BID_STATUSES, nativeEnumName: 'bid_status', default: 'draft' })
  status: BidStatus & Opt = 'draft';

  @Property({ type: new DecimalType('number'), precision: 16, scale: 2 })
  fixedFee!: number;

  /** null = no cap. */
  @Property({ type: new DecimalType('number'), precision: 16, scale: 4, nullable: true })
  capacity?: number | null;

  @Property({ type: 'datetime', nullable: true })
  submittedAt?: Date | null;

  @Property({ type: 'string', length: 64, nullable: true })
  digest?: string | null;

  /** The commitment's key, hex; secret until the tender closes. Null for drafts and withdrawn bids. */
  @Property({ type: 'string', length: 64, nullable: true })
  nonce?: string | null;

  @Property({ type: 'integer', default: 0 })
  revision: number & Opt = 0;

  @Property({ type: 'integer', version: true })
  version!: number & Opt;

  /** The number of the last amendment issued when the bid was submitted (0: the original documents). */
  @Property({ type: 'integer', default: 0 })
  answersAmendment: number & Opt = 0;

  /** What an amendment did to this bid, for the vendor ("Amendment 2 added region …"); cleared when it submits again. */
  @Property({ type: 'text', nullable: true })
  amendmentNote?: string | null;

  @ManyToOne({ entity: 'BidDocument', nullable: true, deleteRule: 'set null' })
  document?: BidDocument | null;

  /** The buyer's compliance check after closing (services/compliance.service.ts); null: not yet checked. */
  @Property({ type: 'string', length: 20, nullable: true })
  complianceDecision?: ComplianceDecision | null;

  @Property({ type: 'string', length: 30, nullable: true })
  complianceGround?: ExclusionGround | null;

  @Property({ type: 'text', nullable: true })
  complianceNote?: string | null;

  @Property({ type: 'datetime', nullable: true })
  complianceDecidedAt?: Date | null;

  /** The buyer's decision on an abnormally low flag: explanation asked (when), accepted or not, why. */
  @Property({ type: 'datetime', nullable: true })
  lowPriceExplanationRequestedAt?: Date | null;

  @Property({ type: 'boolean', nullable: true })
  lowPriceAccepted?: boolean | null;

  @Property({ type: 'text', nullable: true })
  lowPriceNote?: string | null;

  @Property({ type: 'datetime', nullable: true })
  lowPriceDecidedAt?: Date | null;

  /** The vendor confirmed its bid stays valid until then (after the tender's validity period). */
  @Property({ type: 'datetime', nullable: true })
  validityExtendedUntil?: Date | null;

  @OneToMany({ entity: () => BidLine, mappedBy: 'bid', orphanRemoval: true })
  lines = new Collection<BidLine>(this);
}
