import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { BidView, TenderView } from '@shared/tenders';
import { provideApi } from '../../core/http/provide-api';
import { withCents } from '../../ui/money-input';
import { totalAtForecast } from '../bid-total';
import { waitFor } from '../../testing/wait-for';
import { BidForm } from './bid-form';

const tender: TenderView = {
  id: '0d6f4b9e-93a1-4d1f-8a55-1c2f7b3e9a10',
  reference: 'WCX-2027-001',
  title: 'Brine for the coastal depots',
  commodity: 'Brine, 23 %',
  unit: 'm3',
  currency: 'EUR',
  locale: 'en-GB',
  status: 'open',
  closesAt: new Date(Date.now() + 5 * 86_400_000).toISOString(),
  regionCount: 2,
  totalForecast: 700,
  description: '',
  standstillDays: 10, standstillExemption: null, closureDays: [], standstillEndsAt: null,
  publishedAt: '2026-11-01T09:00:00Z',
  closedAt: null,
  awardBasis: { sourcing: 'split', soleRegions: [] },
  buyingBody: null,
  timeZone: 'UTC',
  bidValidityDays: 90,
  clarificationsCloseAt: '2026-11-15T12:00:00Z',
  abnormallyLowPercent: 20,
  amendments: [],
  cancellation: null,
  regions: [
    { code: 'HVN', name: 'Harrowven depot', forecast: 400 },
    { code: 'QSL', name: 'Quillstead depot', forecast: 300 },
  ],
};

const draft: BidView = {
  id: 'b1', status: 'draft', fixedFee: 500, capacity: null, prices: { HVN: 12.5 }, revision: 0, version: 3,
  submittedAt: null, digest: null, updatedAt: '2026-11-02T10:00:00Z', document: null, answersAmendment: 0, amendmentNote: null,
};

describe('totalAtForecast', () => {
  it('adds the fixed fee to price × forecast over the offered regions only', () => {
    expect(totalAtForecast(500, { HVN: 12.5, QSL: null }, tender.regions)).toEqual({ total: 500 + 12.5 * 400, offered: 1, quantity: 400 });
  });
});

describe('withCents', () => {
  it('shows money with at least two decimals and keeps finer unit prices as they are', () => {
    expect([58.4, 12, 0, 3.1416, 1200.05].map(withCents)).toEqual(['58.40', '12.00', '0.00', '3.1416', '1200.05']);
  });
});

describe('BidForm', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<BidForm>;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [BidForm],
      providers: [provideApi(), provideHttpClientTesting(), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(BidForm);
    fixture.componentRef.setInput('tender', tender);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: `/api/tenders/${tender.id}/bid` }).flush({ bid: draft });
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  function text(): string {
    return (fixture.nativeElement as HTMLElement).textContent ?? '';
  }

  it('labels each unit price with its region and keeps the total at the forecast live', async () => {
    const quill = await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Quillstead depot"]' }));
    // Money keeps its cents on screen: 12.5 is shown as 12.50.
    expect(await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Harrowven depot"]' }))).getValue()).toBe('12.50');
    expect(text()).toContain('€5,500.00');
    await quill.setValue('10');
    expect(text()).toContain('€8,500.00');
    expect(text()).toContain('2 of 2 regions');
  });

  it('sends the loaded version with the figures, and blank prices are left out', async () => {
    await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Harrowven depot"]' }))).setValue('');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Quillstead depot"]' }))).setValue('11.25');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).click();
    const request = http.expectOne({ method: 'PUT', url: `/api/tenders/${tender.id}/bid` });
    expect(request.request.body).toEqual({ fixedFee: 500, capacity: null, prices: { QSL: 11.25 }, submit: false, version: 3, documentId: null });
    request.flush({ ...draft, prices: { QSL: 11.25 }, version: 4 });
    await fixture.whenStable();
    expect(fixture.nativeElement.querySelector('[role=status]').textContent).toContain('Draft saved');
  });

  /** Answers the submit confirmation (it lives in the overlay, outside the component). */
  async function confirmSubmit(answer: 'Submit bid' | 'Cancel'): Promise<void> {
    const overlay = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const dialog = await overlay.getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatButtonHarness.with({ text: answer }))).click();
  }

  it('leaves a figure marked in error out of the running total, and says so', async () => {
    // 500 + 12.5 × 400 = 5,500.00; a negative Quillstead price is not added.
    await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Quillstead depot"]' }))).setValue('-3');
    expect(text()).toContain('€5,500.00');
    expect(text()).toContain('One figure is marked in error and not counted until corrected.');
  });

  it('asks before submitting, with the figures it commits to; cancelling sends nothing', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ text: /Submit bid/ }))).click();
    const overlay = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const dialog = await overlay.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Submit your bid?');
    // 1 of 2 regions; 500 + 12.5 × 400 = €5,500.00; validity 90 days.
    expect(await dialog.getContentText()).toContain('You offer 1 of 2 regions, €5,500.00 at the forecast');
    expect(await dialog.getContentText()).toContain('binding for 90 days');
    await confirmSubmit('Cancel');
    http.expectNone({ method: 'PUT' });
  });

  it('counts typed figures as unsaved until they are saved', async () => {
    expect(fixture.componentInstance.unsavedChanges()).toBe(false);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Quillstead depot"]' }))).setValue('11');
    expect(fixture.componentInstance.unsavedChanges()).toBe(true);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).click();
    http.expectOne({ method: 'PUT', url: `/api/tenders/${tender.id}/bid` }).flush({ ...draft, prices: { HVN: 12.5, QSL: 11 }, version: 4 });
    await fixture.whenStable();
    expect(fixture.componentInstance.unsavedChanges()).toBe(false);
  });

  it('on a 409 says the bid changed elsewhere and offers to reload', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ text: /Submit bid/ }))).click();
    await confirmSubmit('Submit bid');
    http.expectOne({ method: 'PUT', url: `/api/tenders/${tender.id}/bid` }).flush(
      { type: 'about:blank', title: 'Conflict', status: 409, detail: 'This bid was changed elsewhere (another tab or a colleague) since you loaded it. Reload it to see the current figures; nothing was saved.' },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect(text()).toContain('Changed elsewhere — reload');
    const reloaded = (await loader.getHarness(MatButtonHarness.with({ text: /Reload/ }))).click();
    await waitFor('the bid to be read again', () => http.match({ url: `/api/tenders/${tender.id}/bid` }).some((r) => (r.flush({ bid: { ...draft, version: 5, fixedFee: 750 } }), true)));
    await reloaded;
    expect(text()).not.toContain('Changed elsewhere');
    expect(await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=fixedFee]' }))).getValue()).toBe('750.00');
  });

  it('refuses an invalid price with the shared schema message and sends nothing', async () => {
    await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Quillstead depot"]' }))).setValue('-3');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Submit bid/ }))).click();
    http.expectNone({ method: 'PUT' });
    expect(text()).toContain('Unit price must be a positive number.');
  });
});
