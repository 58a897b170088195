import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { AccountSetupView } from '@shared/people';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** The public calls behind the set-password link of an invitation. */
@Injectable({ providedIn: 'root' })
export class AccountSetupApi {
  private readonly http = inject(HttpClient);
  private readonly base = `${inject(API_BASE_URL)}/account-setup`;

  /** Whom the link is for; fails with 404 when the link is unknown, used or expired. */
  find(token: string): Observable<AccountSetupView> {
    return this.http.get<AccountSetupView>(`${this.base}/${encodeURIComponent(token)}`);
  }

  setPassword(token: string, password: string): Observable<void> {
    return this.http.post<void>(`${this.base}/${encodeURIComponent(token)}`, { password });
  }
}
