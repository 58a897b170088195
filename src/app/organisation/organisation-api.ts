import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { MemberView } from '@shared/people';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** A vendor's calls about the people of its own organisation. */
@Injectable({ providedIn: 'root' })
export class OrganisationApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  members(): Observable<MemberView> {
    return this.http.get<MemberView>(`${this.base}/organisation/members`);
  }

  /** The contact approves a person an administrator asked to add; the person then gets their link. */
  approve(id: string): Observable<MemberView> {
    return this.http.post<MemberView>(`${this.base}/organisation/members/${encodeURIComponent(id)}/approve`, {});
  }

  refuse(id: string): Observable<MemberView> {
    return this.http.post<MemberView>(`${this.base}/organisation/members/${encodeURIComponent(id)}/refuse`, {});
  }
}
