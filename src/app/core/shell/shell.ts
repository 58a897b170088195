import { BreakpointObserver } from '@angular/cdk/layout';
import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  computed,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenav, MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { NavigationEnd, Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { ROLE_LABELS } from '@shared/roles';
import { catchError, filter, map, of, startWith, switchMap } from 'rxjs';
import { Logo } from '../../ui/logo';
import { Auth } from '../auth/auth';
import { navigationFor, type NavItem } from './navigation';
import { WorklistApi } from './worklist-api';

/** Below this width the side navigation becomes a menu that slides over the page. */
const NARROW = '(max-width: 959.98px)';

/** The frame around every signed-in page: app bar, navigation by role, main content. */
@Component({
  selector: 'app-shell',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterOutlet,
    RouterLink,
    RouterLinkActive,
    MatToolbarModule,
    MatSidenavModule,
    MatListModule,
    MatIconModule,
    MatButtonModule,
    MatMenuModule,
    Logo,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
})
export class Shell {
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);
  private readonly destroyRef = inject(DestroyRef);
  private readonly main = viewChild.required<ElementRef<HTMLElement>>('main');
  private readonly sidenav = viewChild.required(MatSidenav);

  protected readonly user = this.auth.user;
  protected readonly roleLabel = computed(() => {
    const user = this.user();
    return user ? ROLE_LABELS[user.role] : '';
  });
  protected readonly narrow = toSignal(
    inject(BreakpointObserver).observe(NARROW).pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly navItems = computed(() => {
    const user = this.user();
    return user ? navigationFor(user.role) : [];
  });
  /** How many worklist items wait (GET /api/worklist/count), asked again after every navigation. */
  protected readonly waiting = signal<number | null>(null);

  constructor() {
    const api = inject(WorklistApi);
    this.router.events
      .pipe(
        filter((event) => event instanceof NavigationEnd),
        startWith(null),
        // A newer navigation cancels the count still on its way; a failed count shows none.
        switchMap(() => api.count().pipe(catchError(() => of(null)))),
        takeUntilDestroyed(),
      )
      .subscribe((answer) => this.waiting.set(answer?.total ?? null));
  }

  /** The count is part of the home link's accessible name: "Overview, 3 items waiting". */
  protected accessibleName(item: NavItem): string | null {
    const n = this.waiting();
    if (!item.showsWorklistCount || !n) return null;
    return `${item.label}, ${n} ${n === 1 ? 'item' : 'items'} waiting`;
  }

  /** Closes the sliding menu after a choice, so the chosen page is not hidden behind it. */
  protected closeIfNarrow(): void {
    if (this.narrow()) void this.sidenav().close();
  }

  /**
   * The skip link moves focus itself: a plain href="#main" would resolve against <base href>
   * and leave the current page.
   */
  protected skipToMain(event: Event): void {
    event.preventDefault();
    this.main().nativeElement.focus();
  }

  protected signOut(): void {
    this.auth
      .signOut()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => void this.router.navigate(['/sign-in']));
  }
}
