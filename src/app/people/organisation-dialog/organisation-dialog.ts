import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { vendorOrganisationSchema, type VendorOrganisationView } from '@shared/people';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { PeopleApi } from '../people-api';
import { formSubmission } from '../../ui/form-submission';

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

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', zodValidator(fields.name)],
    registrationNumber: ['', zodValidator(fields.registrationNumber)],
    contactEmail: ['', zodValidator(fields.contactEmail)],
    sme: [false],
  });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    this.submission.send(
      () => this.api.addOrganisation(vendorOrganisationSchema.parse(this.form.getRawValue())),
      (organisation) => this.dialogRef.close(organisation),
    );
  }

}
