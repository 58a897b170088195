import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { ResilienceView, RunStatus } from '@shared/evaluation';
import { AwardApi } from '../award-api';
import { percent } from '../award-format';
import { loadErrorMessage } from '../../ui/load-error';
import { money } from '../../ui/number-format';
import { polledResource } from '../../ui/polled-resource';
import { RUN_STATUS_LABELS, isFinished } from '../run-status';

/** Re-solves take a while each; every two seconds is enough to see them land. */
export const RESILIENCE_POLL_MS = 2000;

type Row = ResilienceView['rows'][number];

/** tenders/:id/evaluation/runs/:runId/resilience — the award re-solved without each awarded vendor. */
@Component({
  selector: 'app-resilience-table',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './resilience-table.html',
  styleUrl: './resilience-table.scss',
})
export class ResilienceTable {
  private readonly api = inject(AwardApi);

  readonly id = input.required<string>();
  readonly runId = input.required<string>();

  protected readonly run = rxResource({ params: () => this.runId(), stream: ({ params }) => this.api.run(params) });
  /** Asked at once, then every two seconds while a re-solve runs. */
  private readonly polled = polledResource({
    params: () => this.runId(),
    load: (runId: string) => this.api.resilience(runId),
    everyMs: RESILIENCE_POLL_MS,
    running: (view: ResilienceView) => view.rows.some((row) => !isFinished(row.status)),
  });
  protected readonly view = computed(() => this.polled.value() ?? null);
  protected readonly loadError = computed(() => loadErrorMessage(this.polled.error(), 'The resilience check could not be loaded.'));
  protected readonly pending = computed(() => (this.view()?.rows ?? []).filter((row) => !isFinished(row.status)).length);
  protected readonly columns = ['vendor', 'outcome', 'increase', 'increasePercent'];
  /** Table rows are untyped in templates, so the lookup goes through a typed method. */
  protected statusText(status: RunStatus): string {
    return RUN_STATUS_LABELS[status];
  }

  private currency(): string {
    return this.run.value()?.currency ?? 'EUR';
  }

  protected cost(row: Row): string {
    return row.objective === null ? '—' : money(row.objective, this.currency());
  }

  protected increase(row: Row): string {
    return row.increase === null ? '—' : `${row.increase > 0 ? '+' : ''}${money(row.increase, this.currency())}`;
  }

  protected increasePercent(row: Row): string {
    return row.increasePercent === null ? '—' : `${row.increasePercent > 0 ? '+' : ''}${percent(row.increasePercent)}`;
  }

  protected baseTotal(): string {
    const objective = this.view()?.objective ?? null;
    return objective === null ? '—' : money(objective, this.currency());
  }
}
