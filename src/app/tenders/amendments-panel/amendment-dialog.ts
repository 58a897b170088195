import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormArray, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { RegionInput } from '@shared/bids';
import { amendmentInputSchema, type AmendmentInput } from '@shared/procedure';
import type { TenderView } from '@shared/tenders';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { localClosingTime } from '../closing-time';
import { ProcedureApi } from '../procedure-api';
import { regionGroup, zonedInstant, zonedParts, type RegionGroup } from '../tender-editor/tender-form';
import { formSubmission } from '../../ui/form-submission';

/** The buyer's "Issue amendment" form: reason, a later closing time, description, regions and forecasts. */
@Component({
  selector: 'app-amendment-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './amendment-dialog.html',
  styleUrl: './amendment-dialog.scss',
})
export class AmendmentDialog {
  protected readonly tender = inject<TenderView>(MAT_DIALOG_DATA);
  private readonly api = inject(ProcedureApi);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly ref = inject<MatDialogRef<AmendmentDialog, number>>(MatDialogRef);

  /** Closing times are entered and shown in the procedure's time zone. */
  private readonly current = zonedParts(this.tender.closesAt, this.tender.timeZone);
  protected readonly form = this.fb.group({
    reason: ['', zodValidator(amendmentInputSchema.shape.reason)],
    closesDate: [this.current.date],
    closesTime: [this.current.time],
    description: [this.tender.description],
    regions: this.fb.array<RegionGroup>(this.tender.regions.map((r) => regionGroup(this.fb, r))),
  });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;
  protected readonly closingTime = localClosingTime(this.tender.closesAt, this.tender.timeZone);

  protected get regions(): FormArray<RegionGroup> {
    return this.form.controls.regions;
  }

  protected addRegion(): void {
    this.regions.push(regionGroup(this.fb));
  }

  protected removeRegion(index: number): void {
    this.regions.removeAt(index);
  }

  /** Only what differs from the tender is sent. */
  private amendment(): AmendmentInput {
    const v = this.form.getRawValue();
    const out: AmendmentInput = { reason: v.reason };
    const closesAt = zonedInstant(v.closesDate, v.closesTime, this.tender.timeZone);
    if (closesAt && (v.closesDate !== this.current.date || v.closesTime !== this.current.time)) out.closesAt = closesAt;
    if (v.description !== this.tender.description) out.description = v.description;
    const regions = v.regions.map((r) => ({ code: r.code.trim(), name: r.name.trim(), forecast: r.forecast ?? 0 }) satisfies RegionInput);
    const same = regions.length === this.tender.regions.length
      && regions.every((r, i) => r.code === this.tender.regions[i].code && r.name === this.tender.regions[i].name && r.forecast === this.tender.regions[i].forecast);
    if (!same) out.regions = regions;
    return out;
  }

  protected submit(): void {
    this.submission.send(() => this.api.amend(this.tender.id, this.amendment()), ({ number }) => this.ref.close(number));
  }

}
