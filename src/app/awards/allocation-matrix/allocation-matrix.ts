import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
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
    <div class="scroll" tabindex="0" role="region" [attr.aria-label]="caption() + ' (scrolls sideways)'">
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
  styles: `
    .scroll { overflow-x: auto; max-width: 100%; border: 1px solid var(--mat-sys-outline-variant); border-radius: 12px; }
    table { border-collapse: separate; border-spacing: 0; min-width: 100%; font: var(--mat-sys-body-medium); }
    th, td { padding: 8px 12px; border-bottom: 1px solid var(--mat-sys-outline-variant); white-space: nowrap; }
    thead th { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-title-small); vertical-align: bottom; }
    tbody th, tfoot th { text-align: start; font-weight: 500; }
    tfoot td, tfoot th { color: var(--mat-sys-on-surface-variant); border-bottom: 0; }
    .sticky { position: sticky; inset-inline-start: 0; z-index: 1; background: var(--mat-sys-surface-container-lowest); box-shadow: 1px 0 0 var(--mat-sys-outline-variant); }
    .number { text-align: end; font-variant-numeric: tabular-nums; }
    .empty { color: var(--mat-sys-on-surface-variant); }
    .region-name { display: block; font: var(--mat-sys-body-small); max-width: 12ch; overflow: hidden; text-overflow: ellipsis; margin-inline-start: auto; }
  `,
})
export class AllocationMatrix {
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
