import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { provideApi } from '../core/http/provide-api';
import { AuditTrail } from '../awards/audit-trail/audit-trail';
import { TENDER_ID, signInAs } from '../awards/testing/award-fixtures';
import { NoticeList } from '../notices/notice-list/notice-list';
import { tenderView } from '../tenders/testing/tender-fixtures';
import { DownloadLink } from './download-link';
import { attachmentName } from './transfer';

/**
 * Lists show skeleton rows while they load and their empty state only once the answer says they are
 * empty; an export link shows what it is doing until the browser has the file.
 */
const providers = () => [
  provideApi(), provideHttpClientTesting(), provideRouter([]),
  { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
];

describe('skeleton rows while a list loads', () => {
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('the audit trail shows skeleton rows announced as "Loading the audit trail…", not "No entries yet.", until the answer', async () => {
    TestBed.configureTestingModule({ imports: [AuditTrail], providers: providers() });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(AuditTrail);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.detectChanges();
    const page = fixture.nativeElement as HTMLElement;
    expect(page.querySelector('app-skeleton-rows [role=status]')?.textContent?.trim()).toBe('Loading the audit trail…');
    expect(page.querySelectorAll('app-skeleton-rows .skeleton-row').length).toBe(5);
    expect(page.textContent).not.toContain('No entries yet.');

    http.expectOne(`/api/tenders/${TENDER_ID}/audit`).flush([]);
    http.expectOne(`/api/tenders/${TENDER_ID}`).flush(tenderView({ id: TENDER_ID, timeZone: 'Europe/Dublin' }));
    await fixture.whenStable();
    expect(page.querySelector('app-skeleton-rows')).toBeNull();
    expect(page.querySelector('.empty-row')?.textContent?.trim()).toBe('No entries yet.');
  });

  it('the notice list shows skeleton rows, then "No notice yet." only once the server answered an empty list', async () => {
    TestBed.configureTestingModule({ imports: [NoticeList], providers: providers() });
    const http = TestBed.inject(HttpTestingController);
    await signInAs('buyer');
    const fixture = TestBed.createComponent(NoticeList);
    fixture.detectChanges();
    const page = fixture.nativeElement as HTMLElement;
    expect(page.querySelector('app-skeleton-rows [role=status]')?.textContent?.trim()).toBe('Loading notices…');
    expect(page.textContent).not.toContain('No notice yet.');

    http.expectOne({ method: 'GET', url: '/api/notices' }).flush([]);
    await fixture.whenStable();
    expect(page.querySelector('app-skeleton-rows')).toBeNull();
    expect(page.querySelector('.empty-row')?.textContent?.trim()).toBe('No notice yet.');
  });
});

@Component({
  imports: [DownloadLink],
  template: `<app-download-link href="/api/tenders/t1/bids.xlsx" preparing="Preparing the workbook…">Export to .xlsx</app-download-link>`,
})
class Host {}

describe('DownloadLink, the one export link with progress', () => {
  const saved: string[] = [];
  beforeEach(() => {
    // jsdom has no object URLs: the saved file's name is what the browser would be handed.
    Object.assign(URL, { createObjectURL: () => 'blob:test', revokeObjectURL: () => undefined });
    jest.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
      saved.push(this.download);
    });
  });
  afterEach(() => jest.restoreAllMocks());

  it('says "Preparing the workbook…" (role=status) while the server prepares it, then saves it under the server\'s file name', async () => {
    TestBed.configureTestingModule({ imports: [Host], providers: providers() });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(Host);
    fixture.detectChanges();
    const page = fixture.nativeElement as HTMLElement;
    const link = page.querySelector<HTMLAnchorElement>('a[download]')!;
    expect(link.getAttribute('href')).toBe('/api/tenders/t1/bids.xlsx');

    link.dispatchEvent(new MouseEvent('click', { bubbles: true, cancelable: true, button: 0 }));
    await fixture.whenStable();
    expect(page.querySelector('app-progress-note [role=status]')?.textContent).toBe('Preparing the workbook…');
    expect(page.querySelector('mat-progress-bar')?.getAttribute('mode')).toBe('indeterminate');
    expect(link.getAttribute('aria-busy')).toBe('true');

    http.expectOne('/api/tenders/t1/bids.xlsx').flush(new Blob(['xlsx']), {
      headers: { 'Content-Disposition': 'attachment; filename="NHP-2026-014-bid-tabulation.xlsx"' },
    });
    await fixture.whenStable();
    expect(saved).toEqual(['NHP-2026-014-bid-tabulation.xlsx']);
    expect(page.querySelector('app-progress-note')).toBeNull();
    expect(page.querySelector('.outcome')?.textContent).toBe('Downloaded NHP-2026-014-bid-tabulation.xlsx.');
    http.verify();
  });

  it('reads the file name from Content-Disposition, the UTF-8 form first', () => {
    expect(attachmentName(`attachment; filename="a.xlsx"; filename*=UTF-8''Sal%C3%A9-2026.xlsx`, 'x')).toBe('Salé-2026.xlsx');
    expect(attachmentName('attachment; filename="plain.csv"', 'x')).toBe('plain.csv');
    expect(attachmentName(null, 'fallback.json')).toBe('fallback.json');
  });
});
