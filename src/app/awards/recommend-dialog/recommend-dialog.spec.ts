import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import type { RecommendationView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { RUN_ID, TENDER_ID } from '../testing/award-fixtures';
import { RecommendDialog, type RecommendDialogData } from './recommend-dialog';

const saved: RecommendationView = {
  id: 'e1e1e1e1-0000-4000-8000-000000000002',
  tenderId: TENDER_ID,
  runId: RUN_ID,
  status: 'recommended',
  justification: 'Least total cost; every depot covered.',
  recommendedBy: { id: 'user-buyer', name: 'Mira Okonjo' },
  recommendedAt: '2026-12-01T10:00:00Z',
  decidedBy: null,
  decidedAt: null,
  comment: null,
};

describe('RecommendDialog', () => {
  it('submitting the form posts the recommendation itself and closes with it, never letting the browser submit the page', () => {
    const closed: unknown[] = [];
    const data: RecommendDialogData = { tenderId: TENDER_ID, runId: RUN_ID, scenarioName: 'All regions split', total: '€1,000,000.00', status: 'Best possible award (proven)' };
    TestBed.configureTestingModule({
      imports: [RecommendDialog],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        { provide: MAT_DIALOG_DATA, useValue: data },
        { provide: MatDialogRef, useValue: { close: (value: unknown) => closed.push(value) } },
      ],
    });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(RecommendDialog);
    fixture.detectChanges();
    const page = fixture.nativeElement as HTMLElement;
    const area = page.querySelector('textarea')!;
    area.value = 'Least total cost; every depot covered.';
    area.dispatchEvent(new Event('input'));

    const submit = new Event('submit', { cancelable: true });
    page.querySelector('form')!.dispatchEvent(submit);
    // A form the framework does not own would reload the page and drop the dialog unsaved.
    expect(submit.defaultPrevented).toBe(true);
    const request = http.expectOne(`/api/tenders/${TENDER_ID}/recommendation`);
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({ runId: RUN_ID, justification: 'Least total cost; every depot covered.' });
    request.flush(saved, { status: 201, statusText: 'Created' });
    expect(closed).toEqual([saved]);
    http.verify();
  });
});
