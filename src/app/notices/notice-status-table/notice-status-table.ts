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
    <div class="table-card table-scroll" appScrollFrame="Delivery of the notices">
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
          <th mat-header-cell *matHeaderCellDef scope="col" class="number">Attempts</th>
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
  styleUrl: './notice-status-table.scss',
})
export class NoticeStatusTable {
  readonly notices = input.required<readonly NoticeSummary[]>();

  protected readonly columns = ['vendor', 'kind', 'status', 'attempts', 'sentAt'];

  /** Table rows come untyped from mat-table, hence a typed accessor rather than an index in the template. */
  protected kindOf(notice: NoticeSummary): string {
    return NOTICE_KIND_LABELS[notice.kind];
  }
}
