import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, type MatDialog } from '@angular/material/dialog';
import { filter, type Observable } from 'rxjs';

export interface ConfirmData {
  title: string;
  message: string;
  confirm: string;
  /** Facts to read before confirming, shown as a list of terms and values below the message. */
  details?: { term: string; value: string }[];
  /** Destructive actions get the error colour on their button. */
  destructive?: boolean;
}

/** A yes/no question. Closes with true when confirmed, undefined otherwise. */
@Component({
  selector: 'app-confirm-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatDialogModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p>{{ data.message }}</p>
      @if (data.details?.length) {
        <dl class="details">
          @for (item of data.details; track item.term) {
            <div><dt>{{ item.term }}</dt><dd>{{ item.value }}</dd></div>
          }
        </dl>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" mat-dialog-close>Cancel</button>
      <button
        mat-flat-button
        type="button"
        [class.destructive]="data.destructive"
        [mat-dialog-close]="true"
        cdkFocusInitial
      >
        {{ data.confirm }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    p { margin: 0; max-width: 52ch; }
    .details { margin: 16px 0 0; display: grid; gap: 8px; max-width: 60ch; }
    .details dt { font-weight: 500; }
    .details dd { margin: 0; white-space: pre-line; }
    .destructive {
      --mat-button-filled-container-color: var(--mat-sys-error);
      --mat-button-filled-label-text-color: var(--mat-sys-on-error);
    }
  `,
})
export class ConfirmDialog {
  protected readonly data = inject<ConfirmData>(MAT_DIALOG_DATA);
}

/** Asks `question` in a ConfirmDialog; emits once, only if the person confirmed. */
export function whenConfirmed(dialog: MatDialog, question: ConfirmData): Observable<true> {
  return dialog
    .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data: question, maxWidth: '95vw' })
    .afterClosed()
    .pipe(filter((confirmed): confirmed is true => confirmed === true));
}
