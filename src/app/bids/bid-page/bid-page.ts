import { ChangeDetectionStrategy, Component, computed, effect, inject, input, viewChild } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { Title } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { PRODUCT_NAME } from '../../core/page-title';
import { AwardBasisPanel } from '../../tenders/award-basis-panel/award-basis-panel';
import { localClosingTime, minuteClock, timeLeft } from '../../tenders/closing-time';
import { AmendmentsPanel } from '../../tenders/amendments-panel/amendments-panel';
import { CancelTender } from '../../tenders/cancel-tender/cancel-tender';
import { QuestionsPanel } from '../../tenders/questions-panel/questions-panel';
import { RegionTable } from '../../tenders/region-table/region-table';
import { TenderApi } from '../../tenders/tender-api';
import { TENDER_STATUS_LABELS } from '../../tenders/tender-status';
import { BidForm } from '../bid-form/bid-form';
import { BidValidity } from '../bid-validity/bid-validity';
import { type HoldsUnsavedChanges } from '../../ui/unsaved-changes';
import { loadErrorMessage } from '../../ui/load-error';

/** /tenders/:id for a vendor: the tender it is invited to, and its own bid. */
@Component({
  selector: 'app-bid-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule, MatIconModule, RegionTable, BidForm, BidValidity, AwardBasisPanel, QuestionsPanel, AmendmentsPanel, CancelTender],
  templateUrl: './bid-page.html',
  styleUrl: './bid-page.scss',
})
export class BidPage implements HoldsUnsavedChanges {
  private readonly api = inject(TenderApi);
  private readonly title = inject(Title);

  readonly id = input.required<string>();

  protected readonly tender = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.get(params) });
  protected readonly loadError = computed(() => loadErrorMessage(this.tender.error(), 'The tender could not be loaded.'));
  protected readonly now = minuteClock();
  protected readonly timeLeft = computed(() => {
    const t = this.tender.value();
    // A cancelled tender has no time left, whatever its closing time said.
    return t && t.status !== 'cancelled' ? timeLeft(t.closesAt, this.now()) : '';
  });
  protected readonly statusLabel = TENDER_STATUS_LABELS;
  private readonly form = viewChild(BidForm);
  protected readonly closingTime = localClosingTime;

  constructor() {
    effect(() => {
      const t = this.tender.value();
      if (t) this.title.setTitle(`Your bid on ${t.reference} · ${PRODUCT_NAME}`);
    });
  }

  unsavedChanges(): boolean {
    return this.form()?.unsavedChanges() ?? false;
  }

  protected reloadTender(): void {
    this.tender.reload();
  }
}
