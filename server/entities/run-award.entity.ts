import { DecimalType, Entity, Index, ManyToOne, Property } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { Run } from './run.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/** A run's award as rows (vendor × region), for queries and letters; the JSON result is the record. */
@Entity({ tableName: 'run_award' })
@Index({ properties: ['run'] })
export class RunAward extends BaseEntity {
  @ManyToOne({ entity: () => Run, deleteRule: 'cascade' })
  run!: Run;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  @Property({ type: 'string', length: 20 })
  regionCode!: string;

  @Property({ type: new DecimalType('number'), precision: 18, scale: 6 })
  quantity!: number;

  @Property({ type: new DecimalType('number'), precision: 16, scale: 4 })
  unitPrice!: number;

  @Property({ type: new DecimalType('number'), precision: 20, scale: 4 })
  cost!: number;
}
