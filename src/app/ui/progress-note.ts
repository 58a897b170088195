import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatProgressBarModule } from '@angular/material/progress-bar';

/**
 * A wait the reader should know about — a download being prepared, a workbook being sent or read,
 * a solve running: a Material progress bar with what is happening in words ("Preparing the
 * workbook…", "Sending workbook: 40 %", "Solving: 12 s of at most 60 s"). `percent` null is a wait
 * of unknown length (indeterminate). The words are announced politely (role=status); keep them
 * short-lived in change, or they chatter (a solve's seconds go in `detail`, which is not announced).
 */
@Component({
  selector: 'app-progress-note',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatProgressBarModule],
  template: `
    <mat-progress-bar
      [mode]="percent() === null ? 'indeterminate' : 'determinate'"
      [value]="percent() ?? 0"
      [attr.aria-label]="text()"
      [attr.aria-valuetext]="detail() || text()"
    />
    <!-- The space before the detail is in the interpolation: Angular drops white space between tags. -->
    <p class="progress-text"><span role="status" aria-live="polite">{{ text() }}</span>@if (detail()) {<span class="detail">{{ ' ' + detail() }}</span>}</p>
  `,
  styles: `
    :host { display: block; min-width: 12rem; margin: 4px 0; }
    .progress-text { margin: 4px 0 0; font-size: 0.875rem; }
  `,
})
export class ProgressNote {
  readonly text = input.required<string>();
  /** 0–100, or null while the length of the wait is unknown. */
  readonly percent = input<number | null>(null);
  /** Changing detail (elapsed seconds) shown, not announced. */
  readonly detail = input('');
}
