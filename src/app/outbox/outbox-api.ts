import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { OutboxMessage, OutboxPage } from '@shared/people';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** The mail Tendara has sent, as the mail catcher stored it. */
@Injectable({ providedIn: 'root' })
export class OutboxApi {
  private readonly http = inject(HttpClient);
  private readonly base = `${inject(API_BASE_URL)}/outbox`;

  /** One page, newest first; `q` searches subject and addresses. */
  list(query: { q: string; page: number; pageSize: number }): Observable<OutboxPage> {
    const params: Record<string, string | number> = { page: query.page, pageSize: query.pageSize };
    if (query.q) params['q'] = query.q;
    return this.http.get<OutboxPage>(this.base, { params });
  }

  get(id: string): Observable<OutboxMessage> {
    return this.http.get<OutboxMessage>(`${this.base}/${encodeURIComponent(id)}`);
  }
}
