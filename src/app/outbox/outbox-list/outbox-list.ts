import { DatePipe } from '@angular/common';
import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { map } from 'rxjs';
import { OutboxApi } from '../outbox-api';
import { loadErrorMessage } from '../../ui/load-error';

/** /outbox — every e-mail Tendara sent, newest first. */
@Component({
  selector: 'app-outbox-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, RouterLink, MatTableModule, MatIconModule, MatButtonModule, MatProgressBarModule],
  templateUrl: './outbox-list.html',
  styleUrl: './outbox-list.scss',
})
export class OutboxList {
  private readonly api = inject(OutboxApi);
  protected readonly messages = rxResource({ stream: () => this.api.list() });
  /** On a phone the date and recipients move under the subject, so nothing scrolls. */
  protected readonly narrow = toSignal(
    inject(BreakpointObserver).observe('(max-width: 719.98px)').pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly columns = computed(() => (this.narrow() ? ['subject'] : ['date', 'to', 'subject']));

  protected problem(): string {
    return loadErrorMessage(this.messages.error(), 'The outbox could not be loaded.') ?? '';
  }
}
