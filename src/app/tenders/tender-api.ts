import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { RegionInput } from '@shared/bids';
import type { AbnormallyLowInput, ComplianceInput } from '@shared/compliance';
import type { VendorOrganisationView } from '@shared/people';
import { TENDER_PAGE_SIZE, type BidsAnswer, type InvitationInput, type TabulatedBid, type TenderInput, type TenderPage, type TenderSort, type TenderStatus, type TenderView } from '@shared/tenders';
import { Observable } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';
import { transferProgress, type Transfer } from '../ui/transfer';

/** Buyer, compliance and admin calls about tenders, their invitations and (after closing) their bids. */
@Injectable({ providedIn: 'root' })
export class TenderApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  /** One page of the list; parameters at their defaults are left out of the address. */
  list(filter: { status?: TenderStatus | null; q?: string; page?: number; size?: number; sort?: TenderSort; dir?: 'asc' | 'desc' }): Observable<TenderPage> {
    let params = new HttpParams();
    if (filter.status) params = params.set('status', filter.status);
    const q = filter.q?.trim();
    if (q) params = params.set('q', q);
    if (filter.page && filter.page > 1) params = params.set('page', filter.page);
    if (filter.size && filter.size !== TENDER_PAGE_SIZE) params = params.set('size', filter.size);
    if (filter.sort && filter.sort !== 'closesAt') params = params.set('sort', filter.sort);
    if (filter.dir) params = params.set('dir', filter.dir);
    return this.http.get<TenderPage>(`${this.base}/tenders`, { params });
  }

  get(id: string): Observable<TenderView> {
    return this.http.get<TenderView>(this.tenderUrl(id));
  }

  create(tender: TenderInput): Observable<TenderView> {
    return this.http.post<TenderView>(`${this.base}/tenders`, tender);
  }

  update(id: string, tender: TenderInput): Observable<TenderView> {
    return this.http.put<TenderView>(this.tenderUrl(id), tender);
  }

  /** Reads regions from an .xlsx or .csv; the server stores nothing. */
  importRegions(file: File): Observable<Transfer<{ regions: RegionInput[] }>> {
    const body = new FormData();
    body.append('file', file, file.name);
    return this.http
      .post<{ regions: RegionInput[] }>(`${this.base}/tenders/regions/import`, body, { observe: 'events', reportProgress: true })
      .pipe(transferProgress({ sending: `Sending ${file.name}`, waiting: `Reading ${file.name}…` }, (response) => response.body!));
  }

  organisations(): Observable<VendorOrganisationView[]> {
    return this.http.get<VendorOrganisationView[]>(`${this.base}/vendor-organisations`);
  }

  invite(id: string, invitation: InvitationInput): Observable<TenderView> {
    return this.http.post<TenderView>(`${this.tenderUrl(id)}/invitations`, invitation);
  }

  removeInvitation(id: string, organisationId: string): Observable<TenderView> {
    return this.http.delete<TenderView>(`${this.tenderUrl(id)}/invitations/${encodeURIComponent(organisationId)}`);
  }

  publish(id: string): Observable<TenderView> {
    return this.http.post<TenderView>(`${this.tenderUrl(id)}/publish`, {});
  }

  /** Before closing only the count; after closing the bid tabulation. */
  bids(id: string): Observable<BidsAnswer> {
    return this.http.get<BidsAnswer>(`${this.tenderUrl(id)}/bids`);
  }

  /** Plain links (the browser downloads them with the session cookie). */
  tabulationUrl(id: string): string {
    return `${this.tenderUrl(id)}/tabulation.xlsx`;
  }

  openingRecordUrl(id: string): string {
    return `${this.tenderUrl(id)}/opening-record.xlsx`;
  }

  /** The evaluation report of a closed tender, as a PDF or a workbook. */
  reportUrl(id: string, format: 'pdf' | 'xlsx'): string {
    return `${this.tenderUrl(id)}/report.${format}`;
  }

  /** The procedure as an OCDS 1.1.5 release package, a JSON file to save (buyer and compliance, once published). */
  openDataUrl(id: string): string {
    return `${this.tenderUrl(id)}/ocds.json`;
  }

  /** The compliance check of one bid (buyer): compliant, or excluded with a ground and a note. */
  checkBid(id: string, bidId: string, input: ComplianceInput): Observable<TabulatedBid> {
    return this.http.put<TabulatedBid>(`${this.tenderUrl(id)}/bids/${encodeURIComponent(bidId)}/compliance`, input);
  }

  /** The buyer's decision on a bid flagged as abnormally low. */
  decideLowPrice(id: string, bidId: string, input: AbnormallyLowInput): Observable<TabulatedBid> {
    return this.http.put<TabulatedBid>(`${this.tenderUrl(id)}/bids/${encodeURIComponent(bidId)}/abnormally-low`, input);
  }

  documentUrl(id: string, documentId: string): string {
    return `${this.tenderUrl(id)}/documents/${encodeURIComponent(documentId)}`;
  }

  private tenderUrl(id: string): string {
    return `${this.base}/tenders/${encodeURIComponent(id)}`;
  }
}
