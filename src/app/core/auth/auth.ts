import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
// Types only: shared/auth.ts also holds the zod schemas, which the start-up bundle should not carry.
import type { Role, SessionUser } from '@shared/roles';
import type { SignIn } from '@shared/auth';
import { Observable, catchError, firstValueFrom, map, of, tap } from 'rxjs';
import { API_BASE_URL } from '../http/api-base-url';

/** The signed-in person, as the rest of the client sees it. */
@Injectable({ providedIn: 'root' })
export class Auth {
  private readonly http = inject(HttpClient);
  private readonly sessionUrl = `${inject(API_BASE_URL)}/session`;
  private readonly current = signal<SessionUser | null>(null);

  /** Who is signed in, or null. */
  readonly user = this.current.asReadonly();
  readonly signedIn = computed(() => this.current() !== null);

  /**
   * Asks the server who is signed in. Run once at start-up: besides the answer, this first call
   * makes the server set the XSRF-TOKEN cookie that every later POST/DELETE must echo.
   * Any failure (401, server down) simply leaves nobody signed in.
   */
  restore(): Promise<void> {
    const request = this.http.get<{ user: SessionUser }>(this.sessionUrl).pipe(
      map((body) => body.user),
      catchError(() => of(null)),
      tap((user) => this.current.set(user)),
    );
    return firstValueFrom(request).then(() => undefined);
  }

  signIn(credentials: SignIn): Observable<SessionUser> {
    return this.http.post<{ user: SessionUser }>(this.sessionUrl, credentials).pipe(
      map((body) => body.user),
      tap((user) => this.current.set(user)),
    );
  }

  /** Ends the session on the server; the person is forgotten here even if that call fails. */
  signOut(): Observable<void> {
    return this.http.delete<void>(this.sessionUrl).pipe(
      catchError(() => of(undefined)),
      map(() => undefined),
      tap(() => this.current.set(null)),
    );
  }

  /** Called when the server says the session is gone (any 401). */
  forget(): void {
    this.current.set(null);
  }

  hasRole(roles: readonly Role[]): boolean {
    const user = this.current();
    return user !== null && roles.includes(user.role);
  }
}
