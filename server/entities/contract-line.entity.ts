import { DecimalType, Entity, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import type { Contract } from './contract.entity';
import { Region } from './region.entity';

/** One region of a contract's schedule: the quantity contracted and its unit price. */
@Entity({ tableName: 'contract_line' })
@Unique({ properties: ['contract', 'region'] })
export class ContractLine extends BaseEntity {
  @ManyToOne({ entity: 'Contract', deleteRule: 'cascade' })
  contract!: Contract;

  @ManyToOne({ entity: () => Region, deleteRule: 'restrict' })
  region!: Region;

  @Property({ type: new DecimalType('number'), precision: 16, scale: 4 })
  quantity!: number;

  @Property({ type: new DecimalType('number'), precision: 16, scale: 4 })
  unitPrice!: number;

  /** Order of the schedule (the tender's region order). */
  @Property({ type: 'integer' })
  position!: number;
}
