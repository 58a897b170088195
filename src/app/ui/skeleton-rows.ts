import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';

/**
 * Grey placeholder rows while a list loads, in place of a blank table or an empty state that is
 * not yet true ("No runs yet." before the runs have arrived). Put it in the table's no-data row
 * while the resource `isLoading()`, and the empty state only after:
 *
 *     @if (list.isLoading()) { <app-skeleton-rows label="Loading tenders…" [columns]="4" /> } @else { No tenders yet. }
 *
 * The label is what a screen reader hears (role=status, polite); the bars are hidden from it.
 */
@Component({
  selector: 'app-skeleton-rows',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="skeleton" role="status" aria-live="polite">
      <span class="visually-hidden">{{ label() }}</span>
      @for (row of rowList(); track row) {
        <div class="skeleton-row" aria-hidden="true">
          @for (column of columnList(); track column) {
            <span class="bar" [style.flex-grow]="column === 0 ? 2 : 1"></span>
          }
        </div>
      }
    </div>
  `,
  styles: `
    :host { display: block; }
    .skeleton-row { display: flex; gap: 16px; padding: 10px 0; }
    .skeleton-row + .skeleton-row { border-top: 1px solid var(--mat-sys-outline-variant, #c4c7c5); }
    .bar {
      flex: 1 1 0; height: 14px; border-radius: 4px;
      background: linear-gradient(90deg, #e3e3e3 0%, #f2f2f2 50%, #e3e3e3 100%);
      background-size: 200% 100%;
      animation: skeleton-shimmer 1.4s ease-in-out infinite;
    }
    @keyframes skeleton-shimmer { from { background-position: 100% 0; } to { background-position: -100% 0; } }
    @media (prefers-reduced-motion: reduce) { .bar { animation: none; } }
  `,
})
export class SkeletonRows {
  /** What is loading, for screen readers: "Loading tenders…". */
  readonly label = input.required<string>();
  readonly rows = input(5);
  readonly columns = input(4);
  protected readonly rowList = computed(() => Array.from({ length: this.rows() }, (_, i) => i));
  protected readonly columnList = computed(() => Array.from({ length: Math.max(1, Math.min(this.columns(), 6)) }, (_, i) => i));
}
