import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { type Subscription } from 'rxjs';
import { apiProblem } from './load-error';
import { ProgressNote } from './progress-note';
import { downloadFile, type Transfer } from './transfer';

/**
 * An export link that shows its progress: still a plain link (keyboard, "save link as", works
 * without scripts), but a click fetches the file through `downloadFile` and shows what is happening
 * below it ("Preparing the workbook…", then the download's percentage) until the browser has it.
 *
 *     <app-download-link [href]="exportUrl()" preparing="Preparing the workbook…">Export to .xlsx</app-download-link>
 *
 * The link draws its own icon (`icon`, "download" unless told) in the button's icon slot: an icon
 * passed in as content would land inside the button's label, where Material neither sizes nor
 * spaces it (a component's content is matched against the button's slots by its own template).
 */
@Component({
  selector: 'app-download-link',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, ProgressNote],
  template: `
    <a mat-stroked-button [href]="href()" download [attr.aria-describedby]="describedBy() || null" [attr.aria-busy]="transfer() ? 'true' : null" (click)="start($event)">
      <mat-icon aria-hidden="true">{{ icon() }}</mat-icon>
      <ng-content />
    </a>
    @if (transfer(); as t) {
      <app-progress-note [text]="t.text" [percent]="t.percent" />
    } @else if (outcome()) {
      <p class="outcome" role="status">{{ outcome() }}</p>
    }
  `,
  styles: `
    :host { display: inline-flex; flex-direction: column; align-items: flex-start; vertical-align: top; }
    .outcome { margin: 4px 0 0; font-size: 0.875rem; }
  `,
})
export class DownloadLink {
  private readonly http = inject(HttpClient);
  private readonly destroyRef = inject(DestroyRef);

  readonly href = input.required<string>();
  /** What the server is doing meanwhile: "Preparing the workbook…". */
  readonly preparing = input('Preparing the file…');
  readonly describedBy = input('');
  /** A Material Symbols name shown before the label. */
  readonly icon = input('download');

  protected readonly transfer = signal<Transfer<string> | null>(null);
  protected readonly outcome = signal('');
  private running: Subscription | null = null;

  protected start(event: MouseEvent): void {
    // A modified click (new tab, save as) is the browser's own.
    if (event.ctrlKey || event.metaKey || event.shiftKey || event.altKey || event.button !== 0) return;
    event.preventDefault();
    if (this.running) return;
    this.outcome.set('');
    this.transfer.set({ text: this.preparing(), percent: null });
    this.running = downloadFile(this.http, this.href(), this.preparing())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (t) => {
          if (t.result === undefined) this.transfer.set(t);
          else this.outcome.set(`Downloaded ${t.result}.`);
        },
        error: (error: unknown) => {
          this.running = null;
          this.transfer.set(null);
          this.outcome.set(`The file could not be downloaded: ${apiProblem(error)?.userMessage ?? 'please try again.'}`);
        },
        complete: () => {
          this.running = null;
          this.transfer.set(null);
        },
      });
  }
}
