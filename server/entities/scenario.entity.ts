import { Entity, Enum, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import type { AwardRules } from '@shared/award';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

export const BUILT_IN_SCENARIOS = ['split', 'sole'] as const;

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

  /** The two scenarios every closed tender starts with; null for the buyer's own. */
  @Enum({ items: () => BUILT_IN_SCENARIOS, nativeEnumName: 'built_in_scenario', nullable: true })
  builtIn?: (typeof BUILT_IN_SCENARIOS)[number] | null;

  @ManyToOne({ entity: () => User, nullable: true, deleteRule: 'restrict' })
  createdBy?: User | null;
}
