import { Entity, Enum, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import { NOTICE_KINDS, NOTICE_STATUSES, type NoticeKind, type NoticeStatus } from '@shared/notices';
import { BaseEntity } from './base.entity';
import { Run } from './run.entity';
import { Tender } from './tender.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/** The award, regret or exclusion letter to one bidder, rendered once and kept as sent. One per bidder per award. */
@Entity({ tableName: 'notice' })
@Unique({ properties: ['tender', 'vendorOrganisation'] })
export class Notice extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => Run, deleteRule: 'restrict' })
  run!: Run;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendorOrganisation!: VendorOrganisation;

  @Enum({ items: () => NOTICE_KINDS, nativeEnumName: 'notice_kind' })
  kind!: NoticeKind;

  @Enum({ items: () => NOTICE_STATUSES, nativeEnumName: 'notice_status', default: 'queued' })
  status: NoticeStatus & Opt = 'queued';

  @Property({ type: 'text[]' })
  toAddresses!: string[];

  @Property({ type: 'string', length: 300 })
  subject!: string;

  @Property({ type: 'text' })
  html!: string;

  @Property({ type: 'text' })
  text!: string;

  @Property({ type: 'datetime' })
  standstillEndsAt!: Date;

  @Property({ type: 'integer', default: 0 })
  attempts: number & Opt = 0;

  @Property({ type: 'text', nullable: true })
  lastError?: string | null;

  @Property({ type: 'datetime', nullable: true })
  sentAt?: Date | null;
}
