import { Entity, OneToOne, Property, type Opt } from '@mikro-orm/core';
import { User } from './user.entity';

/**
 * A person's choice of reminders (GET/PUT /api/me/notification-settings). No row: every reminder
 * is on. Legal notices have no setting: they are always sent.
 */
@Entity({ tableName: 'notification_setting' })
export class NotificationSetting {
  @OneToOne({ entity: () => User, primary: true, deleteRule: 'cascade', owner: true })
  user!: User;

  @Property({ type: 'boolean', default: true })
  closingReminders: boolean & Opt = true;

  @Property({ type: 'boolean', default: true })
  decisionUpdates: boolean & Opt = true;

  @Property({ type: 'datetime', defaultRaw: 'now()', onUpdate: () => new Date() })
  updatedAt: Date & Opt = new Date();
}
