import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import type { RecommendationView, RunView } from '@shared/evaluation';
import { Auth } from '../../core/auth/auth';
import { ApiError } from '../../core/http/api-error';
import { AllocationMatrix, type MatrixRegion } from '../allocation-matrix/allocation-matrix';
import { AwardApi } from '../award-api';
import { AwardExplanation } from '../award-explanation/award-explanation';
import { AwardCaution } from '../award-caution';
import { fractionPercent, money, quantity } from '../../ui/number-format';
import { RecommendDialog, type RecommendDialogData } from '../recommend-dialog/recommend-dialog';
import { RUN_STATUS_LABELS, hasAward, isFinished } from '../run-status';
import { SensitivityPanel } from '../sensitivity-panel/sensitivity-panel';
import { ShareChart, type ChartItem } from '../share-chart/share-chart';
import { EngineDetails } from '../engine-details/engine-details';
import { awardStatusWords, marginAboveBest } from '@shared/award-wording';
import { whenConfirmed } from '../../ui/confirm-dialog';
import { DownloadLink } from '../../ui/download-link';
import { ProgressNote } from '../../ui/progress-note';
import { ScrollFrame } from '../../ui/scroll-frame';
import { loadErrorMessage } from '../../ui/load-error';
import { polledResource } from '../../ui/polled-resource';

/** How often an unfinished run is asked for again. */
export const RUN_POLL_MS = 1000;

/** tenders/:id/evaluation/runs/:runId — a run's live state, then its award. */
@Component({
  selector: 'app-run-result',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ProgressNote, DownloadLink, ScrollFrame,
    RouterLink,
    MatButtonModule,
    MatIconModule,
    MatTableModule,
    AllocationMatrix,
    AwardCaution,
    AwardExplanation,
    EngineDetails,
    SensitivityPanel,
    ShareChart,
  ],
  templateUrl: './run-result.html',
  styleUrl: './run-result.scss',
})
export class RunResult {
  private readonly api = inject(AwardApi);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly destroyRef = inject(DestroyRef);
  private readonly auth = inject(Auth);

  /** Tender and run ids, from the route. */
  readonly id = input.required<string>();
  readonly runId = input.required<string>();

  /** Asked at once, then every second until the run has finished; a new run id or "Try again" starts over. */
  private readonly polled = polledResource({
    params: () => this.runId(),
    load: (runId: string) => this.api.run(runId),
    everyMs: RUN_POLL_MS,
    running: (run: RunView) => !isFinished(run.status),
  });
  protected readonly run = computed(() => this.polled.value() ?? null);
  protected readonly loadError = computed(() => loadErrorMessage(this.polled.error(), 'The run could not be loaded.'));
  protected readonly actionMessage = signal('');
  protected readonly cancelling = signal(false);

  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  protected readonly finished = computed(() => {
    const run = this.run();
    return run !== null && isFinished(run.status);
  });
  protected readonly result = computed(() => this.run()?.result ?? null);
  protected readonly awarded = computed(() => {
    const run = this.run();
    return run !== null && hasAward(run.status) && run.result !== null;
  });
  /** Announced when it changes (aria-live); the elapsed seconds are not, or they would chatter. */
  protected readonly statusText = computed(() => {
    const run = this.run();
    return run ? RUN_STATUS_LABELS[run.status] : 'Loading the run…';
  });
  protected readonly elapsedSeconds = computed(() => {
    const run = this.run();
    if (!run?.startedAt) return 0;
    // The clock of the last answer, so the progress bar moves with each poll.
    const end = run.finishedAt ? Date.parse(run.finishedAt) : this.polled.answeredAt();
    return Math.max(0, Math.round((end - Date.parse(run.startedAt)) / 1000));
  });
  protected readonly progress = computed(() => {
    const run = this.run();
    if (!run || run.timeLimitSeconds <= 0) return 0;
    return Math.min(100, (this.elapsedSeconds() / run.timeLimitSeconds) * 100);
  });

  protected readonly regions = computed<MatrixRegion[]>(() =>
    Object.entries(this.run()?.regions ?? {}).map(([code, r]) => ({ code, name: r.name, forecast: r.forecast })),
  );
  protected readonly vendorRows = computed(() => {
    const run = this.run();
    const result = run?.result;
    if (!run || !result) return [];
    return result.awards.map((award) => ({
      vendor: run.vendors[award.vendor]?.name ?? award.vendor,
      sme: run.vendors[award.vendor]?.sme ?? false,
      regions: award.lines.filter((l) => l.quantity > 0).map((l) => run.regions[l.region]?.name ?? l.region),
      quantity: `${quantity(award.quantity)} ${run.unit}`,
      fixedFee: this.money(award.fixedFee),
      value: this.money(award.value),
      share: fractionPercent(award.share),
    }));
  });
  protected readonly vendorColumns = ['vendor', 'regions', 'quantity', 'fixedFee', 'value', 'share'];
  protected readonly costItems = computed<ChartItem[]>(() => {
    const result = this.result();
    if (!result || result.fixedCost === null || result.variableCost === null) return [];
    return [
      { label: 'Fixed fees', value: result.fixedCost, text: this.money(result.fixedCost) },
      { label: 'Unit prices × quantities', value: result.variableCost, text: this.money(result.variableCost) },
    ];
  });
  protected readonly shareItems = computed<ChartItem[]>(() => {
    const run = this.run();
    return (run?.result?.awards ?? []).map((award) => ({
      label: run?.vendors[award.vendor]?.name ?? award.vendor,
      value: Math.round(award.share * 1000) / 10,
      text: fractionPercent(award.share),
    }));
  });
  /** Buyer's words for the run's status ("Best possible award (proven)", or the margin of one that is not). */
  protected readonly statusWords = computed(() => awardStatusWords(this.result(), (f) => fractionPercent(f, 2)));
  /** The line under the status badge: what the status means for the buyer (the badge already names it). */
  protected readonly plainStatus = computed(() => {
    const result = this.result();
    if (result?.status === 'optimal') return 'No cheaper award meets every rule: the engine proved it.';
    const words = this.statusWords();
    return words ? `${words}.` : null;
  });
  protected readonly forecastNote = computed(() => {
    const run = this.run();
    if (!run || run.forecastChangePercent === null) return null;
    const change = `${run.forecastChangePercent > 0 ? '+' : '−'}${Math.abs(run.forecastChangePercent)} %`;
    const where = run.scaledRegion ? `the forecast of ${run.regions[run.scaledRegion]?.name ?? run.scaledRegion} changed by ${change}` : `every forecast changed by ${change}`;
    return `A forecast sensitivity re-solve: the same bids and rules, with ${where}.`;
  });
  protected readonly droppedVendorName = computed(() => {
    const run = this.run();
    return run?.droppedVendor ? (run.vendors[run.droppedVendor]?.name ?? run.droppedVendor) : null;
  });

  protected money(value: number | null): string {
    return value === null ? '—' : money(value, this.run()?.currency ?? 'EUR');
  }

  protected exportUrl(): string {
    return this.api.exportUrl(this.runId());
  }

  protected retry(): void {
    this.polled.reload();
  }

  protected cancel(): void {
    this.cancelling.set(true);
    this.api
      .cancelRun(this.runId())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (summary) => {
          this.cancelling.set(false);
          // Shown at once; the next poll brings the whole run (and is the last once it has finished).
          const run = this.run();
          if (run) this.polled.set({ ...run, ...summary });
        },
        error: (error: unknown) => {
          this.cancelling.set(false);
          this.actionMessage.set(error instanceof ApiError ? error.userMessage : 'The run could not be cancelled.');
        },
      });
  }

  protected checkResilience(): void {
    this.api
      .checkResilience(this.runId())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => void this.router.navigate(['resilience'], { relativeTo: this.route }),
        error: (error: unknown) =>
          this.actionMessage.set(error instanceof ApiError ? error.userMessage : 'The resilience check could not be started.'),
      });
  }

  /**
   * Recommending asks first when the award is not proven best: the margin is what the buyer
   * accepts (at most that much above the best possible award).
   */
  protected recommend(): void {
    const run = this.run();
    if (!run) return;
    if (run.status === 'optimal') {
      this.openRecommend(run);
      return;
    }
    const margin = marginAboveBest(run.result);
    whenConfirmed(this.dialog, {
      title: 'Recommend an award not proven best?',
      message: `Total ${this.money(run.objective)}. ${this.statusWords() ?? 'This award was not proven best'}. ${
        margin === null ? 'How much a cheaper award could save is not known.' : `A cheaper award may exist; this one costs at most ${fractionPercent(margin, 2)} more than the best possible.`
      } Running the scenario again with a longer time limit can narrow the margin.`,
      confirm: 'Recommend it anyway',
    })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => this.openRecommend(run));
  }

  private openRecommend(run: RunView): void {
    this.dialog
      .open<RecommendDialog, RecommendDialogData, RecommendationView>(RecommendDialog, {
        data: { tenderId: this.id(), runId: run.id, scenarioName: run.scenarioName, total: this.money(run.objective), status: this.statusWords() ?? '' },
        width: '640px',
        maxWidth: '95vw',
      })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((recommendation) => {
        if (recommendation) void this.router.navigate(['../../recommendation'], { relativeTo: this.route });
      });
  }
}
