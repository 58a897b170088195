import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, linkedSignal } from '@angular/core';
import { rxResource, takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { ROLES, ROLE_LABELS, type Role } from '@shared/roles';
import { inviteUserSchema, type PersonView, type VendorOrganisationView } from '@shared/people';
import { fieldMessage, zodFieldOf, zodValidator } from '../../ui/zod-validator';
import { OrganisationDialog } from '../organisation-dialog/organisation-dialog';
import { PeopleApi } from '../people-api';
import { formSubmission } from '../../ui/form-submission';

const fields = inviteUserSchema.shape;

function byName(a: VendorOrganisationView, b: VendorOrganisationView): number {
  return a.name.localeCompare(b.name);
}

/** Invites a person; closes with the new PersonView once the server has sent the e-mail. */
@Component({
  selector: 'app-invite-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './invite-dialog.html',
  styleUrl: './invite-dialog.scss',
})
export class InviteDialog {
  private readonly api = inject(PeopleApi);
  private readonly dialog = inject(MatDialog);
  private readonly dialogRef = inject<MatDialogRef<InviteDialog, PersonView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', zodValidator(fields.name)],
    email: ['', zodValidator(fields.email)],
    // Starts empty on purpose: a role is a deliberate choice, never a default.
    role: new FormControl<Role | null>(null, zodValidator(fields.role)),
    vendorOrganisationId: new FormControl<string | null>(null, zodFieldOf(inviteUserSchema, 'vendorOrganisationId')),
  });
  protected readonly roles = ROLES.map((role) => ({ value: role, label: ROLE_LABELS[role] }));
  private readonly role = toSignal(this.form.controls.role.valueChanges, { initialValue: null });
  protected readonly isVendor = computed(() => this.role() === 'vendor');

  private readonly loadedOrganisations = rxResource({ stream: () => this.api.organisations() });
  /** The server's list plus any organisation added from this dialog. */
  protected readonly organisations = linkedSignal<VendorOrganisationView[]>(() =>
    [...(this.loadedOrganisations.value() ?? [])].sort(byName),
  );
  protected readonly organisationsFailed = computed(() => this.loadedOrganisations.error() !== undefined);
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  constructor() {
    // The organisation is only asked of vendors: clear it for other roles and re-check the rule.
    this.form.controls.role.valueChanges.pipe(takeUntilDestroyed()).subscribe((role) => {
      const organisation = this.form.controls.vendorOrganisationId;
      if (role !== 'vendor') organisation.setValue(null, { emitEvent: false });
      organisation.updateValueAndValidity();
    });
  }

  protected roleMessage(): string {
    return this.form.controls.role.value === null ? 'Choose a role.' : (fieldMessage(this.form.controls.role) ?? '');
  }

  protected addOrganisation(): void {
    this.dialog
      .open<OrganisationDialog, void, VendorOrganisationView>(OrganisationDialog, { width: '520px', maxWidth: '95vw' })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((created) => {
        if (!created) return;
        this.organisations.update((list) => [...list, created].sort(byName));
        this.form.controls.vendorOrganisationId.setValue(created.id);
        this.form.controls.vendorOrganisationId.markAsTouched();
      });
  }

  protected submit(): void {
    this.form.controls.vendorOrganisationId.updateValueAndValidity();
    const parsed = inviteUserSchema.safeParse(this.form.getRawValue());
    // The form's own validators say what is wrong, field by field; the schema is the last word.
    if (!parsed.success && this.form.valid) return;
    this.submission.send(
      () => this.api.invite(inviteUserSchema.parse(this.form.getRawValue())),
      (person) => this.dialogRef.close(person),
    );
  }

}
