import { HttpErrorResponse, HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { Auth } from '../auth/auth';
import { API_BASE_URL } from './api-base-url';
import { toApiError } from './api-error';

/**
 * Turns every HTTP failure into an ApiError and, when a call says the session is gone (401),
 * forgets the signed-in person and sends them to the sign-in page.
 *
 * Calls to the session endpoint itself are left alone: GET answers 401 whenever nobody is
 * signed in (that is how the app learns it at start), and POST answers 401 for a wrong
 * password, which the sign-in page shows in place.
 */
export const problemInterceptor: HttpInterceptorFn = (req, next) => {
  const auth = inject(Auth);
  const router = inject(Router);
  const sessionUrl = `${inject(API_BASE_URL)}/session`;

  return next(req).pipe(
    catchError((error: unknown) => {
      if (!(error instanceof HttpErrorResponse)) return throwError(() => error);
      if (error.status === 401 && req.url !== sessionUrl) {
        auth.forget();
        const returnUrl = router.url;
        void router.navigate(['/sign-in'], {
          queryParams: returnUrl.startsWith('/sign-in') ? {} : { returnUrl },
        });
      }
      return throwError(() => toApiError(error));
    }),
  );
};
