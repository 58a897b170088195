import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { Worklist, WorklistCount } from '@shared/worklist';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../http/api-base-url';

/** What waits for the signed-in person: the home page's worklist and the navigation's count. */
@Injectable({ providedIn: 'root' })
export class WorklistApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  worklist(): Observable<Worklist> {
    return this.http.get<Worklist>(`${this.base}/worklist`);
  }

  count(): Observable<WorklistCount> {
    return this.http.get<WorklistCount>(`${this.base}/worklist/count`);
  }
}
