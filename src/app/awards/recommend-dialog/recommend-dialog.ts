import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { recommendationInputSchema, type RecommendationView } from '@shared/evaluation';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { AwardApi } from '../award-api';
import { AwardCaution } from '../award-caution';
import { formSubmission } from '../../ui/form-submission';

export interface RecommendDialogData {
  tenderId: string;
  runId: string;
  scenarioName: string;
  total: string;
  /** The run's status in the buyer's words (with the margin when not proven best). */
  status: string;
  /** A revision after a return starts from the earlier justification. */
  justification?: string;
}

/** The buyer recommends a run's award to compliance, with a justification; closes with the recommendation. */
@Component({
  selector: 'app-recommend-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule, AwardCaution],
  template: `
    <h2 mat-dialog-title>Recommend this award</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p>
          Scenario <strong>{{ data.scenarioName }}</strong>, total {{ data.total }}. Compliance will approve it
          or return it to you; someone other than you must decide.
        </p>
        @if (data.status) {
          <p class="run-status-words"><strong>{{ data.status }}.</strong></p>
        }
        <app-award-caution />
        <div class="form-error" role="alert" aria-live="assertive">
          @if (failure(); as message) {
            <mat-icon aria-hidden="true">error</mat-icon>
            <span>{{ message }}</span>
          }
        </div>
        <mat-form-field appearance="outline" class="full-width">
          <mat-label>Justification</mat-label>
          <textarea matInput [formControl]="justification" rows="6" required cdkFocusInitial></textarea>
          <mat-hint>Why this award: the rules chosen, what they cost, and anything compliance should know.</mat-hint>
          @if (justification.invalid) {
            <mat-error>{{ fieldMessage(justification) }}</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">{{ busy() ? 'Sending…' : 'Recommend' }}</button>
      </mat-dialog-actions>
    </form>
  `,
})
export class RecommendDialog {
  private readonly api = inject(AwardApi);
  private readonly dialogRef = inject<MatDialogRef<RecommendDialog, RecommendationView>>(MatDialogRef);
  protected readonly data = inject<RecommendDialogData>(MAT_DIALOG_DATA);
  protected readonly justification = new FormControl(this.data.justification ?? '', {
    nonNullable: true,
    validators: zodValidator(recommendationInputSchema.shape.justification),
  });
  /**
   * The group is there for its directive: without [formGroup] nothing turns the form's submit into
   * ngSubmit, and the browser would post the page itself (a reload that closes the dialog unsaved).
   */
  protected readonly form = new FormGroup({ justification: this.justification });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    this.submission.send(
      () => this.api.recommend(this.data.tenderId, this.data.runId, this.justification.value.trim()),
      (recommendation) => this.dialogRef.close(recommendation),
    );
  }

}
