import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatExpansionModule } from '@angular/material/expansion';
import type { AwardResult } from '@shared/award';
import { marginAboveBest } from '@shared/award-wording';
import { fractionPercent, money } from '../../ui/number-format';

/**
 * The engine's own figures for a run — lower limit (bound) and where it came from, gap, seconds,
 * engine — in a collapsed panel: the decision screens speak the buyer's words, and these stay at
 * hand for specialists (the award workbook has them on its "Engine details" sheet).
 */
@Component({
  selector: 'app-engine-details',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatExpansionModule],
  template: `
    <mat-expansion-panel class="engine-details">
      <mat-expansion-panel-header>
        <mat-panel-title>Engine details</mat-panel-title>
      </mat-expansion-panel-header>
      @let r = result();
      <dl class="facts">
        <div><dt>Best bound (lower limit on the best possible total)</dt><dd>{{ r.bound === null ? 'None known' : amount(r.bound) }}</dd></div>
        <div><dt>Bound from</dt><dd>{{ r.boundSource ?? '—' }}</dd></div>
        <div><dt>Gap (total − bound) ÷ total</dt><dd>{{ r.gap === null ? '—' : percent(r.gap) }}</dd></div>
        @if (margin(); as m) {
          <div><dt>At most above the best possible (total − bound) ÷ bound</dt><dd>{{ percent(m) }}</dd></div>
        }
        <div><dt>Solve time</dt><dd>{{ r.solveSeconds }} s of {{ timeLimitSeconds() }} s</dd></div>
        <div><dt>Engine</dt><dd>{{ r.engine }}</dd></div>
      </dl>
    </mat-expansion-panel>
  `,
  styles: `
    :host { display: block; margin-top: 12px; max-width: 760px; }
    .facts { display: grid; gap: 4px 24px; margin: 0; }
    .facts div { display: grid; grid-template-columns: minmax(200px, 1fr) 1fr; gap: 16px; }
    dt { color: var(--mat-sys-on-surface-variant); }
    dd { margin: 0; font-variant-numeric: tabular-nums; overflow-wrap: anywhere; }
  `,
})
export class EngineDetails {
  readonly result = input.required<AwardResult>();
  readonly currency = input('EUR');
  readonly timeLimitSeconds = input.required<number>();

  protected readonly margin = computed(() => {
    const m = marginAboveBest(this.result());
    return m ? m : null;
  });

  protected amount(value: number): string {
    return money(value, this.currency());
  }

  protected percent(fraction: number): string {
    return fractionPercent(fraction, 2);
  }
}
