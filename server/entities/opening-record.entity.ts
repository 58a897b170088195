import { Entity, OneToOne, Property } from '@mikro-orm/core';
import type { OpeningRecordContent } from '@shared/compliance';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';

/**
 * What was opened at closing: every bid received (vendor, time received, revision, receipt) and
 * every bid withdrawn, written by the transaction that closes the tender (services/opening-record.ts).
 * `digest` is the SHA-256 of the canonical JSON of `content`; the `tender.closed` audit entry carries it.
 */
@Entity({ tableName: 'opening_record' })
export class OpeningRecord extends BaseEntity {
  @OneToOne({ entity: () => Tender, owner: true, deleteRule: 'cascade', unique: 'opening_record_tender_id_unique' })
  tender!: Tender;

  @Property({ type: 'json' })
  content!: OpeningRecordContent;

  @Property({ type: 'string', length: 64 })
  digest!: string;
}
