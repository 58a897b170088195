import { Entity, Index, Property } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';

/** A message received by the local SMTP catcher: the raw bytes and the parsed parts. */
@Entity({ tableName: 'mail_message' })
export class MailMessage extends BaseEntity {
  @Property({ type: 'string', length: 998, nullable: true })
  messageId?: string | null;

  @Property({ type: 'string', length: 998 })
  fromAddress!: string;

  @Property({ type: 'text[]' })
  toAddresses!: string[];

  @Property({ type: 'string', length: 998 })
  subject!: string;

  @Property({ type: 'text' })
  text!: string;

  @Property({ type: 'text', nullable: true })
  html?: string | null;

  /** The Date header, or the time of receipt when absent. */
  @Index()
  @Property({ type: 'datetime' })
  sentAt!: Date;

  @Property({ type: 'blob', lazy: true })
  raw!: Buffer;
}
