import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { ContractInput, ContractsView } from '@shared/contracts';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../../core/http/api-base-url';

/** The contract step of an awarded tender: the awarded vendors with their contracts, and recording one. */
@Injectable({ providedIn: 'root' })
export class ContractsApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  list(tenderId: string): Observable<ContractsView> {
    return this.http.get<ContractsView>(`${this.base}/tenders/${encodeURIComponent(tenderId)}/contracts`);
  }

  record(tenderId: string, input: ContractInput): Observable<ContractsView> {
    return this.http.post<ContractsView>(`${this.base}/tenders/${encodeURIComponent(tenderId)}/contracts`, input);
  }
}
