import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { vendorOrganisationSchema, type VendorOrganisationView } from '@shared/people';
import { ApiError } from '../../core/http/api-error';
import { applyServerErrors } from '../../ui/server-errors';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { PeopleApi } from '../people-api';

const fields = vendorOrganisationSchema.shape;

/** Registers a vendor organisation; closes with the created organisation. */
@Component({
  selector: 'app-organisation-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatCheckboxModule,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './organisation-dialog.html',
})
export class OrganisationDialog {
  private readonly api = inject(PeopleApi);
  private readonly dialogRef = inject<MatDialogRef<OrganisationDialog, VendorOrganisationView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', zodValidator(fields.name)],
    registrationNumber: ['', zodValidator(fields.registrationNumber)],
    contactEmail: ['', zodValidator(fields.contactEmail)],
    sme: [false],
  });
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    if (this.busy()) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.failure.set(null);
    this.api
      .addOrganisation(vendorOrganisationSchema.parse(this.form.getRawValue()))
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (organisation) => this.dialogRef.close(organisation),
        error: (error: unknown) => {
          this.busy.set(false);
          if (!(error instanceof ApiError)) throw error;
          const unplaced = applyServerErrors(this.form, error.fieldErrors);
          this.failure.set([error.userMessage, ...unplaced].join(' '));
        },
      });
  }
}
