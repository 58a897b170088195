import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, afterNextRender, afterRenderEffect, computed, inject, input, signal, viewChild } from '@angular/core';
import type { VendorAward } from '@shared/award';
import { REGIONS_PER_PAGE, RegionPager, regionPage } from '../../ui/region-pages';
import { quantity } from '../../ui/number-format';

export interface MatrixRegion {
  code: string;
  name: string;
  forecast: number;
}

/**
 * Who supplies how much of each region: one row per awarded vendor, one column per region. With
 * many regions the columns come a page at a time (25 by default), and the table scrolls sideways
 * inside its own focusable box (so keyboard users can scroll it too) while the vendor column
 * stays in place.
 */
@Component({
  selector: 'app-allocation-matrix',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RegionPager],
  template: `
    <app-region-pager [total]="regions().length" [(pageIndex)]="pageIndex" [(pageSize)]="pageSize" [label]="'Pages of regions: ' + caption()" />
    @if (more().right || more().left) {
      <p class="scroll-cue" aria-hidden="true">
        {{ more().right ? 'More regions to the right: scroll the table sideways (arrow keys once it has focus).' : 'Scrolled to the last region of this page.' }}
      </p>
    }
    <div #box class="table-card table-scroll" tabindex="0" role="region" [attr.aria-label]="caption() + ' (scrolls sideways)'"
      [class.more-right]="more().right" [class.more-left]="more().left" (scroll)="measure()">
      <table>
        <caption class="visually-hidden">{{ caption() }}</caption>
        <thead>
          <tr>
            <th scope="col" class="sticky">Vendor</th>
            @for (region of shown(); track region.code) {
              <th scope="col" class="number" [attr.title]="region.name">{{ region.code }}<span class="region-name">{{ region.name }}</span></th>
            }
          </tr>
        </thead>
        <tbody>
          @for (row of rows(); track row.vendor) {
            <tr>
              <th scope="row" class="sticky">{{ row.name }}</th>
              @for (cell of row.cells; track $index) {
                <td class="number" [class.empty]="cell === null">{{ cell === null ? '–' : cell }}</td>
              }
            </tr>
          }
        </tbody>
        <tfoot>
          <tr>
            <th scope="row" class="sticky">Forecast ({{ unit() }})</th>
            @for (region of shown(); track region.code) {
              <td class="number">{{ format(region.forecast) }}</td>
            }
          </tr>
        </tfoot>
      </table>
    </div>
  `,
  styleUrl: './allocation-matrix.scss',
})
export class AllocationMatrix {
  private readonly box = viewChild.required<ElementRef<HTMLElement>>('box');
  /** Whether columns are hidden to the right or left of the visible part (no layout, no cue). */
  protected readonly more = signal({ left: false, right: false });
  readonly awards = input.required<readonly VendorAward[]>();
  readonly regions = input.required<readonly MatrixRegion[]>();
  readonly vendorNames = input.required<Record<string, { name: string }>>();
  readonly unit = input('');
  readonly caption = input('Quantity awarded by vendor and region');

  protected readonly format = quantity;
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(REGIONS_PER_PAGE);
  /** The regions on the current page only (see ui/region-pages.ts). */
  protected readonly shown = regionPage(this.regions, this.pageIndex, this.pageSize);
  constructor() {
    // Measured after every render (a new page of regions, new awards) and whenever the box is resized.
    afterRenderEffect(() => {
      this.shown();
      this.rows();
      this.measure();
    });
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      if (typeof ResizeObserver === 'undefined') return;
      const observer = new ResizeObserver(() => this.measure());
      observer.observe(this.box().nativeElement);
      destroyRef.onDestroy(() => observer.disconnect());
    });
  }

  protected measure(): void {
    const el = this.box().nativeElement;
    const next = { left: el.scrollLeft > 1, right: el.scrollLeft + el.clientWidth < el.scrollWidth - 1 };
    const now = this.more();
    if (next.left !== now.left || next.right !== now.right) this.more.set(next);
  }

  protected readonly rows = computed(() => {
    const names = this.vendorNames();
    return this.awards().map((award) => {
      const byRegion = new Map(award.lines.map((line) => [line.region, line.quantity]));
      return {
        vendor: award.vendor,
        name: names[award.vendor]?.name ?? award.vendor,
        cells: this.shown().map((region) => {
          const q = byRegion.get(region.code);
          return q === undefined || q === 0 ? null : quantity(q);
        }),
      };
    });
  });
}
