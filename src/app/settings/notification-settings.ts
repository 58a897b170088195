import { ChangeDetectionStrategy, Component, computed, effect, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { SETTINGS_FOR_ROLE } from '@shared/notifications';
import { Auth } from '../core/auth/auth';
import { formSubmission } from '../ui/form-submission';
import { loadErrorMessage } from '../ui/load-error';
import { SettingsApi } from './settings-api';

/**
 * /settings — which reminders the signed-in person receives by e-mail. Reminders can be turned off;
 * legal notices cannot, and the page says which are which.
 */
@Component({
  selector: 'app-notification-settings',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatIconModule, MatProgressBarModule, MatSlideToggleModule],
  templateUrl: './notification-settings.html',
  styleUrl: './notification-settings.scss',
})
export class NotificationSettingsPage {
  private readonly api = inject(SettingsApi);
  private readonly auth = inject(Auth);

  protected readonly settings = rxResource({ stream: () => this.api.notifications() });
  protected readonly form = inject(NonNullableFormBuilder).group({ closingReminders: true, decisionUpdates: true });
  protected readonly submission = formSubmission(this.form);
  protected readonly loadError = computed(() => loadErrorMessage(this.settings.error(), 'Your notification settings could not be loaded.'));
  protected readonly status = signal('');
  /** The reminders that concern this person's role. */
  protected readonly shown = computed(() => new Set(SETTINGS_FOR_ROLE[this.auth.user()?.role ?? 'admin']));
  protected readonly vendor = computed(() => this.auth.user()?.role === 'vendor');

  constructor() {
    effect(() => {
      const value = this.settings.value();
      if (value) this.form.setValue(value);
    });
  }

  protected save(): void {
    this.status.set('');
    this.submission.send(
      () => this.api.saveNotifications(this.form.getRawValue()),
      (saved) => {
        this.form.setValue(saved);
        this.form.markAsPristine();
        this.status.set('Your notification settings are saved.');
      },
    );
  }
}
