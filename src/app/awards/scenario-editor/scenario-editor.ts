import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import type { ScenarioView } from '@shared/evaluation';
import type { RegionView } from '@shared/tenders';
import { ApiError } from '../../core/http/api-error';
import { applyServerErrors } from '../../ui/server-errors';
import { fieldMessage } from '../../ui/zod-validator';
import { AwardApi } from '../award-api';
import { scenarioForm, scenarioInput } from './scenario-form';

export interface ScenarioEditorData {
  tenderId: string;
  regions: RegionView[];
  vendors: { id: string; name: string; sme: boolean }[];
  /** The scenario to edit; null for a new one. */
  scenario: ScenarioView | null;
}

/** Creates or edits a scenario; closes with the saved ScenarioView. */
@Component({
  selector: 'app-scenario-editor',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatRadioModule,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './scenario-editor.html',
  styleUrl: './scenario-editor.scss',
})
export class ScenarioEditor {
  private readonly api = inject(AwardApi);
  private readonly dialogRef = inject<MatDialogRef<ScenarioEditor, ScenarioView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly data = inject<ScenarioEditorData>(MAT_DIALOG_DATA);

  protected readonly form = scenarioForm(this.data.scenario);
  protected readonly rules = this.form.controls.rules.controls;
  protected readonly sourcing = toSignal(this.rules.sourcing.valueChanges, { initialValue: this.rules.sourcing.value });
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly fieldMessage = fieldMessage;

  protected groupMessage(key: 'vendorCounts' | 'excludeRequire'): string | null {
    const errors = this.form.controls.rules.errors;
    return typeof errors?.[key] === 'string' ? errors[key] : null;
  }

  protected submit(): void {
    if (this.busy()) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.failure.set('Some fields need attention: see the messages under them.');
      return;
    }
    this.busy.set(true);
    this.failure.set(null);
    const body = scenarioInput(this.form);
    const save = this.data.scenario
      ? this.api.updateScenario(this.data.scenario.id, body)
      : this.api.createScenario(this.data.tenderId, body);
    save.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (scenario) => this.dialogRef.close(scenario),
      error: (error: unknown) => {
        this.busy.set(false);
        if (!(error instanceof ApiError)) throw error;
        const unplaced = applyServerErrors(this.form, error.fieldErrors);
        this.failure.set([error.userMessage, ...unplaced].join(' '));
      },
    });
  }
}
