import { DecimalType, Entity, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import type { Tender } from './tender.entity';

/** A delivery region of a tender, with its forecast quantity over the contract. */
@Entity({ tableName: 'region' })
@Unique({ properties: ['tender', 'code'] })
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
