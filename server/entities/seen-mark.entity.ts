import { Entity, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/**
 * What a person last looked at, per tender, for the worklist (server/services/worklist.service.ts):
 * `clarifications` — a vendor read the tender's clarifications (answers published later are new to
 * it); `audit-verified` — a compliance officer verified the tender's audit chain and it held
 * (entries written later are still to verify). Written by the reads themselves, never audited: it
 * records what a person saw, not a decision.
 */
export const SEEN_MARK_KINDS = ['clarifications', 'audit-verified'] as const;
export type SeenMarkKind = (typeof SEEN_MARK_KINDS)[number];

@Entity({ tableName: 'seen_mark' })
@Unique({ name: 'seen_mark_user_id_tender_id_kind_unique', properties: ['user', 'tender', 'kind'] })
export class SeenMark extends BaseEntity {
  @ManyToOne({ entity: () => User, deleteRule: 'cascade' })
  user!: User;

  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @Property({ type: 'string', length: 20 })
  kind!: SeenMarkKind;

  @Property({ type: 'datetime' })
  seenAt: Date & Opt = new Date();
}
