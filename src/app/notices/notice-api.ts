import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, InjectionToken, inject } from '@angular/core';
import type { NoticePreview, NoticeStatus, NoticeSummary, NoticeView } from '@shared/notices';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/**
 * How often the sender asks for the state of queued notices. A token so that tests (and a
 * deployment with a slower mail relay) can change it without touching the component.
 */
export const NOTICE_POLL_MS = new InjectionToken<number>('NOTICE_POLL_MS', {
  providedIn: 'root',
  factory: () => 2000,
});

/** The answer of POST /api/tenders/:id/notices: how many notices this call queued (0 when all already were). */
export interface SendAnswer {
  queued: number;
}

/** Award notices: the letters themselves, their previews before sending, and the sending. */
@Injectable({ providedIn: 'root' })
export class NoticeApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  /** A vendor gets only its own notices, a buyer those of its tenders; the server decides. */
  list(filter: { tenderId?: string; status?: NoticeStatus | null } = {}): Observable<NoticeSummary[]> {
    let params = new HttpParams();
    if (filter.tenderId) params = params.set('tenderId', filter.tenderId);
    if (filter.status) params = params.set('status', filter.status);
    return this.http.get<NoticeSummary[]>(`${this.base}/notices`, { params });
  }

  get(id: string): Observable<NoticeView> {
    return this.http.get<NoticeView>(`${this.base}/notices/${encodeURIComponent(id)}`);
  }

  /** Every letter of an awarded tender as it would be sent; nothing is stored. */
  previews(tenderId: string): Observable<NoticePreview[]> {
    return this.http.get<NoticePreview[]>(`${this.tenderUrl(tenderId)}/notices/preview`);
  }

  /** Queues one notice per bidder. Safe to repeat: the server never queues a bidder twice. */
  send(tenderId: string): Observable<SendAnswer> {
    return this.http.post<SendAnswer>(`${this.tenderUrl(tenderId)}/notices`, {});
  }

  /** A plain link: the browser downloads the workbook with the session cookie. */
  scheduleUrl(tenderId: string): string {
    return `${this.tenderUrl(tenderId)}/award-schedule.xlsx`;
  }

  private tenderUrl(id: string): string {
    return `${this.base}/tenders/${encodeURIComponent(id)}`;
  }
}
