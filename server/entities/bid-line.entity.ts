import { DecimalType, Entity, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import type { Bid } from './bid.entity';
import { Region } from './region.entity';

/** A unit price for one region. A region without a line was not offered. */
@Entity({ tableName: 'bid_line' })
@Unique({ properties: ['bid', 'region'] })
export class BidLine extends BaseEntity {
  @ManyToOne({ entity: 'Bid', deleteRule: 'cascade' })
  bid!: Bid;

  @ManyToOne({ entity: () => Region, deleteRule: 'cascade' })
  region!: Region;

  @Property({ type: new DecimalType('number'), precision: 16, scale: 4 })
  unitPrice!: number;
}
