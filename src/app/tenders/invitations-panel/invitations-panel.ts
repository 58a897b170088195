import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, output, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { fieldPath } from '@shared/field-path';
import { invitationInputSchema, type InvitationInput, type TenderView } from '@shared/tenders';
import { ApiError } from '../../core/http/api-error';
import { formSubmission } from '../../ui/form-submission';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { TenderApi } from '../tender-api';
import { localClosingTime } from '../closing-time';

const newVendorFields = invitationInputSchema.shape.newVendor.unwrap().shape;

/** The invited organisations of a tender and, for the buyer, the ways to invite more. */
@Component({
  selector: 'app-invitations-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatFormFieldModule, MatSelectModule, MatInputModule, MatCheckboxModule, MatButtonModule, MatIconModule],
  templateUrl: './invitations-panel.html',
  styleUrl: './invitations-panel.scss',
})
export class InvitationsPanel {
  private readonly api = inject(TenderApi);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly destroyRef = inject(DestroyRef);

  readonly tender = input.required<TenderView>();
  readonly canEdit = input(false);
  readonly changed = output<TenderView>();
  /** A sentence for the page's live region. */
  readonly announce = output<string>();

  protected readonly invitations = computed(() => this.tender().invitations ?? []);
  /** Invitations can be added until closing and withdrawn only from a draft. */
  protected readonly canInvite = computed(() => this.canEdit() && ['draft', 'open'].includes(this.tender().status));
  protected readonly canRemove = computed(() => this.canEdit() && this.tender().status === 'draft');

  private readonly allOrganisations = rxResource({
    params: () => (this.canInvite() ? true : undefined),
    stream: () => this.api.organisations(),
  });
  protected readonly available = computed(() => {
    const invited = new Set(this.invitations().map((i) => i.vendorOrganisation.id));
    return (this.allOrganisations.value() ?? []).filter((o) => !invited.has(o.id)).sort((a, b) => a.name.localeCompare(b.name));
  });

  /** The request's own shape, so the server's field paths (`newVendor.contactEmail`) name its controls. */
  protected readonly form = this.fb.group({
    vendorOrganisationIds: this.fb.control<string[]>([]),
    // Enabled only while "Also invite a new vendor contact" is ticked: a disabled group is not checked.
    newVendor: this.fb.group({
      organisationName: ['', zodValidator(newVendorFields.organisationName)],
      registrationNumber: ['', zodValidator(newVendorFields.registrationNumber)],
      sme: [false],
      contactName: ['', zodValidator(newVendorFields.contactName)],
      contactEmail: ['', zodValidator(newVendorFields.contactEmail)],
    }),
  });
  protected readonly chosen = this.form.controls.vendorOrganisationIds;
  protected readonly newVendor = this.form.controls.newVendor;
  protected readonly addNew = signal(false);
  private readonly submission = formSubmission(this.form, this.destroyRef, {
    // The rule over the whole request (someone to invite) is the schema's own; its problem goes under the list.
    check: () => {
      const parsed = invitationInputSchema.safeParse(this.body());
      return parsed.success ? [] : parsed.error.issues.map((issue) => ({ field: fieldPath(issue.path), message: issue.message }));
    },
  });
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;
  protected readonly fieldMessage = fieldMessage;

  constructor() {
    this.newVendor.disable();
  }

  protected setAddNew(checked: boolean): void {
    this.addNew.set(checked);
    if (checked) this.newVendor.enable();
    else this.newVendor.disable();
  }

  private body(): InvitationInput {
    return {
      vendorOrganisationIds: this.chosen.value,
      newVendor: this.addNew() ? this.newVendor.getRawValue() : undefined,
    };
  }

  protected invite(): void {
    const body = this.body();
    const count = body.vendorOrganisationIds.length + (body.newVendor ? 1 : 0);
    this.submission.send(
      () => this.api.invite(this.tender().id, body),
      (tender) => {
        this.form.reset();
        this.setAddNew(false);
        this.changed.emit(tender);
        this.allOrganisations.reload();
        const mailed = tender.status === 'open' ? ' They are e-mailed now.' : ' They are e-mailed when you publish.';
        this.announce.emit(`${count} ${count === 1 ? 'organisation' : 'organisations'} invited.${mailed}`);
      },
    );
  }

  protected remove(organisationId: string, name: string): void {
    this.api
      .removeInvitation(this.tender().id, organisationId)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (tender) => {
          this.changed.emit(tender);
          this.announce.emit(`The invitation of ${name} is withdrawn.`);
        },
        error: (error: unknown) => this.failure.set(error instanceof ApiError ? error.userMessage : 'The invitation could not be withdrawn.'),
      });
  }

  protected invitedOn(iso: string): string {
    return localClosingTime(iso, this.tender().timeZone);
  }
}
