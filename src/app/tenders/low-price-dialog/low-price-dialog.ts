import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { abnormallyLowInputSchema } from '@shared/compliance';
import type { TabulatedBid } from '@shared/tenders';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { TenderApi } from '../tender-api';
import { formSubmission } from '../../ui/form-submission';

export interface LowPriceDialogData {
  tenderId: string;
  bid: TabulatedBid;
  /** The flags in words, as the tabulation shows them. */
  flags: string[];
}

/** A datetime-local value (local time, to the minute) for `date`. */
function localInput(date: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}T${pad(date.getHours())}:${pad(date.getMinutes())}`;
}

/**
 * The buyer records, for a bid flagged as abnormally low, when an explanation was asked for and
 * whether it was accepted, with the reasons. Closes with the bid as stored.
 */
@Component({
  selector: 'app-low-price-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatRadioModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Abnormally low: {{ data.bid.vendor.name }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p class="dialog-intro">Flagged in this bid:</p>
        <ul class="flags">
          @for (f of data.flags; track f) {
            <li>{{ f }}</li>
          }
        </ul>
        <aside class="caution" aria-label="Before deciding">
          <mat-icon aria-hidden="true">gavel</mat-icon>
          <p>
            A flag is a first screen, not a finding: ask the vendor to explain its price before rejecting it. Whether an
            explanation is enough is for your procurement rules and the law that applies to this tender. A bid whose
            explanation you do not accept is excluded in its compliance check, on the ground “abnormally low”.
          </p>
        </aside>
        <div class="form-error" role="alert" aria-live="assertive">
          @if (failure(); as message) {
            <mat-icon aria-hidden="true">error</mat-icon>
            <span>{{ message }}</span>
          }
        </div>
        <mat-form-field appearance="outline" class="full-width">
          <mat-label>Explanation asked for on</mat-label>
          <input matInput type="datetime-local" formControlName="explanationRequestedAt" required />
          <mat-hint>Your local time.</mat-hint>
          @if (form.controls.explanationRequestedAt.invalid) {
            <mat-error>{{ fieldMessage(form.controls.explanationRequestedAt) }}</mat-error>
          }
        </mat-form-field>
        <p id="low-accepted-label" class="field-label">Was the explanation accepted?</p>
        <mat-radio-group formControlName="accepted" aria-labelledby="low-accepted-label" class="choices">
          <mat-radio-button [value]="true">Accepted: the price is sustainable</mat-radio-button>
          <mat-radio-button [value]="false">Not accepted</mat-radio-button>
        </mat-radio-group>
        <mat-form-field appearance="outline" class="full-width">
          <mat-label>Note</mat-label>
          <textarea matInput formControlName="note" rows="4" required></textarea>
          <mat-hint>What the vendor explained and why you accept it or not.</mat-hint>
          @if (form.controls.note.invalid) {
            <mat-error>{{ fieldMessage(form.controls.note) }}</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">{{ busy() ? 'Saving…' : 'Record the decision' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .field-label { margin: 8px 0 4px; font: var(--mat-sys-title-small); }
    .choices { display: flex; flex-direction: column; margin-bottom: 12px; }
    .flags { margin: 0 0 12px; }
    .caution p { margin: 0; }
  `,
})
export class LowPriceDialog {
  private readonly api = inject(TenderApi);
  private readonly dialogRef = inject<MatDialogRef<LowPriceDialog, TabulatedBid>>(MatDialogRef);
  protected readonly data = inject<LowPriceDialogData>(MAT_DIALOG_DATA);
  private readonly previous = this.data.bid.abnormallyLow;
  protected readonly form = new FormGroup({
    explanationRequestedAt: new FormControl(localInput(this.previous?.explanationRequestedAt ? new Date(this.previous.explanationRequestedAt) : new Date()), {
      nonNullable: true,
      validators: (c) => (c.value && !Number.isNaN(new Date(c.value as string).getTime()) ? null : { zod: 'Enter the date and time the explanation was asked for.' }),
    }),
    accepted: new FormControl<boolean>(this.previous?.accepted ?? true, { nonNullable: true }),
    note: new FormControl(this.previous?.note ?? '', { nonNullable: true, validators: zodValidator(abnormallyLowInputSchema.shape.note) }),
  });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    const value = this.form.getRawValue();
    this.submission.send(
      () => this.api.decideLowPrice(this.data.tenderId, this.data.bid.id, {
        explanationRequestedAt: new Date(value.explanationRequestedAt).toISOString(), accepted: value.accepted, note: value.note.trim(),
      }),
      (bid) => this.dialogRef.close(bid),
    );
  }

}
