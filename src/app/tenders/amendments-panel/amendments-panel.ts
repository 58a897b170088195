import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { describeChanges } from '@shared/procedure';
import type { TenderView } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { AmendmentDialog } from './amendment-dialog';
import { localClosingTime } from '../closing-time';

/** The tender's amendment notices, in order; the buyer of an open tender issues the next one here. */
@Component({
  selector: 'app-amendments-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule],
  templateUrl: './amendments-panel.html',
  styleUrl: './amendments-panel.scss',
})
export class AmendmentsPanel {
  private readonly dialog = inject(MatDialog);
  private readonly auth = inject(Auth);
  private readonly destroyRef = inject(DestroyRef);

  readonly tender = input.required<TenderView>();
  /** After an amendment: the page reloads the tender. */
  readonly changed = output<string>();

  protected readonly canAmend = computed(() => this.auth.user()?.role === 'buyer' && this.tender().status === 'open');
  protected readonly amendments = computed(() =>
    this.tender().amendments.map((a) => ({ ...a, lines: describeChanges(a.changes, this.tender().unit, this.tender().timeZone) })).reverse());
  /** Times of the procedure are shown in its time zone, named. */
  protected readonly when = (iso: string) => localClosingTime(iso, this.tender().timeZone);

  protected issue(): void {
    this.dialog
      .open<AmendmentDialog, TenderView, number>(AmendmentDialog, { data: this.tender(), maxWidth: '95vw', width: '760px', autoFocus: 'first-tabbable' })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((number) => {
        if (number) this.changed.emit(`Amendment ${number} is issued; invited vendors are being e-mailed.`);
      });
  }
}
