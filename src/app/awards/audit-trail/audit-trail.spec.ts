import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { AuditEntryView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { tenderView } from '../../tenders/testing/tender-fixtures';
import { TENDER_ID } from '../testing/award-fixtures';
import { AuditTrail } from './audit-trail';

const audit = `/api/tenders/${TENDER_ID}/audit`;
const hash1 = '3a7bd3e2360a3d29eea436fcfb7e44c735d117c42d1c1835420b6b9942dd4f1b';
const hash2 = '9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08';

const entries: AuditEntryView[] = [
  {
    number: 1,
    seq: 41,
    description: 'Bidding closed; 3 bids opened',
    at: '2026-12-01T09:00:00Z',
    actor: { id: 'u1', name: 'Mira Okonjo', role: 'buyer' },
    action: 'tender.closed',
    subject: 'Tender HWY-2026/07',
    detail: {},
    beforeDigest: null,
    afterDigest: hash2,
    hash: hash1,
  },
  {
    number: 2,
    seq: 57,
    description: 'Award calculation of “All regions split” finished',
    at: '2026-12-01T10:00:00Z',
    actor: null,
    action: 'run.finished',
    subject: 'Run of All regions split',
    detail: {},
    beforeDigest: hash1,
    afterDigest: hash2,
    hash: hash2,
  },
];

describe('AuditTrail', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<AuditTrail>;
  let loader: HarnessLoader;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [AuditTrail],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(AuditTrail);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.detectChanges();
    http.expectOne(audit).flush(entries);
    http.expectOne(`/api/tenders/${TENDER_ID}`).flush(tenderView({ id: TENDER_ID, timeZone: 'Europe/Dublin' }));
    await fixture.whenStable();
    loader = TestbedHarnessEnvironment.loader(fixture);
  });

  afterEach(() => http.verify());

  function page(): HTMLElement {
    return fixture.nativeElement as HTMLElement;
  }

  it('lists the entries with who did what, and shortens digests keeping the full value in a title', async () => {
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    // The tender's own numbers (no gaps), not the store's shared sequence (41, 57).
    expect(rows['seq'].text).toEqual(['1', '2']);
    expect(rows['actor'].text).toEqual(['Mira OkonjoBuyer', 'System']);
    expect(rows['description'].text).toEqual(['Bidding closed; 3 bids opened', 'Award calculation of “All regions split” finished']);
    // In the procedure's time zone, named in the column's heading (09:00 UTC is 09:00 GMT in Dublin in December).
    expect(rows['at'].text[0]).toBe('Tue, 1 Dec 2026, 09:00 GMT');
    expect(page().querySelector('th.mat-column-at')!.textContent).toContain('Time (Europe/Dublin)');
    const digest = page().querySelector(`code[title="${hash1}"]`)!;
    expect(digest.textContent).toBe(`${hash1.slice(0, 12)}…`);
    expect(page().querySelector('a[download]')!.getAttribute('href')).toBe(`${audit}.csv`);
  });

  it('announces an intact chain in a live region', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ text: /Verify the chain/ }))).click().then(() => undefined, () => undefined);
    http.expectOne(`${audit}/verify`).flush({ ok: true, entries: 2, brokenAt: null, message: 'Every hash matches.' });
    await fixture.whenStable();

    const live = page().querySelector('.verify')!;
    expect(live.getAttribute('aria-live')).toBe('polite');
    expect(live.textContent).toContain('Chain intact. Every hash matches.');
  });

  it('announces where a broken chain breaks and marks that entry', async () => {
    page().querySelector<HTMLButtonElement>('.actions button')!.click();
    http.expectOne(`${audit}/verify`).flush({ ok: false, entries: 2, brokenAt: 2, message: 'Entry 2 does not match its stored hash.' });
    await fixture.whenStable();

    expect(page().querySelector('.verify')!.textContent).toContain('Chain broken at entry 2. Entry 2 does not match its stored hash.');
    expect(page().querySelectorAll('tr.broken')).toHaveLength(1);
  });
});
