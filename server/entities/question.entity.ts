import { Entity, Enum, Index, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

export const QUESTION_STATUSES = ['asked', 'answered'] as const;

/**
 * A vendor's clarification question and the buyer's answer. Who asked is kept for the buyer,
 * compliance and admin only; once answered, the question and answer are published to every invited
 * vendor under `number` (1, 2, … in the order answers were published), without the asker.
 */
@Entity({ tableName: 'question' })
@Unique({ properties: ['tender', 'number'] })
@Index({ properties: ['tender', 'createdAt'] })
export class Question extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  askedBy!: User;

  @Property({ type: 'text' })
  text!: string;

  @Enum({ items: () => QUESTION_STATUSES, nativeEnumName: 'question_status', default: 'asked' })
  status: (typeof QUESTION_STATUSES)[number] & Opt = 'asked';

  @Property({ type: 'integer', nullable: true })
  number?: number | null;

  @Property({ type: 'text', nullable: true })
  answer?: string | null;

  @Property({ type: 'datetime', nullable: true })
  answeredAt?: Date | null;

  @ManyToOne({ entity: () => User, nullable: true, deleteRule: 'restrict' })
  answeredBy?: User | null;
}
