import { Collection, Entity, ManyToOne, OneToMany, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { ContractLine } from './contract-line.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/**
 * An awarded vendor's contract, recorded by the buyer after the standstill: the signature date and
 * the schedule (its lines). One per vendor per tender; `createdAt` is when it was recorded.
 */
@Entity({ tableName: 'contract' })
@Unique({ properties: ['tender', 'vendorOrganisation'] })
export class Contract extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  /** The date the contract was signed (a calendar date, YYYY-MM-DD). */
  @Property({ type: 'date' })
  signedOn!: string;

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  recordedBy!: User;

  @OneToMany({ entity: () => ContractLine, mappedBy: 'contract', orderBy: { position: 'asc' } })
  lines = new Collection<ContractLine>(this);
}
