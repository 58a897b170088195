import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import type { TabulatedBid } from '@shared/tenders';
import { provideApi } from '../../core/http/provide-api';
import { BidCheckDialog, type BidCheckDialogData } from './bid-check-dialog';

const TENDER_ID = 'a1a1a1a1-0000-4000-8000-000000000001';
const bid: TabulatedBid = {
  id: 'b2b2b2b2-0000-4000-8000-000000000002',
  vendor: { id: 'v-kestrel', name: 'Kestrelway Road Services', sme: true },
  fixedFee: 6000, capacity: 5000, prices: { GRM: 46.9 }, submittedAt: '2026-11-29T10:00:00Z', revision: 1,
  digest: 'd'.repeat(64), nonce: 'n'.repeat(64), receiptVerified: true, documentId: null,
  compliance: { decision: null, ground: null, note: null, decidedAt: null },
  abnormallyLow: null,
  flags: { percent: 20, prices: [], total: null, totalCompared: false },
};

function open() {
  const closed: unknown[] = [];
  const data: BidCheckDialogData = { tenderId: TENDER_ID, bid };
  TestBed.configureTestingModule({
    imports: [BidCheckDialog],
    providers: [
      provideApi(),
      provideHttpClientTesting(),
      { provide: MAT_DIALOG_DATA, useValue: data },
      { provide: MatDialogRef, useValue: { close: (value: unknown) => closed.push(value) } },
    ],
  });
  const fixture = TestBed.createComponent(BidCheckDialog);
  fixture.detectChanges();
  return { fixture, closed, http: TestBed.inject(HttpTestingController), page: fixture.nativeElement as HTMLElement };
}

function type(page: HTMLElement, text: string): void {
  const area = page.querySelector('textarea')!;
  area.value = text;
  area.dispatchEvent(new Event('input'));
}

describe('BidCheckDialog', () => {
  it('an exclusion without a ground is not sent: the ground field says why', () => {
    const { fixture, http, page } = open();
    (page.querySelectorAll('mat-radio-button input')[1] as HTMLInputElement).click();
    fixture.detectChanges();
    type(page, 'No haulage licence on file.');
    page.querySelector('form')!.dispatchEvent(new Event('submit', { cancelable: true }));
    fixture.detectChanges();
    http.expectNone(`/api/tenders/${TENDER_ID}/bids/${bid.id}/compliance`);
    expect(page.querySelector('mat-error')?.textContent?.trim()).toBe('An exclusion needs a ground from the list.');
    http.verify();
  });

  it('a compliant check puts the decision and the note, without a ground, and closes with the stored bid', () => {
    const { fixture, closed, http, page } = open();
    type(page, '  Complete; licence and insurance on file.  ');
    fixture.detectChanges();
    page.querySelector('form')!.dispatchEvent(new Event('submit', { cancelable: true }));
    const request = http.expectOne(`/api/tenders/${TENDER_ID}/bids/${bid.id}/compliance`);
    expect(request.request.method).toBe('PUT');
    expect(request.request.body).toEqual({ decision: 'compliant', ground: null, note: 'Complete; licence and insurance on file.' });
    const stored = { ...bid, compliance: { decision: 'compliant', ground: null, note: 'Complete; licence and insurance on file.', decidedAt: '2026-12-01T09:00:00Z' } };
    request.flush(stored);
    expect(closed).toEqual([stored]);
    http.verify();
  });

  it('after choosing "excluded" and then "compliant" again, a compliant check is sent without a ground (the removed ground field leaves no stale error)', () => {
    const { fixture, closed, http, page } = open();
    const radios = page.querySelectorAll('mat-radio-button input');
    (radios[1] as HTMLInputElement).click();
    fixture.detectChanges();
    (radios[0] as HTMLInputElement).click();
    fixture.detectChanges();
    type(page, 'Re-checked: insurance and haulage licence on file.');
    fixture.detectChanges();
    page.querySelector('form')!.dispatchEvent(new Event('submit', { cancelable: true }));
    const request = http.expectOne(`/api/tenders/${TENDER_ID}/bids/${bid.id}/compliance`);
    expect(request.request.body).toEqual({ decision: 'compliant', ground: null, note: 'Re-checked: insurance and haulage licence on file.' });
    const stored = { ...bid, compliance: { decision: 'compliant', ground: null, note: 'Re-checked: insurance and haulage licence on file.', decidedAt: '2026-12-01T09:00:00Z' } };
    request.flush(stored);
    expect(closed).toEqual([stored]);
    http.verify();
  });
});
