import { Entity, Enum, Index, ManyToOne, Property, type Opt } from '@mikro-orm/core';
import { RECOMMENDATION_STATUSES, type RecommendationStatus } from '@shared/evaluation';
import { BaseEntity } from './base.entity';
import { Run } from './run.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/** The buyer's recommended award and compliance's decision on it (never by the same person). */
@Entity({ tableName: 'recommendation' })
// At most one live (recommended or approved) recommendation per tender.
@Index({ name: 'recommendation_live_unique', expression: `create unique index "recommendation_live_unique" on "recommendation" ("tender_id") where status <> 'returned'` })
export class Recommendation extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => Run, deleteRule: 'restrict' })
  run!: Run;

  @Enum({ items: () => RECOMMENDATION_STATUSES, nativeEnumName: 'recommendation_status', default: 'recommended' })
  status: RecommendationStatus & Opt = 'recommended';

  @Property({ type: 'text' })
  justification!: string;

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  recommendedBy!: User;

  @ManyToOne({ entity: () => User, nullable: true, deleteRule: 'restrict' })
  decidedBy?: User | null;

  @Property({ type: 'datetime', nullable: true })
  decidedAt?: Date | null;

  @Property({ type: 'text', nullable: true })
  comment?: string | null;
}
