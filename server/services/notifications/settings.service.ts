import type { EntityManager } from '@mikro-orm/postgresql';
import { DEFAULT_NOTIFICATION_SETTINGS, type NotificationSettings } from '@shared/notifications';
import type { User } from '../../entities';
import { audit } from '../audit.service';
import { notificationSettingRow, upsertNotificationSetting } from '../queries/notifications.queries';

/** The signed-in person's reminders (no row yet: all on). */
export async function notificationSettings(em: EntityManager, user: User): Promise<NotificationSettings> {
  const row = await notificationSettingRow(em, user.id);
  return row ? { closingReminders: row.closing_reminders, decisionUpdates: row.decision_updates } : { ...DEFAULT_NOTIFICATION_SETTINGS };
}

/**
 * Stores the person's choice and records it on the administration trail (who turned which
 * reminders off, and when: a reminder not received can then be explained). Legal notices have no
 * setting and are always sent.
 */
export async function saveNotificationSettings(em: EntityManager, user: User, input: NotificationSettings): Promise<NotificationSettings> {
  await em.transactional(async (tx) => {
    await upsertNotificationSetting(tx, user.id, { closing_reminders: input.closingReminders, decision_updates: input.decisionUpdates });
    await audit(tx, {
      tenderId: null, actor: user, action: 'notification-settings.changed', subject: `person ${user.id}`,
      detail: { person: user.id, name: user.name, email: user.email, closingReminders: input.closingReminders, decisionUpdates: input.decisionUpdates },
    });
  });
  return notificationSettings(em, user);
}
