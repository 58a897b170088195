import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { DomSanitizer } from '@angular/platform-browser';
import { messageDocument } from '../../outbox/outbox-reader/outbox-reader';

/**
 * A letter's HTML as its recipient sees it, for the screen. The same wrapping as the outbox:
 * an iframe with an empty `sandbox` (no scripts, forms or navigation, a unique origin with no
 * access to the app) whose content policy refuses every fetch, so the letter's own inline styles
 * can stay.
 */
@Component({
  selector: 'app-letter-frame',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <iframe
      class="frame"
      sandbox=""
      referrerpolicy="no-referrer"
      [title]="label()"
      [srcdoc]="document()"
    ></iframe>
  `,
  styles: `
    :host { display: block; }
    .frame {
      display: block;
      box-sizing: border-box;
      width: 100%;
      height: 70vh;
      min-height: 420px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 12px;
      background: #ffffff;
    }
  `,
})
export class LetterFrame {
  private readonly sanitizer = inject(DomSanitizer);

  readonly html = input.required<string>();
  /** The frame's accessible name, e.g. "Letter: Award of contract TND-2026-014". */
  readonly label = input.required<string>();

  protected readonly document = computed(() => messageDocument(this.html(), this.sanitizer));
}
