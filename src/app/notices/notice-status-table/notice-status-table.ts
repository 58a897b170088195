import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { NoticeSummary } from '@shared/notices';
import { NOTICE_KIND_LABELS } from '../notice-labels';
import { NoticeStatusBadge } from '../notice-status-badge';
import { DateTimePipe } from '../../ui/date-time.pipe';
import { ScrollFrame } from '../../ui/scroll-frame';

/** The delivery state of one tender's notices, one row per bidder. */
@Component({
  selector: 'app-notice-status-table',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ScrollFrame, DateTimePipe, RouterLink, MatTableModule, NoticeStatusBadge],
  template: `
    <div class="table-scroll" appScrollFrame="Delivery of the notices">
      <table mat-table [dataSource]="notices()" aria-label="Delivery of the notices">
        <ng-container matColumnDef="vendor">
          <th mat-header-cell *matHeaderCellDef scope="col">Vendor</th>
          <td mat-cell *matCellDef="let notice">
            <a [routerLink]="['/notices', notice.id]">{{ notice.vendor.name }}</a>
          </td>
        </ng-container>
        <ng-container matColumnDef="kind">
          <th mat-header-cell *matHeaderCellDef scope="col">Kind</th>
          <td mat-cell *matCellDef="let notice" class="nowrap">{{ kindOf(notice) }}</td>
        </ng-container>
        <ng-container matColumnDef="status">
          <th mat-header-cell *matHeaderCellDef scope="col">State</th>
          <td mat-cell *matCellDef="let notice">
            <app-notice-status-badge [status]="notice.status" />
            @if (notice.lastError) {
              <span class="error-detail">{{ notice.lastError }}</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="attempts">
          <th mat-header-cell *matHeaderCellDef scope="col">Attempts</th>
          <td mat-cell *matCellDef="let notice" class="number">{{ notice.attempts }}</td>
        </ng-container>
        <ng-container matColumnDef="sentAt">
          <th mat-header-cell *matHeaderCellDef scope="col">Sent</th>
          <td mat-cell *matCellDef="let notice" class="nowrap">
            {{ notice.sentAt | dateTime: notice.timeZone : { seconds: true } }}
          </td>
        </ng-container>

        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
        <tr class="mat-row empty-row" *matNoDataRow>
          <td class="mat-cell" [attr.colspan]="columns.length">No notice has been queued for this tender yet.</td>
        </tr>
      </table>
    </div>
  `,
  styles: `
    :host { display: block; }
    .table-scroll { overflow-x: auto; }
    table { width: 100%; --mat-table-background-color: transparent; }
    th.mat-mdc-header-cell { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-title-small); }
    .nowrap { white-space: nowrap; }
    .number { font-variant-numeric: tabular-nums; text-align: end; }
    .error-detail { display: block; margin-top: 4px; color: var(--mat-sys-error); font: var(--mat-sys-body-small); }
    .empty-row td { padding: 24px 16px; color: var(--mat-sys-on-surface-variant); text-align: center; }
  `,
})
export class NoticeStatusTable {
  readonly notices = input.required<readonly NoticeSummary[]>();

  protected readonly columns = ['vendor', 'kind', 'status', 'attempts', 'sentAt'];

  /** Table rows come untyped from mat-table, hence a typed accessor rather than an index in the template. */
  protected kindOf(notice: NoticeSummary): string {
    return NOTICE_KIND_LABELS[notice.kind];
  }
}
