import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { describeAwardBasis } from '@shared/award-basis';
import type { TenderView } from '@shared/tenders';

/**
 * The published award basis in plain words, as every invited vendor reads it before bidding (the
 * same sentences as the invitation e-mail and the bid workbook: `describeAwardBasis`), with the
 * buying body and the bid validity period.
 */
@Component({
  selector: 'app-award-basis-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <section class="basis" aria-labelledby="award-basis-title">
      <h2 id="award-basis-title">How the contract will be awarded</h2>
      <p class="lead">
        {{ tender().status === 'draft' ? 'Vendors will read this award basis before they bid; it is fixed once the tender is published.'
          : 'Published with the tender and fixed for this procedure.' }}
      </p>
      <ul>
        @for (line of lines(); track $index) {
          <li>{{ line }}</li>
        }
      </ul>
      <dl class="terms">
        <div><dt>Bids valid for</dt><dd>{{ tender().bidValidityDays }} days after closing</dd></div>
        @if (tender().buyingBody; as body) {
          <div><dt>Buying body</dt><dd>{{ body.name }}@if (body.address) {, {{ body.address }}} ({{ body.country }}) · {{ body.email }}</dd></div>
        }
      </dl>
      <p class="legal-note"><mat-icon aria-hidden="true">info</mat-icon>The tender documents and the buyer's procurement rules govern this procedure.</p>
    </section>
  `,
  styles: `
    .basis {
      margin: 24px 0;
      padding: 16px 20px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 16px;
      background: var(--mat-sys-surface-container-lowest);
    }
    h2 { margin: 0 0 4px; font: var(--mat-sys-title-medium); }
    .lead, .legal-note { margin: 0 0 8px; color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-medium); }
    ul { margin: 0 0 12px; padding-inline-start: 20px; font: var(--mat-sys-body-large); }
    .terms { display: flex; flex-wrap: wrap; gap: 4px 32px; margin: 0 0 8px; }
    dt { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-label-medium); }
    dd { margin: 0; }
    .legal-note { margin: 0; }
    .legal-note mat-icon { font-size: 18px; width: 18px; height: 18px; }
  `,
})
export class AwardBasisPanel {
  readonly tender = input.required<TenderView>();
  protected readonly lines = computed(() => {
    const t = this.tender();
    return describeAwardBasis(t.awardBasis, { unit: t.unit, regions: t.regions });
  });
}
