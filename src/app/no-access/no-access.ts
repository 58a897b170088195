import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS } from '@shared/roles';
import { Auth } from '../core/auth/auth';

/** Where roleGuard sends a signed-in person who opened a page of another role. */
@Component({
  selector: 'app-no-access',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule, MatIconModule],
  template: `
    <div class="page message">
      <mat-icon class="big" aria-hidden="true">lock</mat-icon>
      <h1>No access to that page</h1>
      <p class="lead">
        That page is not part of the {{ roleLabel() }} role. If you need it, ask your administrator
        to change your role.
      </p>
      <a mat-flat-button routerLink="/">Back to overview</a>
    </div>
  `,
  styleUrl: './no-access.scss',
})
export class NoAccess {
  private readonly user = inject(Auth).user;
  protected readonly roleLabel = computed(() => {
    const user = this.user();
    return user ? ROLE_LABELS[user.role] : 'your';
  });
}
