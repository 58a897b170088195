import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import type { TenderView } from '@shared/tenders';
import { ApiError } from '../../core/http/api-error';
import { localClosingTime } from '../../tenders/closing-time';
import { BidApi } from '../bid-api';

/**
 * After closing, on the vendor's bid page: until when its bid must stay valid (closing time plus the
 * tender's bid validity period), and a button to confirm an extension of one more period, which the
 * buyer needs when the award comes after the bids' validity has ended.
 */
@Component({
  selector: 'app-bid-validity',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule],
  template: `
    @if (validity(); as v) {
      <section class="validity" aria-labelledby="validity-title">
        <h2 id="validity-title">Validity of your bid</h2>
        <p>
          Your bid must stay valid until <strong>{{ time(v.validUntil) }}</strong> ({{ tender().bidValidityDays }} days after
          the closing time).
          @if (v.extendedUntil) {
            You have confirmed that it stays valid until <strong>{{ time(v.extendedUntil) }}</strong>.
          }
        </p>
        <p class="secondary">
          If the award takes longer, the buyer can approve it only once each awarded vendor has confirmed an extension.
          Confirming keeps your prices, fee and capacity binding for {{ tender().bidValidityDays }} more days; check the tender
          documents and your own obligations before you do.
        </p>
        @if (tender().status === 'closed') {
          <button mat-stroked-button type="button" (click)="extend()" [disabled]="busy()">
            <mat-icon>event_repeat</mat-icon>Confirm validity for {{ tender().bidValidityDays }} more days
          </button>
        }
        <p role="status" class="status">{{ status() }}</p>
      </section>
    }
  `,
  styles: `
    .validity { margin: 24px 0; }
    .secondary { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); max-width: 80ch; }
    .status { min-height: 1.5em; }
  `,
})
export class BidValidity {
  private readonly api = inject(BidApi);
  private readonly destroyRef = inject(DestroyRef);
  readonly tender = input.required<TenderView>();

  private readonly bid = rxResource({ params: () => this.tender().id, stream: ({ params }) => this.api.get(params) });
  protected readonly validity = computed(() => this.bid.value()?.validity ?? null);
  protected readonly busy = signal(false);
  protected readonly status = signal('');
  protected time(iso: string): string {
    return localClosingTime(iso, this.tender().timeZone);
  }

  protected extend(): void {
    this.busy.set(true);
    this.api
      .extendValidity(this.tender().id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (answer) => {
          this.busy.set(false);
          this.status.set(`Recorded: your bid stays valid until ${localClosingTime(answer.extendedUntil, this.tender().timeZone)}.`);
          this.bid.reload();
        },
        error: (error: unknown) => {
          this.busy.set(false);
          this.status.set(error instanceof ApiError ? `Not recorded: ${error.userMessage}` : 'Not recorded.');
        },
      });
  }
}
