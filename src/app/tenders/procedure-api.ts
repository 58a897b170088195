import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { AmendmentInput, QuestionView } from '@shared/procedure';
import type { TenderView } from '@shared/tenders';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/** Clarifications, amendments and cancellation of a tender (every role; the server decides who may do what). */
@Injectable({ providedIn: 'root' })
export class ProcedureApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  questions(tenderId: string): Observable<QuestionView[]> {
    return this.http.get<QuestionView[]>(`${this.tenderUrl(tenderId)}/questions`);
  }

  ask(tenderId: string, text: string): Observable<QuestionView> {
    return this.http.post<QuestionView>(`${this.tenderUrl(tenderId)}/questions`, { text });
  }

  answer(questionId: string, text: string): Observable<QuestionView> {
    return this.http.post<QuestionView>(`${this.base}/questions/${encodeURIComponent(questionId)}/answer`, { text });
  }

  amend(tenderId: string, amendment: AmendmentInput): Observable<{ number: number }> {
    return this.http.post<{ number: number }>(`${this.tenderUrl(tenderId)}/amendments`, amendment);
  }

  cancel(tenderId: string, reason: string): Observable<TenderView> {
    return this.http.post<TenderView>(`${this.tenderUrl(tenderId)}/cancel`, { reason });
  }

  private tenderUrl(id: string): string {
    return `${this.base}/tenders/${encodeURIComponent(id)}`;
  }
}
