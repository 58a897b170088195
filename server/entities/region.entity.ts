import { DecimalType, Entity, Index, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import type { Tender } from './tender.entity';

/** A delivery region of a tender, with its forecast quantity over the contract. */
@Entity({ tableName: 'region' })
@Unique({ properties: ['tender', 'code'] })
// Tender lists count and sum a tender's regions from this index alone (an index-only scan).
@Index({ name: 'region_tender_id_forecast_index', expression: 'create index "region_tender_id_forecast_index" on "region" ("tender_id") include ("forecast")' })
export class Region extends BaseEntity {
  @ManyToOne({ entity: 'Tender', deleteRule: 'cascade' })
  tender!: Tender;

  @Property({ type: 'string', length: 20 })
  code!: string;

  @Property({ type: 'string', length: 120 })
  name!: string;

  @Property({ type: new DecimalType('number'), precision: 16, scale: 4 })
  forecast!: number;

  /** Order in which the buyer listed the regions. */
  @Property({ type: 'integer' })
  position!: number;
}
