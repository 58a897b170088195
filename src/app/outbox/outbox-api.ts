import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { OutboxMessage, OutboxSummary } from '@shared/people';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** The mail Tendara has sent, as the mail catcher stored it. */
@Injectable({ providedIn: 'root' })
export class OutboxApi {
  private readonly http = inject(HttpClient);
  private readonly base = `${inject(API_BASE_URL)}/outbox`;

  /** Newest first. */
  list(): Observable<OutboxSummary[]> {
    return this.http.get<OutboxSummary[]>(this.base);
  }

  get(id: string): Observable<OutboxMessage> {
    return this.http.get<OutboxMessage>(`${this.base}/${encodeURIComponent(id)}`);
  }
}
