import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS } from '@shared/roles';
import { Auth } from '../core/auth/auth';
import { ROLE_GUIDES } from './role-guide';

/** The overview every role lands on after sign-in. */
@Component({
  selector: 'app-home',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatIconModule, MatButtonModule],
  templateUrl: './home.html',
  styleUrl: './home.scss',
})
export class Home {
  private readonly auth = inject(Auth);

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
  protected readonly isAdmin = computed(() => this.user()?.role === 'admin');
}
