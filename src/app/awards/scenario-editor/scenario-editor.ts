import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
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
import { formSubmission } from '../../ui/form-submission';
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
  protected readonly data = inject<ScenarioEditorData>(MAT_DIALOG_DATA);

  protected readonly form = scenarioForm(this.data.scenario);
  protected readonly rules = this.form.controls.rules.controls;
  protected readonly sourcing = toSignal(this.rules.sourcing.valueChanges, { initialValue: this.rules.sourcing.value });
  protected readonly submission = formSubmission(this.form, undefined, { invalidMessage: 'Some fields need attention: see the messages under them.' });
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  protected groupMessage(key: 'vendorCounts' | 'excludeRequire'): string | null {
    const errors = this.form.controls.rules.errors;
    return typeof errors?.[key] === 'string' ? errors[key] : null;
  }

  protected submit(): void {
    this.submission.send(
      () => {
        const body = scenarioInput(this.form);
        return this.data.scenario
          ? this.api.updateScenario(this.data.scenario.id, body)
          : this.api.createScenario(this.data.tenderId, body);
      },
      (scenario) => this.dialogRef.close(scenario),
    );
  }
}
