import { Entity, Enum, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import type { AwardRules } from '@shared/award';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/** In the order of the database enum: the published basis first. */
export const BUILT_IN_SCENARIOS = ['published', 'split', 'sole'] as const;

/** A named set of award rules for a closed tender. Vendor ids in rules are organisation ids. */
@Entity({ tableName: 'scenario' })
@Unique({ properties: ['tender', 'name'] })
export class Scenario extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @Property({ type: 'string', length: 120 })
  name!: string;

  @Property({ type: 'json' })
  rules!: AwardRules;

  @Property({ type: 'integer', default: 60 })
  timeLimitSeconds: number & Opt = 60;

  /** The scenarios every closed tender starts with (its published basis, all split, all sole); null for the buyer's own. */
  @Enum({ items: () => BUILT_IN_SCENARIOS, nativeEnumName: 'built_in_scenario', nullable: true })
  builtIn?: (typeof BUILT_IN_SCENARIOS)[number] | null;

  @ManyToOne({ entity: () => User, nullable: true, deleteRule: 'restrict' })
  createdBy?: User | null;
}
