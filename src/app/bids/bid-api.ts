import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { BidFigures } from '@shared/bids';
import type { BidSave, BidView } from '@shared/tenders';
import { Observable, map } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';
import { transferProgress, type Transfer } from '../ui/transfer';

/** A vendor's calls about its own bid on one tender. */
@Injectable({ providedIn: 'root' })
export class BidApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  /** The vendor's bid, or null before its first save. */
  get(tenderId: string): Observable<BidView | null> {
    return this.http.get<{ bid: BidView | null }>(`${this.url(tenderId)}/bid`).pipe(map((body) => body.bid));
  }

  /** Send the `version` loaded (null for a first save): a stale one is refused with 409. */
  save(tenderId: string, bid: BidSave): Observable<BidView> {
    return this.http.put<BidView>(`${this.url(tenderId)}/bid`, bid);
  }

  withdraw(tenderId: string, version: number): Observable<BidView> {
    return this.http.post<BidView>(`${this.url(tenderId)}/bid/withdraw`, { version });
  }

  /** Parses a filled-in workbook into figures for review; nothing is submitted. With its progress (ui/transfer.ts). */
  upload(tenderId: string, file: File): Observable<Transfer<{ documentId: string; bid: BidFigures }>> {
    const body = new FormData();
    body.append('file', file, file.name);
    return this.http
      .post<{ documentId: string; bid: BidFigures }>(`${this.url(tenderId)}/bid-workbook`, body, { observe: 'events', reportProgress: true })
      .pipe(transferProgress({ sending: `Sending ${file.name}`, waiting: `Reading workbook ${file.name}…` }, (response) => response.body!));
  }

  /** After closing: confirms the bid stays valid for one more validity period (or until `until`). */
  extendValidity(tenderId: string, until?: string): Observable<{ validUntil: string; extendedUntil: string }> {
    return this.http.post<{ validUntil: string; extendedUntil: string }>(`${this.url(tenderId)}/bid/validity-extension`, until ? { until } : {});
  }

  workbookUrl(tenderId: string): string {
    return `${this.url(tenderId)}/bid-workbook`;
  }

  private url(tenderId: string): string {
    return `${this.base}/tenders/${encodeURIComponent(tenderId)}`;
  }
}
