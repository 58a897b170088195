import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Title } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { isSealed, type TenderView } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { ApiError, type FieldProblem } from '../../core/http/api-error';
import { PRODUCT_NAME } from '../../core/page-title';
import { ConfirmDialog, type ConfirmData } from '../../ui/confirm-dialog';
import { loadErrorMessage } from '../../ui/load-error';
import { money } from '../../ui/number-format';
import { AmendmentsPanel } from '../amendments-panel/amendments-panel';
import { AwardBasisPanel } from '../award-basis-panel/award-basis-panel';
import { BidTabulation } from '../bid-tabulation/bid-tabulation';
import { ContractsPanel } from '../contracts-panel/contracts-panel';
import { CancelTender } from '../cancel-tender/cancel-tender';
import { hasClosed, localClosingTime, minuteClock, timeLeft } from '../closing-time';
import { InvitationsPanel } from '../invitations-panel/invitations-panel';
import { QuestionsPanel } from '../questions-panel/questions-panel';
import { RegionTable } from '../region-table/region-table';
import { TenderApi } from '../tender-api';
import { TENDER_STATUS_LABELS } from '../tender-status';
import { DownloadLink } from '../../ui/download-link';

/** /tenders/:id for buyer, compliance and admin: facts, regions, invitations, publishing and bids. */
@Component({
  selector: 'app-tender-detail',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DownloadLink, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, RegionTable, InvitationsPanel, BidTabulation, AwardBasisPanel, QuestionsPanel, AmendmentsPanel, CancelTender, ContractsPanel],
  templateUrl: './tender-detail.html',
  styleUrl: './tender-detail.scss',
})
export class TenderDetail {
  private readonly api = inject(TenderApi);
  private readonly dialog = inject(MatDialog);
  private readonly title = inject(Title);
  private readonly destroyRef = inject(DestroyRef);

  readonly id = input.required<string>();

  /** The tender; a publication stores the answer in place, and a panel's change reloads it. */
  private readonly loaded = rxResource({ params: () => this.id(), stream: ({ params: id }) => this.api.get(id) });
  protected readonly tender = computed<TenderView | null>(() => (this.loaded.hasValue() ? this.loaded.value() : null));
  protected readonly loadError = computed(() => loadErrorMessage(this.loaded.error(), 'The tender could not be loaded.'));
  protected readonly publishProblems = signal<FieldProblem[]>([]);
  protected readonly publishing = signal(false);
  protected readonly status = signal('');
  protected readonly now = minuteClock();
  private readonly auth = inject(Auth);
  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  protected readonly statusLabel = TENDER_STATUS_LABELS;
  protected readonly closingTime = localClosingTime;
  protected readonly money = money;
  protected readonly isDraft = computed(() => this.tender()?.status === 'draft');
  /** Scenarios, runs and the award decision: buyer and compliance, once the bids are unsealed. */
  protected readonly canEvaluate = computed(() => {
    const role = this.auth.user()?.role;
    const status = this.tender()?.status;
    return (role === 'buyer' || role === 'compliance') && !!status && !isSealed(status);
  });
  /** The open-data file (OCDS): buyer and compliance, once the tender has been published or cancelled. */
  protected readonly canExportOpenData = computed(() => {
    const role = this.auth.user()?.role;
    const status = this.tender()?.status;
    return (role === 'buyer' || role === 'compliance') && !!status && status !== 'draft';
  });
  protected readonly openDataUrl = computed(() => this.api.openDataUrl(this.id()));
  /** The evaluation report (buyer and compliance, once the bids are unsealed: the same rule as `canEvaluate`). */
  protected readonly reportPdfUrl = computed(() => this.api.reportUrl(this.id(), 'pdf'));
  protected readonly reportWorkbookUrl = computed(() => this.api.reportUrl(this.id(), 'xlsx'));
  /** Sealed while draft or open, and for ever once cancelled (the server decides; a passed closing time is closed at the next load). */
  protected readonly sealed = computed(() => {
    const t = this.tender();
    return !t || isSealed(t.status);
  });
  protected readonly timeLeft = computed(() => {
    const t = this.tender();
    // A cancelled tender has no time left, whatever its closing time said.
    return t && t.status !== 'cancelled' ? timeLeft(t.closesAt, this.now()) : '';
  });
  protected readonly pastClosing = computed(() => {
    const t = this.tender();
    return !!t && t.status === 'open' && hasClosed(t.closesAt, this.now());
  });

  constructor() {
    effect(() => {
      const tender = this.tender();
      if (tender) this.title.setTitle(`${tender.reference} · ${PRODUCT_NAME}`);
    });
  }

  protected load(): void {
    this.loaded.reload();
  }

  /** A panel's answer (cancelled, invitations changed) is the tender as it now stands. */
  protected show(tender: TenderView): void {
    this.loaded.set(tender);
  }

  protected publish(): void {
    const tender = this.tender();
    if (!tender || this.publishing()) return;
    const invited = tender.invitations?.length ?? 0;
    this.dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, {
        maxWidth: '95vw',
        data: {
          title: `Publish ${tender.reference}?`,
          message:
            `Bidding opens at once and ${invited} invited ${invited === 1 ? 'organisation is' : 'organisations are'} e-mailed. ` +
            `The regions and closing time (${localClosingTime(tender.closesAt, tender.timeZone)}) can no longer be changed. ` +
            `Check them against the tender documents and your procurement rules before you publish.`,
          confirm: 'Publish',
        },
      })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((confirmed) => {
        if (!confirmed) return;
        this.publishing.set(true);
        this.publishProblems.set([]);
        this.api
          .publish(tender.id)
          .pipe(takeUntilDestroyed(this.destroyRef))
          .subscribe({
            next: (published) => {
              this.publishing.set(false);
              this.show(published);
              this.status.set(`${published.reference} is published; invited vendors are being e-mailed.`);
            },
            error: (error: unknown) => {
              this.publishing.set(false);
              const problem = error instanceof ApiError ? error : null;
              this.publishProblems.set(
                problem?.fieldErrors.length
                  ? [...problem.fieldErrors]
                  : [{ field: '', message: problem?.userMessage ?? 'The tender could not be published.' }],
              );
              this.status.set('The tender was not published.');
            },
          });
      });
  }
}
