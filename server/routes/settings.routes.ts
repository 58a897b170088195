import { notificationSettingsSchema } from '@shared/notifications';
import { route, type AnyRoute } from '../http/route';
import { notificationSettings, saveNotificationSettings } from '../services/notifications/settings.service';

/** The signed-in person's own settings: which reminders they receive by e-mail. */
export function settingsRoutes(): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/me/notification-settings', tag: 'Settings', access: 'signed-in', response: notificationSettingsSchema,
      summary: 'Which reminders the signed-in person receives by e-mail (closing reminders, updates on recommendations and the standstill). Legal notices have no setting: they are always sent.',
      handler: ({ em, user }) => notificationSettings(em, user),
    }),
    route({
      method: 'put', path: '/me/notification-settings', tag: 'Settings', access: 'signed-in', body: notificationSettingsSchema, response: notificationSettingsSchema,
      summary: 'Turn reminders on or off for the signed-in person. Award and regret letters, exclusion notices, amendments and clarifications are always sent.',
      handler: ({ em, user, body }) => saveNotificationSettings(em, user, body),
    }),
  ];
}
