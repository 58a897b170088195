import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { NoticeStatus } from '@shared/notices';
import { NOTICE_STATUS_ICONS, NOTICE_STATUS_LABELS } from './notice-labels';

/** A notice's state as an icon and words, so colour is never the only signal. */
@Component({
  selector: 'app-notice-status-badge',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `<mat-icon aria-hidden="true">{{ icon() }}</mat-icon><span>{{ label() }}</span>`,
  host: { '[attr.data-status]': 'status()' },
  styles: `
    :host {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 2px 10px 2px 6px;
      border-radius: 999px;
      background: var(--mat-sys-surface-container-high);
      color: var(--mat-sys-on-surface);
      font: var(--mat-sys-label-large);
      white-space: nowrap;
    }
    mat-icon { width: 18px; height: 18px; font-size: 18px; }
    :host([data-status='sent']) {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    :host([data-status='failed']) {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
  `,
})
export class NoticeStatusBadge {
  readonly status = input.required<NoticeStatus>();

  protected readonly label = computed(() => NOTICE_STATUS_LABELS[this.status()]);
  protected readonly icon = computed(() => NOTICE_STATUS_ICONS[this.status()]);
}
