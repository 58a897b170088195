import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { DebriefView, ExplanationResult, ExplanationView, RegionCheckView, VendorDebrief } from '@shared/explanation';
import { provideApi } from '../../core/http/provide-api';
import { RUN_ID } from '../testing/award-fixtures';
import { AwardExplanation, EXPLANATION_POLL_MS } from './award-explanation';

const url = `/api/runs/${RUN_ID}/explanation`;

/** Fictional: North goes to Northfell Minerals; Brackwater Haulage (no award) lost it on its fee. */
const result: ExplanationResult = {
  currency: 'EUR', unit: 't', objective: 30000, runProven: true, solves: 4, seconds: 0.4,
  regions: [{
    region: 'R01', regionName: 'North depot', forecast: 1000,
    awarded: [{ vendor: 'v-north', vendorName: 'Northfell Minerals', quantity: 1000, unitPrice: 10 }],
    challenger: {
      vendor: 'v-brack', vendorName: 'Brackwater Haulage', unitPrice: 7, reason: 'fixedFee', exact: true, extraCost: 2000, extraCostAtLeast: null,
      words: 'Brackwater Haulage bid €7.00 per t but was not awarded it: its fixed fee would not be recovered by its lower unit price; it would have cost €2,000.00 more.',
    },
  }],
  debriefVendors: [{ vendor: 'v-brack', vendorName: 'Brackwater Haulage', awarded: false }],
  budgetSeconds: 4, ranges: 0,
};
const brackDebrief: VendorDebrief = {
  vendor: 'v-brack', vendorName: 'Brackwater Haulage', awarded: false,
  regions: [{ region: 'R01', regionName: 'North depot', unitPrice: 7, neededPrice: 4.99, tolerance: 'cent', reason: 'fixedFee', words: 'It would have been awarded this region at €4.99 per t or less (its bid: €7.00, 28.7 % lower).' }],
  uniformReduction: { fraction: 0.167, tolerance: 'percent', words: 'A cut of 16.7 % to all its prices, fixed fee included, would have won it an award.' },
};
const debriefUrl = `/api/runs/${RUN_ID}/debrief/v-brack`;
const debriefView = (over: Partial<DebriefView>): DebriefView => ({
  vendor: 'v-brack', status: 'queued', progress: { done: 0, total: 0 }, result: null, error: null, computedAt: null, ...over,
});
const view = (over: Partial<ExplanationView>): ExplanationView => ({
  runId: RUN_ID, status: 'not-started', progress: { done: 0, total: 0 }, result: null, error: null, queuedAt: null, computedAt: null, debriefs: [], regionChecks: [], ...over,
});

describe('AwardExplanation', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<AwardExplanation>;
  const page = () => fixture.nativeElement as HTMLElement;

  beforeEach(() => {
    jest.useFakeTimers();
    TestBed.configureTestingModule({
      imports: [AwardExplanation],
      providers: [provideApi(), provideHttpClientTesting(), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(AwardExplanation);
    fixture.componentRef.setInput('runId', RUN_ID);
    fixture.detectChanges();
  });
  afterEach(() => {
    http.verify();
    jest.useRealTimers();
  });

  async function answer(method: 'GET' | 'POST', body: ExplanationView, advanceMs = 0): Promise<void> {
    await jest.advanceTimersByTimeAsync(advanceMs);
    http.expectOne({ method, url }).flush(body);
    fixture.detectChanges();
  }

  it('offers to explain an award not yet explained, and asks once (no polling while not started)', async () => {
    await answer('GET', view({}));
    const button = [...page().querySelectorAll('button')].find((b) => b.textContent.includes('Explain this award'))!;
    expect(button.disabled).toBe(false);
    await jest.advanceTimersByTimeAsync(EXPLANATION_POLL_MS * 5);
    http.expectNone(url);
  });

  it('asks for it, shows the progress while the figures are worked out, then the region table, and offers the debrief', async () => {
    await answer('GET', view({}));
    [...page().querySelectorAll('button')].find((b) => b.textContent.includes('Explain this award'))!.click();
    http.expectOne({ method: 'POST', url }).flush(view({ status: 'queued' }));
    fixture.detectChanges();
    await answer('GET', view({ status: 'running', progress: { done: 1, total: 4 } }));
    expect(page().querySelector('[role=status]')!.textContent).toContain('1 of 4 regions done');
    expect(page().querySelector('mat-progress-bar')!.getAttribute('aria-valuenow')).toBe('25');

    await answer('GET', view({ status: 'done', progress: { done: 4, total: 4 }, result }), EXPLANATION_POLL_MS);
    const rows = [...page().querySelectorAll('table')[0].querySelectorAll('tbody tr')].map((tr) => [...tr.children].map((c) => c.textContent.replace(/\s+/g, ' ').trim()));
    expect(rows).toEqual([[
      'North depot1,000 t', 'Northfell Minerals: 1,000 t at €10.00', 'Brackwater Haulage at €7.00',
      'Brackwater Haulage bid €7.00 per t but was not awarded it: its fixed fee would not be recovered by its lower unit price; it would have cost €2,000.00 more.',
    ]]);
    expect(page().textContent).toContain('For the buyer and compliance only');
    // The debrief is not worked out until asked for.
    expect(page().querySelectorAll('table')).toHaveLength(1);
    expect(page().textContent).not.toContain('A cut of 16.7 %');
    // Done: no further request.
    await jest.advanceTimersByTimeAsync(EXPLANATION_POLL_MS * 5);
    http.expectNone(url);
  });

  it("says how many regions' extra costs are ranges and the time the explanation was allowed", async () => {
    await answer('GET', view({ status: 'done', progress: { done: 4, total: 4 }, result: { ...result, ranges: 3, budgetSeconds: 57 } }));
    expect(page().textContent.replace(/\s+/g, ' ')).toContain('For 3 regions the extra cost is given as a range');
    expect(page().textContent).toContain('(57 s)');
  });

  it("asks for a vendor's debrief, shows its progress, then its needed prices and uniform cut", async () => {
    const done = view({ status: 'done', progress: { done: 4, total: 4 }, result });
    await answer('GET', done);
    [...page().querySelectorAll('button')].find((b) => b.textContent.includes('Work out what it would have needed'))!.click();
    http.expectOne({ method: 'POST', url: debriefUrl }).flush(debriefView({}));
    fixture.detectChanges();
    expect(page().querySelector('.vendor-debrief [role=status]')!.textContent).toContain('Waiting for a free solver');
    await answer('GET', { ...done, debriefs: [debriefView({ status: 'running', progress: { done: 1, total: 2 } })] });
    expect(page().querySelector('.vendor-debrief [role=status]')!.textContent).toContain('1 of 2 done');
    await answer('GET', { ...done, debriefs: [debriefView({ status: 'done', progress: { done: 2, total: 2 }, result: brackDebrief })] }, EXPLANATION_POLL_MS);
    expect(page().textContent).toContain('A cut of 16.7 % to all its prices, fixed fee included, would have won it an award.');
    const cells = [...page().querySelectorAll('table')[1].querySelectorAll('tbody td')].map((c) => c.textContent.trim());
    expect(cells.slice(0, 2)).toEqual(['€7.00', '€4.99']);
    await jest.advanceTimersByTimeAsync(EXPLANATION_POLL_MS * 5);
    http.expectNone(url);
  });

  it('offers to work a ranged region out exactly, shows that it is being worked out, then the exact figure, and stops asking', async () => {
    const ranged: ExplanationResult = {
      ...result, ranges: 1,
      regions: [{ ...result.regions[0], challenger: { ...result.regions[0].challenger!, exact: false, extraCost: 2500, extraCostAtLeast: 1500, words: 'Brackwater Haulage bid €7.00 per t but was not awarded it: its fixed fee would not be recovered by its lower unit price; it would have cost between €1,500.00 and €2,500.00 more.' } }],
    };
    const done = view({ status: 'done', progress: { done: 4, total: 4 }, result: ranged });
    const check = (over: Partial<RegionCheckView>): RegionCheckView => ({ region: 'R01', status: 'queued', result: null, error: null, queuedAt: '2026-12-03T10:00:00.000Z', computedAt: null, ...over });
    await answer('GET', done);
    const button = page().querySelector<HTMLButtonElement>('button.region-check')!;
    expect(button.getAttribute('aria-label')).toBe('Work out exactly, North depot');
    button.click();
    http.expectOne({ method: 'POST', url: `${url}/regions/R01` }).flush({ ...done, regionChecks: [check({})] });
    fixture.detectChanges();
    expect(page().querySelector('span.region-check[role=status]')!.textContent).toContain('Waiting for a free solver');
    await answer('GET', { ...done, regionChecks: [check({ status: 'running' })] });
    expect(page().querySelector('span.region-check[role=status]')!.textContent).toContain('Working out the exact figure');
    // Done: the server lays the exact figure over the region.
    await answer('GET', { ...done, result: { ...result, ranges: 0 }, regionChecks: [check({ status: 'done', result: result.regions[0], computedAt: '2026-12-03T10:01:00.000Z' })] }, EXPLANATION_POLL_MS);
    expect(page().textContent).toContain('it would have cost €2,000.00 more.');
    expect(page().textContent).toContain('Worked out with the full time limit.');
    expect(page().querySelector('button.region-check')).toBeNull();
    await jest.advanceTimersByTimeAsync(EXPLANATION_POLL_MS * 5);
    http.expectNone(url);
  });
});
