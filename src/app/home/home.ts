import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS } from '@shared/roles';
import type { WorklistItem } from '@shared/worklist';
import { Auth } from '../core/auth/auth';
import { localClosingTime } from '../tenders/closing-time';
import { loadErrorMessage } from '../ui/load-error';
import { ROLE_GUIDES } from './role-guide';
import { WorklistApi } from '../core/shell/worklist-api';

/** Material Symbols for each kind of worklist item. */
const ICONS: Record<WorklistItem['kind'], string> = {
  invitation: 'mark_email_unread',
  'bid-returned': 'undo',
  'draft-closing': 'hourglass_bottom',
  'clarification-answered': 'question_answer',
  letter: 'contract',
  questions: 'contact_support',
  'closing-soon': 'schedule',
  'to-evaluate': 'fact_check',
  returned: 'assignment_return',
  'letters-due': 'send',
  standstill: 'pending_actions',
  contracts: 'handshake',
  draft: 'edit_note',
  approval: 'approval',
  'audit-verify': 'verified',
  'failed-mail': 'unsubscribe',
  'deactivated-session': 'no_accounts',
  'pending-invitation': 'person_add',
};

/**
 * The page every role lands on: what waits for this person now (GET /api/worklist), section by
 * section, each item a link to the page that deals with it; below it, how Tendara works for the role.
 */
@Component({
  selector: 'app-home',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatIconModule, MatButtonModule],
  templateUrl: './home.html',
  styleUrl: './home.scss',
})
export class Home {
  private readonly auth = inject(Auth);
  private readonly api = inject(WorklistApi);

  protected readonly user = this.auth.user;
  protected readonly firstName = computed(() => this.user()?.name.split(/\s+/)[0] ?? '');
  protected readonly roleLabel = computed(() => {
    const user = this.user();
    return user ? ROLE_LABELS[user.role] : '';
  });
  protected readonly guide = computed(() => {
    const user = this.user();
    return user ? ROLE_GUIDES[user.role] : null;
  });

  private readonly worklist = rxResource({ stream: () => this.api.worklist() });
  protected readonly loading = this.worklist.isLoading;
  protected readonly sections = computed(() => this.worklist.value()?.sections ?? []);
  protected readonly total = computed(() => this.worklist.value()?.total ?? 0);
  protected readonly loadError = computed(() => loadErrorMessage(this.worklist.error(), 'Your worklist could not be loaded.'));
  /** Placeholders while the worklist loads (one per section the role usually has). */
  protected readonly skeletons = [1, 2, 3];

  protected icon(item: WorklistItem): string {
    return ICONS[item.kind];
  }

  protected due(item: WorklistItem): string | null {
    return item.dueAt ? `${item.dueLabel ?? 'Due'}: ${localClosingTime(item.dueAt, item.timeZone ?? undefined)}` : null;
  }

  protected reload(): void {
    this.worklist.reload();
  }
}
