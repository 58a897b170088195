import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { signInAs } from '../../awards/testing/award-fixtures';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { provideApi } from '../../core/http/provide-api';
import { localClosingTime } from '../../tenders/closing-time';
import { TENDER_UUID, tenderView } from '../../tenders/testing/tender-fixtures';
import { BidPage } from './bid-page';

/**
 * The vendor's /tenders/:id (the same link as the buyer's tender detail): the tender as a vendor
 * is served it — no estimate, no invitations, no count of bids — with the published award basis.
 */
const closesAt = new Date(Date.now() + 5 * 86_400_000).toISOString();
const served = tenderView({
  status: 'open',
  closesAt,
  closedAt: null,
  awardBasis: { sourcing: 'split', soleRegions: ['R02'], maxVendors: 2, maxVendorShare: 0.45, awardIncrement: 25 },
  buyingBody: { name: 'Cranby County Roads', address: '1 Depot Row, Cranby', email: 'tenders@cranby.tendara.test', country: 'IE' },
  bidValidityDays: 120,
});

describe('BidPage (vendor view of a tender)', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<BidPage>;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [BidPage],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('vendor');
    fixture = TestBed.createComponent(BidPage);
    fixture.componentRef.setInput('id', TENDER_UUID);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await answerWhenAsked(`/api/tenders/${TENDER_UUID}`, served, () => fixture.detectChanges());
    await answerWhenAsked(`/api/tenders/${TENDER_UUID}/bid`, { bid: null }, () => fixture.detectChanges());
    // The clarifications panel lists the tender's questions.
    await answerWhenAsked(`/api/tenders/${TENDER_UUID}/questions`, [], () => fixture.detectChanges());
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  it('states the published award basis in the buyer’s words before the vendor bids', () => {
    const page = fixture.nativeElement as HTMLElement;
    expect(page.querySelector('app-award-basis-panel h2')?.textContent).toBe('How the contract will be awarded');
    expect([...page.querySelectorAll('app-award-basis-panel li')].map((li) => li.textContent)).toEqual([
      'A region may be shared between vendors, except Wexcombe depot (R02), which goes to one vendor.',
      'At most 2 vendors will be awarded.',
      'No vendor will be awarded more than 45 % of the total quantity.',
      'Quantities are awarded in whole multiples of 25 t.',
      'Within these rules, the award goes to the bids with the lowest total cost: fixed fees plus unit prices times the quantities awarded.',
    ]);
    expect(page.querySelector('app-award-basis-panel')?.textContent).toContain('120 days after closing');
    expect(page.textContent).toContain(localClosingTime(closesAt, 'Europe/Berlin'));
    expect(page.textContent).not.toContain('submitted a bid');
    expect(page.textContent).not.toContain('Estimated value');
  });

  it('offers an empty bid for every region, and Save draft and Submit', async () => {
    expect(await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Cranby depot"]' }))).getValue()).toBe('');
    expect(await (await loader.getHarness(MatInputHarness.with({ selector: '[aria-label="Unit price, Wexcombe depot"]' }))).getValue()).toBe('');
    expect(await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).toBeTruthy();
    expect(await loader.getHarness(MatButtonHarness.with({ text: /Submit bid/ }))).toBeTruthy();
  });
});
