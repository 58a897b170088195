import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { NoticeSummary } from '@shared/notices';
import { filter, switchMap, tap } from 'rxjs';
import { ApiError } from '../../core/http/api-error';
import { TENDER_STATUS_LABELS } from '../../tenders/tender-status';
import { TenderApi } from '../../tenders/tender-api';
import { ConfirmDialog, type ConfirmData } from '../../ui/confirm-dialog';
import { LetterFrame } from '../letter-frame/letter-frame';
import { NOTICE_POLL_MS, NoticeApi } from '../notice-api';
import { NOTICE_KIND_LABELS, anyQueued } from '../notice-labels';
import { NoticeStatusTable } from '../notice-status-table/notice-status-table';
import { DownloadLink } from '../../ui/download-link';
import { loadErrorMessage } from '../../ui/load-error';
import { polledResource } from '../../ui/polled-resource';

/** Shown beside the send button: the product prepares the letters, the buyer answers for the duty. */
export const NOTICE_CAUTION =
  "Standstill periods and notice duties differ by jurisdiction and by the buyer's own rules: check them before sending.";

function message(error: unknown, fallback: string): string {
  return error instanceof ApiError ? error.userMessage : fallback;
}

function plural(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

/**
 * tenders/:id/notices — the buyer reads every award and regret letter as it will go out, sends
 * them all at once, and watches them leave.
 */
@Component({
  selector: 'app-notice-sender',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DownloadLink, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, LetterFrame, NoticeStatusTable],
  templateUrl: './notice-sender.html',
  styleUrl: './notice-sender.scss',
})
export class NoticeSender {
  private readonly api = inject(NoticeApi);
  private readonly tenders = inject(TenderApi);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);
  private readonly pollMs = inject(NOTICE_POLL_MS);

  /** The tender's id, from the route. */
  readonly id = input.required<string>();

  protected readonly tender = rxResource({ params: () => this.id(), stream: ({ params }) => this.tenders.get(params) });
  protected readonly previews = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.previews(params) });
  protected readonly selectedIndex = signal(0);
  protected readonly selected = computed(() => this.previews.value()?.[this.selectedIndex()] ?? null);
  protected readonly counts = computed(() => {
    const letters = this.previews.value() ?? [];
    const award = letters.filter((letter) => letter.kind === 'award').length;
    return { award, regret: letters.length - award, total: letters.length };
  });

  /** The tender's notices, asked at once and every interval until none is queued (the last answer included). */
  private readonly delivery = polledResource({
    params: () => this.id(),
    load: (tenderId: string) => this.api.list({ tenderId }),
    everyMs: this.pollMs,
    running: (notices: NoticeSummary[]) => anyQueued(notices),
  });
  /** The tender's notices as last polled; null until the first answer. */
  protected readonly notices = computed(() => this.delivery.value() ?? null);
  protected readonly polling = this.delivery.polling;
  protected readonly statusError = computed(() => loadErrorMessage(this.delivery.error(), 'The state of the notices could not be loaded.'));

  protected readonly sending = signal(false);
  protected readonly sendResult = signal('');
  protected readonly sendError = signal<string | null>(null);

  protected readonly canSend = computed(
    () => this.tender.value()?.status === 'awarded' && this.counts().total > 0 && !this.sending(),
  );
  /** Why the button is off, read out with it; null when it is on or while sending. */
  protected readonly sendBlocked = computed(() => {
    const status = this.tender.value()?.status;
    if (!status || this.sending()) return null;
    if (status === 'notified' || status === 'contracted') return 'Every notice of this tender has been sent.';
    if (status !== 'awarded') return 'Notices can be sent once compliance has approved the award.';
    if (this.counts().total === 0) return 'There is no letter to send.';
    return null;
  });
  protected readonly sentCount = computed(() => (this.notices() ?? []).filter((n) => n.status === 'sent').length);

  protected readonly tenderStatusLabel = TENDER_STATUS_LABELS;
  protected readonly kindLabel = NOTICE_KIND_LABELS;
  protected readonly caution = NOTICE_CAUTION;
  protected readonly scheduleUrl = computed(() => this.api.scheduleUrl(this.id()));
  protected readonly pollSeconds = this.pollMs / 1000;

  /** True once this page has seen (or just queued) notices that are not out yet. */
  private awaitingDelivery = false;

  constructor() {
    // The server marks the tender notified when the last notice is out: show it without a reload.
    effect(() => {
      const notices = this.notices();
      if (!notices) return;
      if (anyQueued(notices)) {
        this.awaitingDelivery = true;
      } else if (this.awaitingDelivery) {
        this.awaitingDelivery = false;
        untracked(() => this.tender.reload());
      }
    });
  }

  protected select(index: number): void {
    this.selectedIndex.set(index);
  }

  protected send(): void {
    if (!this.canSend()) return;
    const { award, regret, total } = this.counts();
    const data: ConfirmData = {
      title: 'Send the notices?',
      message:
        `${plural(total, 'letter', 'letters')} will go out by e-mail: ${plural(award, 'award letter', 'award letters')} ` +
        `and ${plural(regret, 'regret letter', 'regret letters')}, exactly as previewed. Each bidder receives its letter once; ` +
        'a notice cannot be recalled after it is sent.',
      confirm: 'Send notices',
    };
    this.dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data })
      .afterClosed()
      .pipe(
        filter((confirmed) => confirmed === true),
        tap(() => {
          this.sending.set(true);
          this.sendError.set(null);
          this.sendResult.set('');
        }),
        switchMap(() => this.api.send(this.id())),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe({
        next: ({ queued }) => {
          this.sending.set(false);
          if (queued > 0) this.awaitingDelivery = true;
          this.sendResult.set(
            queued > 0
              ? `${plural(queued, 'notice', 'notices')} queued for sending. The table below follows their delivery.`
              : "Nothing new was queued: every bidder's notice had already been sent or queued.",
          );
          this.delivery.reload();
        },
        error: (error: unknown) => {
          this.sending.set(false);
          this.sendError.set(message(error, 'The notices could not be sent.'));
        },
      });
  }

  protected previewProblem(): string {
    const error = this.previews.error();
    if (error instanceof ApiError && error.status === 409) {
      return error.detail ?? 'The letters can be previewed once compliance has approved the award.';
    }
    return message(error, 'The letters could not be prepared.');
  }

  protected refresh(): void {
    this.delivery.reload();
  }
}
