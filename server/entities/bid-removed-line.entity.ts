import { DecimalType, Entity, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import type { Bid } from './bid.entity';

/**
 * A unit price a bid gave for a region that an amendment later removed. The bid's receipt commits to
 * it (services/bid-commitment.ts), so it is kept, by region code, until the vendor saves the bid
 * again: the tabulation shows it apart (`removedPrices`, never evaluated) and checks the receipt
 * with it.
 */
@Entity({ tableName: 'bid_removed_line' })
@Unique({ properties: ['bid', 'regionCode'] })
export class BidRemovedLine extends BaseEntity {
  @ManyToOne({ entity: 'Bid', deleteRule: 'cascade' })
  bid!: Bid;

  @Property({ type: 'string', length: 20 })
  regionCode!: string;

  @Property({ type: 'string', length: 120 })
  regionName!: string;

  @Property({ type: new DecimalType('number'), precision: 16, scale: 4 })
  unitPrice!: number;

  /** The amendment that removed the region. */
  @Property({ type: 'integer' })
  amendmentNumber!: number;
}
