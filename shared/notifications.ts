import { z } from 'zod';
import type { Role } from './roles';

/**
 * Notification e-mails (DEVELOPERS.md, "Notifications"). Each kind is either a reminder, which a
 * person may turn off on the settings page, or a legal notice, which is always sent: it tells a
 * vendor something the procedure requires it to be told (the buyer's procurement rules and the law
 * that applies decide what exactly; Tendara never lets anyone opt out of these).
 */
export const NOTIFICATION_KINDS = [
  'recommendation-waiting', 'recommendation-returned', 'recommendation-approved', 'standstill-ended',
  'closing-reminder-48h', 'closing-reminder-2h',
  'clarification-answered', 'amendment-issued', 'bid-resubmit',
] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

/** Which setting turns a kind off; `null`: a legal notice, always sent. */
export const NOTIFICATION_SETTING: Record<NotificationKind, keyof NotificationSettings | null> = {
  'recommendation-waiting': 'decisionUpdates',
  'recommendation-returned': 'decisionUpdates',
  'recommendation-approved': 'decisionUpdates',
  'standstill-ended': 'decisionUpdates',
  'closing-reminder-48h': 'closingReminders',
  'closing-reminder-2h': 'closingReminders',
  'clarification-answered': null,
  'amendment-issued': null,
  'bid-resubmit': null,
};

/** GET and PUT /api/me/notification-settings: the reminders a person receives (both on by default). */
export const notificationSettingsSchema = z.object({
  closingReminders: z.boolean({ error: 'Closing reminders must be on or off.' }),
  decisionUpdates: z.boolean({ error: 'Updates on recommendations must be on or off.' }),
});
export type NotificationSettings = z.infer<typeof notificationSettingsSchema>;

export const DEFAULT_NOTIFICATION_SETTINGS: NotificationSettings = { closingReminders: true, decisionUpdates: true };

/** Which settings concern a role: vendors get closing reminders, buyers and compliance decision updates. */
export const SETTINGS_FOR_ROLE: Record<Role, (keyof NotificationSettings)[]> = {
  vendor: ['closingReminders'],
  buyer: ['decisionUpdates'],
  compliance: ['decisionUpdates'],
  admin: [],
};

/** Hours before closing at which invited vendors with a draft or no bid are reminded (once each). */
export const CLOSING_REMINDER_HOURS = { 'closing-reminder-48h': 48, 'closing-reminder-2h': 2 } as const;
