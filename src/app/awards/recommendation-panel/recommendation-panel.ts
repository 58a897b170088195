import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { decisionInputSchema, returnInputSchema, type RecommendationView } from '@shared/evaluation';
import { of } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { ApiError } from '../../core/http/api-error';
import { AwardApi } from '../award-api';
import { AwardCaution } from '../award-caution';
import { localDateTime } from '../award-format';
import { fractionPercent, money } from '../../ui/number-format';
import { RECOMMENDATION_STATUS_LABELS, RUN_STATUS_LABELS } from '../run-status';
import { MatDialog } from '@angular/material/dialog';
import { awardStatusWords } from '@shared/award-wording';
import { describeAwardBasis } from '@shared/award-basis';
import { EXCLUSION_GROUND_LABELS } from '@shared/compliance';
import { RecommendDialog, type RecommendDialogData } from '../recommend-dialog/recommend-dialog';
import { whenConfirmed } from '../../ui/confirm-dialog';
import { loadErrorMessage } from '../../ui/load-error';

function message(error: unknown, fallback: string): string {
  return loadErrorMessage(error, fallback) ?? fallback;
}

/** tenders/:id/evaluation/recommendation — the recommended award and the compliance decision on it. */
@Component({
  selector: 'app-recommendation-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterLink,
    ReactiveFormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    AwardCaution,
  ],
  templateUrl: './recommendation-panel.html',
  styleUrl: './recommendation-panel.scss',
})
export class RecommendationPanel {
  private readonly api = inject(AwardApi);
  private readonly destroyRef = inject(DestroyRef);
  private readonly auth = inject(Auth);
  private readonly dialog = inject(MatDialog);

  readonly id = input.required<string>();

  private readonly loaded = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.recommendation(params) });
  /** Replaced by the answer of a decision, so the page shows the new state without a reload. */
  protected readonly recommendation = computed<RecommendationView | null>(
    () => this.decided() ?? this.loaded.value()?.recommendation ?? null,
  );
  /** Earlier rounds (each returned by compliance), newest first: the whole history stays on the page. */
  protected readonly history = computed(() => this.loaded.value()?.history ?? []);
  private readonly decided = signal<RecommendationView | null>(null);
  protected readonly loading = this.loaded.isLoading;
  protected readonly loadError = computed(() =>
    this.loaded.error() ? message(this.loaded.error(), 'The recommendation could not be loaded.') : null,
  );
  /** A computed of its own: a resource reloads whenever its params function re-runs, equal value or not. */
  private readonly runId = computed(() => this.recommendation()?.runId);
  protected readonly run = rxResource({
    params: () => this.runId(),
    stream: ({ params }) => (params ? this.api.run(params) : of(null)),
  });
  protected readonly total = computed(() => {
    const run = this.run.value();
    return run?.objective != null ? money(run.objective, run.currency) : null;
  });

  protected readonly runStatusWords = computed(() => awardStatusWords(this.run.value()?.result, (f) => fractionPercent(f, 2)));

  protected readonly isCompliance = computed(() => this.auth.user()?.role === 'compliance');
  protected readonly canDecide = computed(() => this.isCompliance() && this.recommendation()?.status === 'recommended');
  /** After a return the buyer revises: the same run, the justification pre-filled (another run: from its result page). */
  protected readonly canRevise = computed(() => this.auth.user()?.role === 'buyer' && this.recommendation()?.status === 'returned');
  protected readonly comment = new FormControl('', { nonNullable: true });
  protected readonly commentError = signal<string | null>(null);
  protected readonly failure = signal<string | null>(null);
  protected readonly done = signal('');
  protected readonly busy = signal(false);
  protected readonly statusLabel = RECOMMENDATION_STATUS_LABELS;
  protected readonly when = localDateTime;

  /** The tender (its published award basis) and its bids (the compliance check's exclusions), for the approval's summary. */
  private readonly tender = rxResource({
    params: () => (this.canDecide() ? this.id() : undefined),
    stream: ({ params }) => (params ? this.api.tender(params) : of(null)),
  });
  private readonly bids = rxResource({
    params: () => (this.canDecide() ? this.id() : undefined),
    stream: ({ params }) => (params ? this.api.bids(params) : of(null)),
  });

  /**
   * What compliance approves, read back before the decision: the published award basis, the
   * bids excluded by the compliance check, the run's status in words and its total.
   */
  protected readonly approvalFacts = computed(() => {
    const tender = this.tender.value();
    const bids = this.bids.value();
    const run = this.run.value();
    const facts: { term: string; value: string }[] = [];
    facts.push({
      term: 'Published award basis',
      value: tender ? describeAwardBasis(tender.awardBasis, { unit: tender.unit, regions: tender.regions }).join('\n') : 'Not loaded',
    });
    const excluded = bids && 'bids' in bids ? bids.bids.filter((b) => b.compliance.decision === 'excluded') : [];
    facts.push({
      term: 'Bids excluded by the compliance check',
      value: !bids ? 'Not loaded' : excluded.length
        ? excluded.map((b) => `${b.vendor.name}: ${b.compliance.ground ? EXCLUSION_GROUND_LABELS[b.compliance.ground] : 'excluded'}`).join('\n')
        : 'None',
    });
    facts.push({ term: 'Status of the run', value: awardStatusWords(run?.result, (f) => fractionPercent(f, 2)) ?? (run ? RUN_STATUS_LABELS[run.status] : 'Not loaded') });
    facts.push({ term: 'Total cost', value: this.total() ?? '—' });
    return facts;
  });

  protected approve(): void {
    const parsed = decisionInputSchema.safeParse({ comment: this.comment.value });
    if (!parsed.success) {
      this.commentError.set(parsed.error.issues[0]?.message ?? 'Not valid.');
      return;
    }
    whenConfirmed(this.dialog, {
      title: 'Approve this award?',
      message:
        'Approving sets the tender to awarded and freezes its scenarios and bids; the buyer can then send the notices. Check what you approve:',
      details: this.approvalFacts(),
      confirm: 'Approve award',
    })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => this.decide('approve', parsed.data.comment));
  }

  protected revise(): void {
    const rec = this.recommendation();
    const run = this.run.value();
    if (!rec || !run) return;
    this.dialog
      .open<RecommendDialog, RecommendDialogData, RecommendationView>(RecommendDialog, {
        data: { tenderId: this.id(), runId: rec.runId, scenarioName: run.scenarioName, total: this.total() ?? '—', status: this.runStatusWords() ?? '', justification: rec.justification },
        width: '640px',
        maxWidth: '95vw',
      })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((revised) => {
        if (!revised) return;
        this.decided.set(null);
        this.done.set('Recommended again: compliance has been asked to decide.');
        this.loaded.reload();
      });
  }

  protected sendBack(): void {
    const parsed = returnInputSchema.safeParse({ comment: this.comment.value });
    if (!parsed.success) {
      this.commentError.set(parsed.error.issues[0]?.message ?? 'Not valid.');
      return;
    }
    this.decide('return', parsed.data.comment);
  }

  private decide(action: 'approve' | 'return', comment: string): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.commentError.set(null);
    this.failure.set(null);
    const call = action === 'approve' ? this.api.approve(this.id(), comment) : this.api.returnRecommendation(this.id(), comment);
    call.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (updated) => {
        this.busy.set(false);
        this.decided.set(updated);
        this.comment.reset();
        this.done.set(action === 'approve' ? 'Approved: the tender is now awarded.' : 'Returned to the buyer with your comment.');
      },
      error: (error: unknown) => {
        this.busy.set(false);
        if (error instanceof ApiError) {
          const field = error.fieldErrors.find((e) => e.field === 'comment');
          if (field) this.commentError.set(field.message);
        }
        this.failure.set(message(error, 'The decision could not be recorded.'));
      },
    });
  }
}
