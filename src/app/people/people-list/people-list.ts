import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  effect,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { BreakpointObserver } from '@angular/cdk/layout';
import { rxResource, takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { ROLE_LABELS } from '@shared/roles';
import type { PersonView } from '@shared/people';
import { Observable, map, switchMap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { ApiError } from '../../core/http/api-error';
import { type ConfirmData, whenConfirmed } from '../../ui/confirm-dialog';
import { AdminAudit } from '../admin-audit/admin-audit';
import { InviteDialog } from '../invite-dialog/invite-dialog';
import { PeopleApi } from '../people-api';
import { STATUS_LABELS, personStatus } from '../person-status';
import { loadErrorMessage } from '../../ui/load-error';
import { SkeletonRows } from '../../ui/skeleton-rows';

/** The text a row is sorted and filtered by, per column. */
function cellText(person: PersonView, column: string): string {
  switch (column) {
    case 'role':
      return ROLE_LABELS[person.role];
    case 'organisation':
      return person.vendorOrganisation?.name ?? '';
    case 'status':
      return STATUS_LABELS[personStatus(person)];
    case 'email':
      return person.email;
    default:
      return person.name;
  }
}

const FILTER_COLUMNS = ['name', 'email', 'role', 'organisation', 'status'];

function matches(person: PersonView, filter: string): boolean {
  return FILTER_COLUMNS.some((column) => cellText(person, column).toLocaleLowerCase().includes(filter));
}

/** /people — everyone who can sign in, and the administrator's actions on them. */
@Component({
  selector: 'app-people-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    SkeletonRows, MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatMenuModule,
    MatProgressBarModule,
    AdminAudit,
  ],
  templateUrl: './people-list.html',
  styleUrl: './people-list.scss',
})
export class PeopleList {
  private readonly api = inject(PeopleApi);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);
  private readonly me = inject(Auth).user;
  private readonly sort = viewChild.required(MatSort);
  private readonly paginator = viewChild.required(MatPaginator);

  /** On a phone the e-mail, role and organisation move under the name, so nothing scrolls. */
  protected readonly narrow = toSignal(
    inject(BreakpointObserver).observe('(max-width: 719.98px)').pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly columns = computed(() =>
    this.narrow()
      ? ['name', 'status', 'actions']
      : ['name', 'email', 'role', 'organisation', 'status', 'actions'],
  );
  protected readonly people = new MatTableDataSource<PersonView>([]);
  private readonly list = rxResource({ stream: () => this.api.list() });
  protected readonly loading = this.list.isLoading;
  protected readonly loadError = computed(() => loadErrorMessage(this.list.error(), 'People could not be loaded.'));
  /** Announced politely after each action ("Invitation sent to …"). */
  protected readonly status = signal('');
  protected readonly filter = signal('');
  private readonly normalisedFilter = computed(() => this.filter().trim().toLocaleLowerCase());
  private readonly rows = computed(() => (this.list.hasValue() ? this.list.value() : []));
  protected readonly count = computed(() => this.rows().length);
  protected readonly shown = computed(() => {
    const filter = this.normalisedFilter();
    return filter ? this.rows().filter((person) => matches(person, filter)).length : this.count();
  });
  private readonly audit = viewChild(AdminAudit);
  protected readonly statusLabel = STATUS_LABELS;
  protected readonly statusOf = personStatus;

  constructor() {
    this.people.sortingDataAccessor = (person, column) => cellText(person, column).toLocaleLowerCase();
    this.people.filterPredicate = matches;
    effect(() => {
      this.people.sort = this.sort();
      this.people.paginator = this.paginator();
    });
    effect(() => {
      this.people.data = this.rows();
    });
    effect(() => {
      this.people.filter = this.normalisedFilter();
      this.people.paginator?.firstPage();
    });
  }

  protected roleText(person: PersonView): string {
    return ROLE_LABELS[person.role];
  }

  protected isMe(person: PersonView): boolean {
    return person.id === this.me()?.id;
  }

  protected onFilter(event: Event): void {
    this.filter.set((event.target as HTMLInputElement).value);
  }

  protected load(): void {
    this.list.reload();
  }


  protected invite(): void {
    this.dialog
      .open<InviteDialog, void, PersonView>(InviteDialog, { width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((person) => {
        if (!person) return;
        this.list.update((rows) => [...(rows ?? []), person]);
        this.audit()?.reload();
        this.status.set(
          person.membership === 'pending'
            ? `${person.name} is added to ${person.vendorOrganisation?.name}, pending approval by its contact; they get their link once approved.`
            : `Invitation sent to ${person.email}.`,
        );
      });
  }

  protected deactivate(person: PersonView): void {
    this.confirmThen(
      {
        title: `Deactivate ${person.name}?`,
        message: `${person.name} can no longer sign in, and every session they have open ends at once. You can reactivate them later.`,
        confirm: 'Deactivate',
        destructive: true,
      },
      () => this.api.deactivate(person.id),
      `${person.name} is deactivated; their sessions have ended.`,
    );
  }

  protected reactivate(person: PersonView): void {
    this.confirmThen(
      {
        title: `Reactivate ${person.name}?`,
        message: `${person.name} can sign in again with their existing password, in the role ${ROLE_LABELS[person.role]}.`,
        confirm: 'Reactivate',
      },
      () => this.api.reactivate(person.id),
      `${person.name} is active again.`,
    );
  }

  protected resendInvitation(person: PersonView): void {
    this.api
      .resendInvitation(person.id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          this.audit()?.reload();
          this.status.set(`A new invitation link was sent to ${person.email}. Earlier links no longer work.`);
        },
        error: (error: unknown) => this.status.set(this.describe(error)),
      });
  }

  protected sendPasswordReset(person: PersonView): void {
    whenConfirmed(this.dialog, {
      title: `Send ${person.name} a password reset?`,
      message: `A one-time link goes to ${person.email} only. When ${person.name} uses it, every session they have open ends. Their present password works until then.`,
      confirm: 'Send reset link',
    })
      .pipe(
        switchMap(() => this.api.sendPasswordReset(person.id)),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe({
        next: () => {
          this.audit()?.reload();
          this.status.set(`A password reset link was sent to ${person.email}.`);
        },
        error: (error: unknown) => this.status.set(this.describe(error)),
      });
  }

  private confirmThen(question: ConfirmData, action: () => Observable<PersonView>, done: string): void {
    whenConfirmed(this.dialog, question)
      .pipe(switchMap(action), takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (updated) => {
          this.list.update((rows) => (rows ?? []).map((row) => (row.id === updated.id ? updated : row)));
          this.audit()?.reload();
          this.status.set(done);
        },
        error: (error: unknown) => this.status.set(this.describe(error)),
      });
  }

  private describe(error: unknown): string {
    return error instanceof ApiError ? error.userMessage : 'That did not work. Please try again.';
  }
}
