import { I18nPluralPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatTableModule } from '@angular/material/table';
import type { RegionView } from '@shared/tenders';
import { quantity } from '../../ui/number-format';
import { ScrollFrame } from '../../ui/scroll-frame';

/** A tender's regions with their forecast quantities, read-only, with the total underneath. */
@Component({
  selector: 'app-region-table',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [I18nPluralPipe, ScrollFrame, MatTableModule],
  template: `
    <div class="table-card">
      <div class="table-scroll" [appScrollFrame]="label()">
        <table mat-table [dataSource]="regions()" [attr.aria-label]="label()">
          <ng-container matColumnDef="code">
            <th mat-header-cell *matHeaderCellDef>Code</th>
            <td mat-cell *matCellDef="let r">{{ r.code }}</td>
            <td mat-footer-cell *matFooterCellDef></td>
          </ng-container>
          <ng-container matColumnDef="name">
            <th mat-header-cell *matHeaderCellDef>Region</th>
            <td mat-cell *matCellDef="let r">{{ r.name }}</td>
            <th mat-footer-cell *matFooterCellDef scope="row">Total ({{ regions().length | i18nPlural: regionCount }})</th>
          </ng-container>
          <ng-container matColumnDef="forecast">
            <th mat-header-cell *matHeaderCellDef class="num">Forecast ({{ unit() }})</th>
            <td mat-cell *matCellDef="let r" class="num">{{ quantity(r.forecast) }}</td>
            <td mat-footer-cell *matFooterCellDef class="num total">{{ total() }}</td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let r; columns: columns"></tr>
          <tr mat-footer-row *matFooterRowDef="columns"></tr>
        </table>
      </div>
    </div>
  `,
  styleUrl: './region-table.scss',
})
export class RegionTable {
  readonly regions = input.required<RegionView[]>();
  readonly unit = input.required<string>();
  readonly label = input('Regions');
  protected readonly columns = ['code', 'name', 'forecast'];
  protected readonly regionCount = { '=1': '1 region', other: '# regions' };
  protected readonly quantity = quantity;
  protected readonly total = computed(() => quantity(this.regions().reduce((sum, r) => sum + r.forecast, 0)));
}
