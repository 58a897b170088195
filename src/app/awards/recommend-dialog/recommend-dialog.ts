import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { recommendationInputSchema, type RecommendationView } from '@shared/evaluation';
import { ApiError } from '../../core/http/api-error';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { AwardApi } from '../award-api';
import { AwardCaution } from '../award-caution';

export interface RecommendDialogData {
  tenderId: string;
  runId: string;
  scenarioName: string;
  total: string;
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
  private readonly destroyRef = inject(DestroyRef);
  protected readonly data = inject<RecommendDialogData>(MAT_DIALOG_DATA);
  protected readonly justification = new FormControl('', {
    nonNullable: true,
    validators: zodValidator(recommendationInputSchema.shape.justification),
  });
  /**
   * The group is there for its directive: without [formGroup] nothing turns the form's submit into
   * ngSubmit, and the browser would post the page itself (a reload that closes the dialog unsaved).
   */
  protected readonly form = new FormGroup({ justification: this.justification });
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    if (this.busy()) return;
    if (this.justification.invalid) {
      this.justification.markAsTouched();
      return;
    }
    this.busy.set(true);
    this.failure.set(null);
    this.api
      .recommend(this.data.tenderId, this.data.runId, this.justification.value.trim())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (recommendation) => this.dialogRef.close(recommendation),
        error: (error: unknown) => {
          this.busy.set(false);
          if (!(error instanceof ApiError)) throw error;
          const justification = error.fieldErrors.find((e) => e.field === 'justification');
          if (justification) this.justification.setErrors({ server: justification.message });
          this.failure.set(error.userMessage);
        },
      });
  }
}
