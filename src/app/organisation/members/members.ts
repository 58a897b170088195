import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import type { MemberView, Membership } from '@shared/people';
import { ApiError } from '../../core/http/api-error';
import { switchMap } from 'rxjs';
import { type ConfirmData, whenConfirmed } from '../../ui/confirm-dialog';
import { OrganisationApi } from '../organisation-api';
import { loadErrorMessage } from '../../ui/load-error';

type Member = MemberView['people'][number];

const MEMBERSHIP_LABELS: Record<Membership, string> = {
  approved: 'Member',
  pending: 'Awaiting your approval',
  refused: 'Refused',
};

/** /organisation — a vendor's own firm: its people, and the contact's approval of new ones. */
@Component({
  selector: 'app-members',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './members.html',
  styleUrl: './members.scss',
})
export class Members {
  private readonly api = inject(OrganisationApi);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly view = rxResource({ stream: () => this.api.members() });
  protected readonly loadError = computed(() => loadErrorMessage(this.view.error(), 'Your organisation could not be loaded.'));
  protected readonly pending = computed(() => (this.view.value()?.people ?? []).filter((p) => p.membership === 'pending'));
  protected readonly columns = ['name', 'email', 'state'];
  protected readonly status = signal('');

  protected stateLabel(person: Member): string {
    if (person.membership === 'approved' && !person.active) return 'Deactivated';
    return MEMBERSHIP_LABELS[person.membership];
  }

  protected approve(person: Member, organisation: string): void {
    this.decide(person, {
      title: `Add ${person.name} to ${organisation}?`,
      message: `${person.name} (${person.email}) gets a link to set a password, and can then see and submit ${organisation}'s bids.`,
      confirm: 'Approve',
    }, true, `${person.name} is approved and has been sent a link to set a password.`);
  }

  protected refuse(person: Member, organisation: string): void {
    this.decide(person, {
      title: `Refuse ${person.name}?`,
      message: `${person.name} (${person.email}) will not join ${organisation} and cannot sign in. The administrators are told through their audit trail.`,
      confirm: 'Refuse',
      destructive: true,
    }, false, `${person.name} is refused.`);
  }

  private decide(person: Member, question: ConfirmData, approve: boolean, done: string): void {
    whenConfirmed(this.dialog, question)
      .pipe(
        switchMap(() => (approve ? this.api.approve(person.id) : this.api.refuse(person.id))),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe({
        next: (updated) => {
          this.view.set(updated);
          this.status.set(done);
        },
        error: (error: unknown) =>
          this.status.set(error instanceof ApiError ? error.userMessage : 'That did not work. Please try again.'),
      });
  }
}
