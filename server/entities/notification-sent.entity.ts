import { Entity, Index, ManyToOne, Property, Unique } from '@mikro-orm/core';
import { BaseEntity } from './base.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/**
 * One notification e-mail queued for one person about one event (DEVELOPERS.md, "Notifications"):
 * the unique key (kind, subject, recipient) is what makes a notification go out once. The row is
 * inserted (`on conflict do nothing`) in the transaction that queues the mail, and the mail is
 * queued only when the row was new; it is also the record that the notification was sent.
 */
@Entity({ tableName: 'notification_sent' })
@Unique({ name: 'notification_sent_once', properties: ['kind', 'subjectId', 'recipient'] })
@Index({ properties: ['tender'] })
export class NotificationSent extends BaseEntity {
  /** A `NotificationKind` of shared/notifications.ts. */
  @Property({ type: 'text' })
  kind!: string;

  /** The event's subject: the recommendation, question, amendment or tender it is about. */
  @Property({ type: 'uuid' })
  subjectId!: string;

  @ManyToOne({ entity: () => User, deleteRule: 'cascade' })
  recipient!: User;

  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade', nullable: true })
  tender?: Tender | null;

  @Property({ type: 'text' })
  subject!: string;
}
