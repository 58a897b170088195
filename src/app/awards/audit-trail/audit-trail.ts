import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { AuditVerification } from '@shared/evaluation';
import { ROLE_LABELS, type Role } from '@shared/roles';
import { ApiError } from '../../core/http/api-error';
import { AwardApi } from '../award-api';
import { shortDigest } from '../award-format';
import { localClosingTime } from '../../tenders/closing-time';
import { loadErrorMessage } from '../../ui/load-error';
import { DownloadLink } from '../../ui/download-link';
import { SkeletonRows } from '../../ui/skeleton-rows';

/** tenders/:id/evaluation/audit — every state change and decision, hash-chained, with a check of the chain. */
@Component({
  selector: 'app-audit-trail',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [SkeletonRows, DownloadLink, RouterLink, MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule, MatTooltipModule],
  templateUrl: './audit-trail.html',
  styleUrl: './audit-trail.scss',
})
export class AuditTrail {
  private readonly api = inject(AwardApi);
  private readonly destroyRef = inject(DestroyRef);

  readonly id = input.required<string>();

  protected readonly entries = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.audit(params) });
  /** For its time zone: every time of the procedure is shown in it, the zone named. */
  private readonly tender = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.tender(params) });
  protected readonly timeZone = computed(() => this.tender.value()?.timeZone);
  protected readonly loadError = computed(() => loadErrorMessage(this.entries.error(), 'The audit trail could not be loaded.'));
  protected readonly columns = ['seq', 'at', 'actor', 'description', 'digests'];
  protected readonly verification = signal<AuditVerification | null>(null);
  protected readonly verifyError = signal<string | null>(null);
  protected readonly verifying = signal(false);
  /** What the live region says; set once per check so it is announced once. */
  protected readonly announcement = computed(() => {
    if (this.verifying()) return 'Checking the chain…';
    const error = this.verifyError();
    if (error) return error;
    const v = this.verification();
    if (!v) return '';
    // The server's message already counts the entries; the prefix gives the verdict first.
    return v.ok
      ? `Chain intact. ${v.message}`
      : `Chain broken${v.brokenAt !== null ? ` at entry ${v.brokenAt}` : ''}. ${v.message}`;
  });
  /** "Thu, 3 Dec 2026, 02:31 GMT", in the procedure's zone (named above the table) once the tender is loaded. */
  protected when(iso: string): string {
    const zone = this.timeZone();
    return zone ? localClosingTime(iso, zone, false) : '…';
  }
  protected readonly short = shortDigest;

  protected csvUrl(): string {
    return this.api.auditCsvUrl(this.id());
  }

  protected roleLabel(role: string): string {
    return ROLE_LABELS[role as Role] ?? role;
  }

  protected verify(): void {
    this.verifying.set(true);
    this.verifyError.set(null);
    this.verification.set(null);
    this.api
      .verifyAudit(this.id())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (result) => {
          this.verification.set(result);
          this.verifying.set(false);
        },
        error: (error: unknown) => {
          this.verifyError.set(error instanceof ApiError ? error.userMessage : 'The chain could not be checked.');
          this.verifying.set(false);
        },
      });
  }
}
