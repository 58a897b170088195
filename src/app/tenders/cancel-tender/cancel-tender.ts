import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialog, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { cancelInputSchema } from '@shared/procedure';
import type { TenderView } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { ProcedureApi } from '../procedure-api';
import { localClosingTime } from '../closing-time';
import { formSubmission } from '../../ui/form-submission';

/** Asks for the reason and names what cancelling does; closes with the cancelled tender. */
@Component({
  selector: 'app-cancel-tender-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Cancel {{ tender.reference }}?</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p>Cancelling ends this procedure for good. It cannot be undone:</p>
        <ul>
          <li>bidding stops at once and no contract is awarded under this tender;</li>
          @if (tender.status === 'open') {
            <li>every invited vendor is e-mailed that the tender is cancelled, with your reason;</li>
            <li>the {{ tender.submittedBids ?? 0 }} submitted {{ (tender.submittedBids ?? 0) === 1 ? 'bid stays' : 'bids stay' }} sealed: nobody, you included, will see the figures.</li>
          }
        </ul>
        <p class="secondary">Whether and how a tender may be cancelled depends on your procurement rules and the applicable law; take advice if in doubt.</p>
        <div class="form-error" role="alert">
          @if (failure(); as message) {
            <mat-icon aria-hidden="true">error</mat-icon><span>{{ message }}</span>
          }
        </div>
        <mat-form-field appearance="outline" class="full-width">
          <mat-label>Reason for cancelling</mat-label>
          <textarea matInput formControlName="reason" rows="3" required></textarea>
          <mat-hint>Sent to invited vendors and kept in the audit trail.</mat-hint>
          @if (fieldMessage(reason); as m) {
            <mat-error>{{ m }}</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Keep the tender</button>
        <button mat-flat-button type="submit" class="destructive" [disabled]="busy()">{{ busy() ? 'Cancelling…' : 'Cancel tender' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    p, ul { max-width: 56ch; }
    .full-width { width: 100%; }
    .destructive {
      --mat-button-filled-container-color: var(--mat-sys-error);
      --mat-button-filled-label-text-color: var(--mat-sys-on-error);
    }
  `,
})
export class CancelTenderDialog {
  protected readonly tender = inject<TenderView>(MAT_DIALOG_DATA);
  private readonly api = inject(ProcedureApi);
  private readonly ref = inject<MatDialogRef<CancelTenderDialog, TenderView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly reason = new FormControl('', { nonNullable: true, validators: zodValidator(cancelInputSchema.shape.reason) });
  protected readonly form = new FormGroup({ reason: this.reason });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    this.submission.send(
      () => this.api.cancel(this.tender.id, this.reason.value),
      (tender) => this.ref.close(tender),
    );
  }

}

/** The buyer's "Cancel tender…" button (draft or open tenders) and, once cancelled, the notice with the reason. */
@Component({
  selector: 'app-cancel-tender',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule],
  template: `
    @if (tender().cancellation; as c) {
      <div class="caution cancelled" role="note">
        <mat-icon aria-hidden="true">block</mat-icon>
        <p><strong>Cancelled {{ when(c.at) }}.</strong> Reason: {{ c.reason }} Bids on this tender are never opened.</p>
      </div>
    } @else if (canCancel()) {
      <button mat-stroked-button type="button" class="cancel" (click)="open()"><mat-icon>block</mat-icon>Cancel tender…</button>
    }
  `,
  styles: `
    :host { display: block; }
    .cancelled { display: flex; gap: 8px; align-items: flex-start; }
    .cancelled p { margin: 0; }
    .cancel { --mat-button-outlined-label-text-color: var(--mat-sys-error); }
  `,
})
export class CancelTender {
  private readonly dialog = inject(MatDialog);
  private readonly auth = inject(Auth);
  private readonly destroyRef = inject(DestroyRef);
  readonly tender = input.required<TenderView>();
  readonly changed = output<TenderView>();
  protected readonly canCancel = computed(() => this.auth.user()?.role === 'buyer' && ['draft', 'open'].includes(this.tender().status));
  protected readonly when = (iso: string) => localClosingTime(iso, this.tender().timeZone);

  protected open(): void {
    this.dialog
      .open<CancelTenderDialog, TenderView, TenderView>(CancelTenderDialog, { data: this.tender(), maxWidth: '95vw', autoFocus: 'first-tabbable' })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((tender) => {
        if (tender) this.changed.emit(tender);
      });
  }
}
