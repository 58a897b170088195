import { Routes } from '@angular/router';
import { NotificationSettingsPage } from './notification-settings';

/** Every signed-in role: app.routes.ts guards the area with roleGuard (all roles). */
export const SETTINGS_ROUTES: Routes = [{ path: '', title: 'Notification settings', component: NotificationSettingsPage }];
