import { Entity, ManyToOne, Property, Unique } from '@mikro-orm/core';
import type { AmendmentChanges } from '@shared/procedure';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/** A numbered change to an open tender (1, 2, …): what changed, and why. */
@Entity({ tableName: 'amendment' })
@Unique({ properties: ['tender', 'number'] })
export class Amendment extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @Property({ type: 'integer' })
  number!: number;

  @Property({ type: 'text' })
  reason!: string;

  @Property({ type: 'json' })
  changes!: AmendmentChanges;

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  issuedBy!: User;
}
