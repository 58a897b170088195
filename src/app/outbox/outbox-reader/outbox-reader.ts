import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { DomSanitizer, SafeHtml } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { OutboxApi } from '../outbox-api';
import { apiProblem, loadErrorMessage } from '../../ui/load-error';
import { DateTimePipe } from '../../ui/date-time.pipe';

/**
 * Fetches are refused inside the message (no remote images, fonts or tracking pixels); inline
 * styles and embedded images still show, so the mail looks as its recipient sees it.
 */
const MESSAGE_POLICY =
  `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data: cid:">`;

/**
 * Wraps a message's HTML for the iframe's srcdoc.
 *
 * Angular's sanitizer would strip the <style> elements and style attributes every e-mail relies
 * on, so it is bypassed here, and only here: the iframe carries an empty `sandbox` attribute
 * (no scripts, forms, plug-ins, pop-ups or navigation of the app; a unique origin with no access
 * to the app's cookies or DOM), and the policy above stops any network fetch.
 */
export function messageDocument(html: string, sanitizer: DomSanitizer): SafeHtml {
  return sanitizer.bypassSecurityTrustHtml(`${MESSAGE_POLICY}${html}`);
}

/** /outbox/:id — one sent e-mail. */
@Component({
  selector: 'app-outbox-reader',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DateTimePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './outbox-reader.html',
  styleUrl: './outbox-reader.scss',
})
export class OutboxReader {
  private readonly api = inject(OutboxApi);
  private readonly sanitizer = inject(DomSanitizer);

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly message = rxResource({
    params: () => this.id(),
    stream: ({ params }) => this.api.get(params),
  });
  protected readonly document = computed(() => {
    const html = this.message.value()?.html;
    return html ? messageDocument(html, this.sanitizer) : null;
  });

  protected problem(): string {
    const error = this.message.error();
    if (apiProblem(error)?.status === 404) return 'There is no such message in the outbox.';
    return loadErrorMessage(error, 'The message could not be loaded.') ?? '';
  }
}
