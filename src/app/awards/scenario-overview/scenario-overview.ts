import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import type { RunStatus, RunSummary, ScenarioView } from '@shared/evaluation';
import type { TenderView } from '@shared/tenders';
import { forkJoin } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { ApiError } from '../../core/http/api-error';
import { AwardApi } from '../award-api';
import { localDateTime } from '../award-format';
import { loadErrorMessage } from '../../ui/load-error';
import { money } from '../../ui/number-format';
import { RUN_STATUS_LABELS, hasAward } from '../run-status';
import { describeRules } from '../rules-summary';
import { ScenarioEditor, type ScenarioEditorData } from '../scenario-editor/scenario-editor';
import { SkeletonRows } from '../../ui/skeleton-rows';

/** The compare route takes two to eight runs (compareQuerySchema). */
const MAX_COMPARED = 8;

/** tenders/:id/evaluation — the tender's scenarios, their runs, and the way to compare them. */
@Component({
  selector: 'app-scenario-overview',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [SkeletonRows, RouterLink, MatTableModule, MatButtonModule, MatIconModule, MatCheckboxModule, MatProgressBarModule],
  templateUrl: './scenario-overview.html',
  styleUrl: './scenario-overview.scss',
})
export class ScenarioOverview {
  private readonly api = inject(AwardApi);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly destroyRef = inject(DestroyRef);
  private readonly auth = inject(Auth);

  /** The tender id, from the route. */
  readonly id = input.required<string>();

  /** The tender, its scenarios, their runs and the bidders, in one load; a saved scenario updates it in place. */
  private readonly page = rxResource({
    params: () => this.id(),
    stream: ({ params: id }) => forkJoin({
      tender: this.api.tender(id),
      scenarios: this.api.scenarios(id),
      runs: this.api.runs(id),
      vendors: this.api.bidders(id),
    }),
  });
  private readonly loaded = computed(() => (this.page.hasValue() ? this.page.value() : null));
  protected readonly tender = computed<TenderView | null>(() => this.loaded()?.tender ?? null);
  protected readonly scenarios = computed<ScenarioView[]>(() => this.loaded()?.scenarios ?? []);
  protected readonly runs = computed<RunSummary[]>(() => this.loaded()?.runs ?? []);
  private readonly vendors = computed(() => this.loaded()?.vendors ?? []);
  protected readonly loading = this.page.isLoading;
  protected readonly loadError = computed(() => loadErrorMessage(this.page.error(), 'The scenarios could not be loaded.'));
  protected readonly status = signal('');
  protected readonly selected = signal<ReadonlySet<string>>(new Set());

  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  /** Scenarios freeze once the tender is awarded. */
  protected readonly editable = computed(() => this.isBuyer() && this.tender()?.status === 'closed');
  protected readonly scenarioColumns = computed(() =>
    this.editable() ? ['name', 'rules', 'latest', 'actions'] : ['name', 'rules', 'latest'],
  );
  protected readonly runColumns = ['select', 'scenario', 'status', 'total', 'queuedAt'];
  protected readonly canCompare = computed(() => this.selected().size >= 2 && this.selected().size <= MAX_COMPARED);
  private readonly names = computed(() => ({
    regions: Object.fromEntries((this.tender()?.regions ?? []).map((r) => [r.code, r.name])),
    vendors: Object.fromEntries(this.vendors().map((v) => [v.id, v.name])),
  }));
  /** Table rows are untyped in templates, so the lookup goes through a typed method. */
  protected statusText(status: RunStatus): string {
    return RUN_STATUS_LABELS[status];
  }
  protected readonly when = (iso: string) => localDateTime(iso, this.tender()?.timeZone);
  protected readonly selectable = (run: RunSummary) => hasAward(run.status) || run.status === 'infeasible';

  protected load(): void {
    this.page.reload();
  }

  protected rulesText(scenario: ScenarioView): string[] {
    return describeRules(scenario.rules, this.names());
  }

  protected total(run: RunSummary): string {
    const currency = this.tender()?.currency ?? 'EUR';
    return run.objective === null ? '—' : money(run.objective, currency);
  }

  protected isSelected(run: RunSummary): boolean {
    return this.selected().has(run.id);
  }

  protected toggle(run: RunSummary, checked: boolean): void {
    const next = new Set(this.selected());
    if (checked) next.add(run.id);
    else next.delete(run.id);
    this.selected.set(next);
  }

  protected compare(): void {
    void this.router.navigate(['compare'], {
      relativeTo: this.route,
      queryParams: { runs: [...this.selected()].join(',') },
    });
  }

  protected edit(scenario: ScenarioView | null): void {
    const tender = this.tender();
    if (!tender) return;
    this.dialog
      .open<ScenarioEditor, ScenarioEditorData, ScenarioView>(ScenarioEditor, {
        data: { tenderId: tender.id, regions: tender.regions, vendors: this.vendors(), scenario },
        width: '720px',
        maxWidth: '95vw',
      })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((saved) => {
        if (!saved) return;
        this.page.update((page) => page && {
          ...page,
          scenarios: page.scenarios.some((s) => s.id === saved.id) ? page.scenarios.map((s) => (s.id === saved.id ? saved : s)) : [...page.scenarios, saved],
        });
        this.status.set(`Scenario “${saved.name}” saved.`);
      });
  }

  protected run(scenario: ScenarioView): void {
    this.api
      .startRun(scenario.id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (run) => void this.router.navigate(['runs', run.id], { relativeTo: this.route }),
        error: (error: unknown) =>
          this.status.set(error instanceof ApiError ? error.userMessage : 'The run could not be started.'),
      });
  }
}
