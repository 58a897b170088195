import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, output, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { invitationInputSchema, type TenderView } from '@shared/tenders';
import { ApiError } from '../../core/http/api-error';
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

  protected readonly chosen = new FormControl<string[]>([], { nonNullable: true });
  protected readonly addNew = signal(false);
  protected readonly newVendor = this.fb.group({
    organisationName: ['', zodValidator(newVendorFields.organisationName)],
    registrationNumber: ['', zodValidator(newVendorFields.registrationNumber)],
    sme: [false],
    contactName: ['', zodValidator(newVendorFields.contactName)],
    contactEmail: ['', zodValidator(newVendorFields.contactEmail)],
  });
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly fieldMessage = fieldMessage;

  protected invite(): void {
    if (this.busy()) return;
    this.failure.set(null);
    const withNew = this.addNew();
    if (withNew && this.newVendor.invalid) {
      this.newVendor.markAllAsTouched();
      return;
    }
    const parsed = invitationInputSchema.safeParse({
      vendorOrganisationIds: this.chosen.value,
      newVendor: withNew ? this.newVendor.getRawValue() : undefined,
    });
    if (!parsed.success) {
      this.failure.set(parsed.error.issues[0]?.message ?? 'Choose who to invite.');
      return;
    }
    this.busy.set(true);
    const count = parsed.data.vendorOrganisationIds.length + (parsed.data.newVendor ? 1 : 0);
    this.api
      .invite(this.tender().id, parsed.data)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (tender) => {
          this.busy.set(false);
          this.chosen.setValue([]);
          this.newVendor.reset();
          this.addNew.set(false);
          this.changed.emit(tender);
          this.allOrganisations.reload();
          const mailed = tender.status === 'open' ? ' They are e-mailed now.' : ' They are e-mailed when you publish.';
          this.announce.emit(`${count} ${count === 1 ? 'organisation' : 'organisations'} invited.${mailed}`);
        },
        error: (error: unknown) => {
          this.busy.set(false);
          if (!(error instanceof ApiError)) throw error;
          const messages = error.fieldErrors.map((e) => e.message);
          for (const e of error.fieldErrors) {
            const control = this.newVendor.get(e.field.replace(/^newVendor\./, ''));
            if (control) control.setErrors({ server: e.message });
          }
          this.failure.set([error.userMessage, ...messages].join(' '));
        },
      });
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
