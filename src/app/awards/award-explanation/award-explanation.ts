import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { DebriefView, ExplanationView, RegionCheckView } from '@shared/explanation';
import type { Observable } from 'rxjs';
import { ApiError } from '../../core/http/api-error';
import { AwardApi } from '../award-api';
import { loadErrorMessage } from '../../ui/load-error';
import { fractionPercent, money, quantity } from '../../ui/number-format';
import { polledResource } from '../../ui/polled-resource';

/** How often an explanation being computed is asked for again. */
export const EXPLANATION_POLL_MS = 1000;

const working = (s: string) => s === 'queued' || s === 'running';
/** Polled while the explanation, any debrief or any region asked for is being worked out. */
const busy = (v: ExplanationView) => working(v.status) || v.debriefs.some((d) => working(d.status)) || v.regionChecks.some((c) => working(c.status));

/**
 * "Why this award" beside the allocation matrix, and the vendors' debriefs, of one run with an
 * award (buyer and compliance only). The explanation is asked for with a button, each vendor's
 * debrief with its own (worked out on demand: it takes many re-solves); their progress is shown
 * while the figures are re-computed on the server.
 */
@Component({
  selector: 'app-award-explanation',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './award-explanation.html',
  styleUrl: './award-explanation.scss',
})
export class AwardExplanation {
  private readonly api = inject(AwardApi);
  private readonly destroyRef = inject(DestroyRef);

  readonly runId = input.required<string>();

  /** Asked at once; again every second while queued or running; asked again after each request. */
  private readonly polled = polledResource({
    params: () => this.runId(),
    load: (runId: string) => this.api.explanation(runId),
    everyMs: EXPLANATION_POLL_MS,
    running: busy,
  });
  protected readonly view = computed(() => this.polled.value() ?? null);
  /** A refused request to explain or to debrief, shown until the next one. */
  private readonly actionError = signal<string | null>(null);
  protected readonly error = computed(() => this.actionError() ?? loadErrorMessage(this.polled.error(), 'The explanation could not be loaded.'));
  protected readonly asking = signal(false);

  protected readonly result = computed(() => this.view()?.result ?? null);
  protected readonly percentDone = computed(() => {
    const p = this.view()?.progress;
    return p && p.total > 0 ? Math.round((p.done / p.total) * 100) : 0;
  });
  protected readonly statusText = computed(() => {
    const v = this.view();
    if (!v) return '';
    if (v.status === 'queued') return 'Waiting for a free solver…';
    if (v.status === 'running') return `Re-computing the award with each alternative: ${v.progress.done} of ${v.progress.total} regions done.`;
    if (v.status === 'done') return 'Explanation ready.';
    return '';
  });
  /** Vendor → its debrief as asked for (absent: not asked for yet). */
  protected readonly debriefs = computed(() => new Map((this.view()?.debriefs ?? []).map((d) => [d.vendor, d])));
  protected readonly askingDebrief = signal<string | null>(null);
  /** Region → its exact re-solve as asked for (absent: not asked for). */
  protected readonly regionChecks = computed(() => new Map((this.view()?.regionChecks ?? []).map((c) => [c.region, c])));
  protected readonly askingRegion = signal<string | null>(null);

  protected explain(): void {
    this.send(this.api.explain(this.runId()), (on) => this.asking.set(on), (v) => this.polled.set(v), 'The explanation could not be started.');
  }

  /** Asks for one vendor's debrief, then polls until it is worked out. */
  protected askDebrief(vendor: string): void {
    this.send(this.api.debrief(this.runId(), vendor), (on) => this.askingDebrief.set(on ? vendor : null), (d) => {
      const v = this.view();
      if (v) this.polled.set({ ...v, debriefs: [...v.debriefs.filter((x) => x.vendor !== d.vendor), d] });
    }, 'The debrief could not be started.');
  }

  /** Asks for one region whose extra cost is a range to be worked out exactly, then polls until it is. */
  protected askRegion(region: string): void {
    this.send(this.api.exactRegion(this.runId(), region), (on) => this.askingRegion.set(on ? region : null), (v) => this.polled.set(v),
      'The region could not be worked out.');
  }

  /** One request of the panel: its button off while it runs, its answer shown, then the polling starts again. */
  private send<T>(request: Observable<T>, busy: (on: boolean) => void, show: (answer: T) => void, failed: string): void {
    busy(true);
    this.actionError.set(null);
    request.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (answer) => {
        busy(false);
        show(answer);
        this.polled.reload();
      },
      error: (error: unknown) => {
        busy(false);
        this.actionError.set(error instanceof ApiError ? error.userMessage : failed);
      },
    });
  }

  protected regionCheckStatus(c: RegionCheckView): string {
    return c.status === 'queued' ? 'Waiting for a free solver…' : c.status === 'running' ? 'Working out the exact figure…' : '';
  }

  protected debriefStatus(d: DebriefView): string {
    if (d.status === 'queued') return 'Waiting for a free solver…';
    if (d.status === 'running') return `Working out what it would have needed: ${d.progress.done} of ${d.progress.total} done.`;
    return '';
  }

  protected money(value: number | null): string {
    return value === null ? '—' : money(value, this.result()?.currency ?? 'EUR');
  }

  protected qty(value: number): string {
    return `${quantity(value)} ${this.result()?.unit ?? ''}`.trim();
  }

  protected percent(fraction: number): string {
    return fractionPercent(fraction, 1);
  }
}
