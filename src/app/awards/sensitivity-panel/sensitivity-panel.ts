import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, afterRenderEffect, computed, inject, input, signal, viewChild } from '@angular/core';
import { NgTemplateOutlet } from '@angular/common';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import type { SensitivityCase, SensitivityCheck, SensitivityView } from '@shared/evaluation';
import { CategoryScale, Chart, Legend, LinearScale, LineController, LineElement, PointElement, Tooltip } from 'chart.js';
import { ApiError } from '../../core/http/api-error';
import { loadErrorMessage } from '../../ui/load-error';
import { money } from '../../ui/number-format';
import { polledResource } from '../../ui/polled-resource';
import { ProgressNote } from '../../ui/progress-note';
import { AwardApi } from '../award-api';
import type { MatrixRegion } from '../allocation-matrix/allocation-matrix';
import { percent } from '../award-format';
import { RUN_STATUS_LABELS } from '../run-status';
import { palette } from '../share-chart/share-chart';

Chart.register(LineController, LineElement, PointElement, CategoryScale, LinearScale, Tooltip, Legend);

/** Re-solves take a few seconds each; every two seconds is enough to see them land. */
export const SENSITIVITY_POLL_MS = 2000;

/** Re-solves not finished yet, over the all-regions check and each region's. */
function pendingOf(view: SensitivityView): number {
  return [view.all, ...view.regions].reduce((n, check) => n + (check?.pending ?? 0), 0);
}

/** One row of a check's table: the run itself (0 %) and each tested change. */
export interface SensitivityRow {
  change: string;
  changePercent: number;
  total: string;
  difference: string;
  vendors: string;
  outcome: string;
  changes: string[];
  isRun: boolean;
  /** The re-solve's own run page (null for the run itself). */
  runId: string | null;
}

function signed(percentValue: number): string {
  return percentValue === 0 ? '0 % (the run)' : `${percentValue > 0 ? '+' : '−'}${Math.abs(percentValue)} %`;
}

/**
 * "How stable is this award": the run re-solved with the forecasts changed by −20 % … +20 %
 * (all regions, or one region alone), each case's total and number of vendors awarded as a chart
 * and as a table (the chart's text alternative), whether the same vendors win the same regions,
 * and the summary sentence from the server. A section of the run page of its own.
 */
@Component({
  selector: 'app-sensitivity-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ProgressNote, NgTemplateOutlet, RouterLink, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule],
  templateUrl: './sensitivity-panel.html',
  styleUrl: './sensitivity-panel.scss',
})
export class SensitivityPanel {
  private readonly api = inject(AwardApi);
  private readonly destroyRef = inject(DestroyRef);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  readonly runId = input.required<string>();
  readonly currency = input('EUR');
  readonly regions = input<readonly MatrixRegion[]>([]);

  /** Asked at once, then every two seconds while a re-solve is pending; asked again after queuing. */
  private readonly polled = polledResource({
    params: () => this.runId(),
    load: (runId: string) => this.api.sensitivity(runId),
    everyMs: SENSITIVITY_POLL_MS,
    running: (view: SensitivityView) => pendingOf(view) > 0,
  });
  protected readonly view = computed(() => this.polled.value() ?? null);
  protected readonly loadError = computed(() => loadErrorMessage(this.polled.error(), 'The forecast check could not be loaded.'));
  protected readonly actionMessage = signal<string | null>(null);
  /** Re-solves queued by the last request: said while they run, then that they have finished. */
  private readonly queued = signal(0);
  protected readonly statusText = computed(() => {
    const queued = this.queued();
    if (!queued) return this.actionMessage();
    return this.pending() > 0 ? `${queued} re-solves queued.` : `The ${queued} re-solves have finished: the figures below are complete.`;
  });
  protected readonly starting = signal(false);
  protected readonly region = new FormControl<string | null>(null);
  protected readonly pending = computed(() => {
    const v = this.view();
    return v ? pendingOf(v) : 0;
  });
  protected readonly allRows = computed(() => this.rowsOf(this.view()?.all ?? null));
  protected readonly regionChecks = computed(() => (this.view()?.regions ?? []).map((check) => ({ check, rows: this.rowsOf(check) })));
  protected readonly incrementNote = computed(() => {
    const increment = this.view()?.awardIncrement;
    return increment ? `Changed forecasts are rounded to whole multiples of the award increment (${increment}), as every forecast of this tender is.` : null;
  });
  protected readonly statusLabels = RUN_STATUS_LABELS;

  private readonly canvas = viewChild<ElementRef<HTMLCanvasElement>>('canvas');
  private chart: Chart | null = null;

  constructor() {
    afterRenderEffect(() => this.draw());
    this.destroyRef.onDestroy(() => this.chart?.destroy());
  }

  /** Queues the all-regions check, or (with `regionCode`) one region alone. */
  protected start(regionCode?: string): void {
    if (this.starting()) return;
    this.starting.set(true);
    this.actionMessage.set(null);
    this.queued.set(0);
    this.api
      .startSensitivity(this.runId(), regionCode)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: ({ queued }) => {
          this.starting.set(false);
          this.queued.set(queued);
          this.actionMessage.set(queued ? null : 'This check was already made: its figures are shown.');
          this.polled.reload();
        },
        error: (error: unknown) => {
          this.starting.set(false);
          this.actionMessage.set(error instanceof ApiError ? error.userMessage : 'The forecast check could not be started.');
        },
      });
  }

  protected startRegion(): void {
    const code = this.region.value;
    if (code) this.start(code);
  }

  private amount(value: number): string {
    return money(value, this.currency());
  }

  private rowsOf(check: SensitivityCheck | null): SensitivityRow[] {
    const v = this.view();
    if (!check || !v) return [];
    const base = v.objective;
    const row = (c: SensitivityCase): SensitivityRow => {
      const difference = c.objective !== null && base !== null ? c.objective - base : null;
      return {
        change: signed(c.changePercent),
        changePercent: c.changePercent,
        total: c.objective === null ? '—' : this.amount(c.objective),
        difference: difference === null || !base ? '—' : `${difference >= 0 ? '+' : '−'}${this.amount(Math.abs(difference))} (${difference >= 0 ? '+' : '−'}${percent(Math.abs(difference) / base)})`,
        vendors: c.vendorsAwarded === null ? '—' : String(c.vendorsAwarded),
        outcome: c.sameAward === true ? 'Same vendors, same regions' : c.sameAward === false ? 'The award changes' : this.statusLabels[c.status],
        changes: c.changes,
        isRun: false,
        runId: c.runId,
      };
    };
    const runRow: SensitivityRow = {
      change: signed(0), changePercent: 0, total: base === null ? '—' : this.amount(base), difference: '—',
      vendors: String(v.vendorsAwarded), outcome: 'The award of this run', changes: [], isRun: true, runId: null,
    };
    return [...check.cases.filter((c) => c.changePercent < 0).map(row), runRow, ...check.cases.filter((c) => c.changePercent > 0).map(row)];
  }

  /** Total cost (left axis) and vendors awarded (right axis) against the forecast change, all regions. */
  private draw(): void {
    const canvas = this.canvas()?.nativeElement;
    const v = this.view();
    const all = v?.all;
    this.chart?.destroy();
    this.chart = null;
    if (!canvas || !v || !all || !canvas.getContext('2d')) return;
    const points = [
      ...all.cases.filter((c) => c.changePercent < 0),
      { changePercent: 0, objective: v.objective, vendorsAwarded: v.vendorsAwarded },
      ...all.cases.filter((c) => c.changePercent > 0),
    ];
    const [cost, vendors] = palette(this.host.nativeElement, 2);
    this.chart = new Chart(canvas, {
      type: 'line',
      data: {
        labels: points.map((p) => (p.changePercent === 0 ? '0 %' : `${p.changePercent > 0 ? '+' : '−'}${Math.abs(p.changePercent)} %`)),
        datasets: [
          { label: `Total cost (${this.currency()})`, data: points.map((p) => p.objective), borderColor: cost, backgroundColor: cost, yAxisID: 'cost', spanGaps: false },
          // Points only: between two tested changes nothing is known about who wins.
          { label: 'Vendors awarded', data: points.map((p) => p.vendorsAwarded), borderColor: vendors, backgroundColor: vendors, yAxisID: 'vendors', showLine: false, pointStyle: 'rectRot', pointRadius: 7, pointHoverRadius: 8 },
        ],
      },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        animation: false,
        scales: {
          x: { title: { display: true, text: 'Change of all forecasts' } },
          cost: { type: 'linear', position: 'left', title: { display: true, text: 'Total cost' } },
          vendors: { type: 'linear', position: 'right', min: 0, suggestedMax: Math.max(0, ...points.map((p) => p.vendorsAwarded ?? 0)) + 1, ticks: { stepSize: 1, precision: 0 }, grid: { drawOnChartArea: false }, title: { display: true, text: 'Vendors awarded' } },
        },
        plugins: {
          legend: { display: true, position: 'bottom' },
          tooltip: { callbacks: { label: (ctx) => (ctx.dataset.yAxisID === 'cost' && typeof ctx.parsed.y === 'number' ? `Total cost: ${this.amount(ctx.parsed.y)}` : `${ctx.dataset.label}: ${ctx.formattedValue}`) } },
        },
      },
    });
  }
}
