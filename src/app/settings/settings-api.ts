import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { NotificationSettings } from '@shared/notifications';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** The signed-in person's own settings. */
@Injectable({ providedIn: 'root' })
export class SettingsApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  notifications(): Observable<NotificationSettings> {
    return this.http.get<NotificationSettings>(`${this.base}/me/notification-settings`);
  }

  saveNotifications(settings: NotificationSettings): Observable<NotificationSettings> {
    return this.http.put<NotificationSettings>(`${this.base}/me/notification-settings`, settings);
  }
}
