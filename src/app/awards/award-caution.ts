import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** The caution shown wherever an award decision is prepared or taken. */
export const AWARD_CAUTION =
  "The award recommendation is decision support. Procurement law, thresholds and standstill periods differ by jurisdiction and by the buyer's own rules: the buyer's procurement policy and legal advice decide.";

@Component({
  selector: 'app-award-caution',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <aside class="legal-note" aria-label="Decision support">
      <mat-icon aria-hidden="true">gavel</mat-icon>
      <p>{{ text }}</p>
    </aside>
  `,
  styles: `
    :host { display: block; margin: 0 0 24px; }
    p { margin: 0; max-width: 80ch; }
    /* In a narrow flex row the icon would otherwise be squeezed to a sliver beside the text. */
    mat-icon { flex-shrink: 0; }
  `,
})
export class AwardCaution {
  protected readonly text = AWARD_CAUTION;
}
