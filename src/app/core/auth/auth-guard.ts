import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import type { Role } from '@shared/roles';
import { Auth } from './auth';

/**
 * Lets signed-in people through; others go to the sign-in page, which brings them back here.
 * The session is known before the first navigation (see app.config.ts), so no request is needed.
 */
export const authGuard: CanActivateFn = (_route, state) => {
  const auth = inject(Auth);
  if (auth.signedIn()) return true;
  return inject(Router).createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
};

/**
 * Lets through people whose role is one of `roles`. A signed-out visitor goes to sign in; a
 * signed-in person with another role sees the no-access page instead of a broken screen.
 * The server checks the role again on every call; this guard only keeps the client honest.
 */
export function roleGuard(roles: readonly Role[]): CanActivateFn {
  return (_route, state) => {
    const auth = inject(Auth);
    const router = inject(Router);
    if (!auth.signedIn()) {
      return router.createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
    }
    return auth.hasRole(roles) ? true : router.createUrlTree(['/no-access']);
  };
}

/** The sign-in page is for signed-out visitors; a signed-in person goes to their overview. */
export const signedOutGuard: CanActivateFn = () =>
  inject(Auth).signedIn() ? inject(Router).createUrlTree(['/']) : true;
