import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import {
  EXCLUSION_GROUND_LABELS, EXCLUSION_GROUNDS, complianceInputSchema, type ComplianceDecision, type ExclusionGround,
} from '@shared/compliance';
import type { TabulatedBid } from '@shared/tenders';
import { fieldMessage, zodFieldOf } from '../../ui/zod-validator';
import { TenderApi } from '../tender-api';
import { formSubmission } from '../../ui/form-submission';

export interface BidCheckDialogData {
  tenderId: string;
  bid: TabulatedBid;
}

/** The buyer's compliance check of one bid: compliant, or excluded on a ground with a note. Closes with the bid as stored. */
@Component({
  selector: 'app-bid-check-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatRadioModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Compliance check: {{ data.bid.vendor.name }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p class="dialog-intro">
          Check the bid against the tender's requirements before the evaluation. An excluded bid is left out of every
          award scenario and its vendor receives an exclusion notice with your ground and note instead of a regret letter.
        </p>
        <aside class="caution" aria-label="Before excluding">
          <mat-icon aria-hidden="true">gavel</mat-icon>
          <p>
            Exclusion grounds and the evidence they need are set by your procurement rules and the law that applies to this
            tender; take advice when in doubt. The vendor may challenge the decision.
          </p>
        </aside>
        <div class="form-error" role="alert" aria-live="assertive">
          @if (failure(); as message) {
            <mat-icon aria-hidden="true">error</mat-icon>
            <span>{{ message }}</span>
          }
        </div>
        <p id="check-decision-label" class="field-label">Decision</p>
        <mat-radio-group formControlName="decision" aria-labelledby="check-decision-label" class="choices" (change)="decisionChanged()">
          <mat-radio-button value="compliant">Compliant: evaluate this bid</mat-radio-button>
          <mat-radio-button value="excluded">Excluded from the evaluation</mat-radio-button>
        </mat-radio-group>
        @if (form.controls.decision.value === 'excluded') {
          <mat-form-field appearance="outline" class="full-width">
            <mat-label>Ground for exclusion</mat-label>
            <mat-select formControlName="ground" required>
              @for (g of grounds; track g) {
                <mat-option [value]="g">{{ groundLabels[g] }}</mat-option>
              }
            </mat-select>
            @if (form.controls.ground.invalid) {
              <mat-error>{{ fieldMessage(form.controls.ground) }}</mat-error>
            }
          </mat-form-field>
        }
        <mat-form-field appearance="outline" class="full-width">
          <mat-label>Note</mat-label>
          <textarea matInput formControlName="note" rows="4" required></textarea>
          <mat-hint>What you checked and found. An exclusion's note is quoted in the vendor's notice.</mat-hint>
          @if (form.controls.note.invalid) {
            <mat-error>{{ fieldMessage(form.controls.note) }}</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">{{ busy() ? 'Saving…' : 'Record the check' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .field-label { margin: 8px 0 4px; font: var(--mat-sys-title-small); }
    .choices { display: flex; flex-direction: column; margin-bottom: 12px; }
    .caution p { margin: 0; }
  `,
})
export class BidCheckDialog {
  private readonly api = inject(TenderApi);
  private readonly dialogRef = inject<MatDialogRef<BidCheckDialog, TabulatedBid>>(MatDialogRef);
  protected readonly data = inject<BidCheckDialogData>(MAT_DIALOG_DATA);
  protected readonly grounds = EXCLUSION_GROUNDS;
  protected readonly groundLabels = EXCLUSION_GROUND_LABELS;
  protected readonly form = new FormGroup({
    decision: new FormControl<ComplianceDecision>(this.data.bid.compliance.decision ?? 'compliant', { nonNullable: true }),
    ground: new FormControl<ExclusionGround | null>(this.data.bid.compliance.ground, { validators: zodFieldOf(complianceInputSchema, 'ground') }),
    note: new FormControl(this.data.bid.compliance.note ?? '', { nonNullable: true, validators: zodFieldOf(complianceInputSchema, 'note') }),
  });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  protected decisionChanged(): void {
    if (this.form.controls.decision.value === 'compliant') this.form.controls.ground.setValue(null);
    this.form.controls.ground.updateValueAndValidity();
  }

  protected submit(): void {
    const value = this.form.getRawValue();
    this.submission.send(
      () => this.api.checkBid(this.data.tenderId, this.data.bid.id, { decision: value.decision, ground: value.decision === 'excluded' ? value.ground : null, note: value.note.trim() }),
      (bid) => this.dialogRef.close(bid),
    );
  }

}
