import type { EntityManager } from '@mikro-orm/postgresql';
import { DEFAULT_NOTIFICATION_SETTINGS, type NotificationSettings } from '@shared/notifications';
import type { User } from '../../entities';
import { audit } from '../audit.service';

/** The signed-in person's reminders (no row yet: all on). */
export async function notificationSettings(em: EntityManager, user: User): Promise<NotificationSettings> {
  const [row] = await em.execute<{ closing_reminders: boolean; decision_updates: boolean }[]>(
    'select closing_reminders, decision_updates from notification_setting where user_id = ?', [user.id],
  );
  return row ? { closingReminders: row.closing_reminders, decisionUpdates: row.decision_updates } : { ...DEFAULT_NOTIFICATION_SETTINGS };
}

/**
 * Stores the person's choice and records it on the administration trail (who turned which
 * reminders off, and when: a reminder not received can then be explained). Legal notices have no
 * setting and are always sent.
 */
export async function saveNotificationSettings(em: EntityManager, user: User, input: NotificationSettings): Promise<NotificationSettings> {
  await em.transactional(async (tx) => {
    await tx.execute(
      `insert into notification_setting (user_id, closing_reminders, decision_updates, updated_at) values (?, ?, ?, now())
       on conflict (user_id) do update set closing_reminders = excluded.closing_reminders, decision_updates = excluded.decision_updates, updated_at = now()`,
      [user.id, input.closingReminders, input.decisionUpdates],
    );
    await audit(tx, {
      tenderId: null, actor: user, action: 'notification-settings.changed', subject: `person ${user.id}`,
      detail: { person: user.id, name: user.name, email: user.email, closingReminders: input.closingReminders, decisionUpdates: input.decisionUpdates },
    });
  });
  return notificationSettings(em, user);
}
