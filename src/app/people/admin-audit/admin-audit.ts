import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import type { AuditVerification } from '@shared/evaluation';
import { ROLE_LABELS, type Role } from '@shared/roles';
import { localDateTime } from '../../awards/award-format';
import { ApiError } from '../../core/http/api-error';
import { PeopleApi } from '../people-api';
import { SkeletonRows } from '../../ui/skeleton-rows';
import { loadErrorMessage } from '../../ui/load-error';

/** How many of the newest entries the page shows. */
const SHOWN = 50;

/** The admin audit trail on the People page: who did what to which account, newest first. */
@Component({
  selector: 'app-admin-audit',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [SkeletonRows, MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './admin-audit.html',
  styleUrl: './admin-audit.scss',
})
export class AdminAudit {
  private readonly api = inject(PeopleApi);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly entries = rxResource({ stream: () => this.api.auditTrail() });
  protected readonly newest = computed(() => [...(this.entries.value() ?? [])].reverse().slice(0, SHOWN));
  protected readonly total = computed(() => this.entries.value()?.length ?? 0);
  protected readonly loadError = computed(() => loadErrorMessage(this.entries.error(), 'The admin audit trail could not be loaded.'));
  protected readonly columns = ['at', 'actor', 'description'];
  protected readonly verification = signal<AuditVerification | null>(null);
  protected readonly verifyMessage = signal('');
  protected readonly when = localDateTime;

  /** Loads the trail again (the People page calls it after each of its actions). */
  reload(): void {
    this.entries.reload();
  }

  protected roleLabel(role: string): string {
    return ROLE_LABELS[role as Role] ?? role;
  }

  protected verify(): void {
    this.verifyMessage.set('Checking the chain…');
    this.api
      .verifyAuditTrail()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (result) => {
          this.verification.set(result);
          this.verifyMessage.set(result.ok ? `Chain intact. ${result.message}` : `Chain broken. ${result.message}`);
        },
        error: (error: unknown) => this.verifyMessage.set(error instanceof ApiError ? error.userMessage : 'The chain could not be checked.'),
      });
  }
}
