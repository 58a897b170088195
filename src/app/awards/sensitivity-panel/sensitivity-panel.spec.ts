import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import type { SensitivityCheck, SensitivityView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { RUN_ID } from '../testing/award-fixtures';
import { SENSITIVITY_POLL_MS, SensitivityPanel } from './sensitivity-panel';

const url = `/api/runs/${RUN_ID}/sensitivity`;
/** Same formatter as the page, so the test does not depend on the machine's locale. */
const eur = (value: number) => new Intl.NumberFormat(undefined, { style: 'currency', currency: 'EUR', maximumFractionDigits: 2 }).format(value);

const none: SensitivityView = { runId: RUN_ID, objective: 10_000, vendorsAwarded: 1, steps: [-20, -10, 10, 20], awardIncrement: null, all: null, regions: [] };

/** One region of 1,000 t; A alone (no fee, €10/t, cap 1,050 t) up to 0 %, B joins from +10 %. */
const finished: SensitivityCheck = {
  regionCode: null, regionName: null, pending: 0, stableFrom: -20, stableTo: 0,
  summary: 'The same vendors win the same regions between −20 % and 0 % (tested at −20 %, −10 %, +10 % and +20 % of all forecasts; nothing in between or beyond was tried). At +10 % the award changes.',
  cases: [
    { changePercent: -20, runId: 'r1', status: 'optimal', objective: 8000, vendorsAwarded: 1, sameAward: true, changes: [] },
    { changePercent: -10, runId: 'r2', status: 'optimal', objective: 9000, vendorsAwarded: 1, sameAward: true, changes: [] },
    { changePercent: 10, runId: 'r3', status: 'optimal', objective: 11_600, vendorsAwarded: 2, sameAward: false, changes: ['Brinewick Salt Co-op would be awarded (Cranby depot)'] },
    { changePercent: 20, runId: 'r4', status: 'optimal', objective: 12_800, vendorsAwarded: 2, sameAward: false, changes: ['Brinewick Salt Co-op would be awarded (Cranby depot)'] },
  ],
};

describe('SensitivityPanel', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<SensitivityPanel>;

  beforeEach(() => {
    jest.useFakeTimers();
    // jsdom has no canvas: the chart draws nothing and the table stands in for it.
    jest.spyOn(HTMLCanvasElement.prototype, 'getContext').mockReturnValue(null);
    TestBed.configureTestingModule({
      imports: [SensitivityPanel],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SensitivityPanel);
    fixture.componentRef.setInput('runId', RUN_ID);
    fixture.componentRef.setInput('regions', [{ code: 'R01', name: 'Cranby depot', forecast: 1000 }, { code: 'R02', name: 'Wexcombe depot', forecast: 2000 }]);
    fixture.detectChanges();
  });

  afterEach(() => {
    http.verify();
    jest.useRealTimers();
    jest.restoreAllMocks();
  });

  async function answer(view: SensitivityView, advanceMs = 0): Promise<void> {
    await jest.advanceTimersByTimeAsync(advanceMs);
    http.expectOne({ method: 'GET', url }).flush(view);
    fixture.detectChanges();
  }

  const page = () => fixture.nativeElement as HTMLElement;

  it('offers the check when none was made, queues it with a POST, then polls until every re-solve has finished', async () => {
    await answer(none);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Check forecast changes/ }))).click();
    const post = http.expectOne({ method: 'POST', url });
    expect(post.request.body).toEqual({});
    post.flush({ queued: 4 });
    await answer({ ...none, all: { ...finished, pending: 2, summary: '2 of 4 re-solves still running.', stableFrom: null, stableTo: null } });
    expect(page().querySelector('[role=status]')!.textContent).toContain('4 re-solves queued.');
    expect(page().querySelector('[role=status]')!.textContent).toContain('2 re-solves still running.');
    expect(page().querySelector('mat-progress-bar')).not.toBeNull();
    await answer({ ...none, all: finished }, SENSITIVITY_POLL_MS);
    expect(page().querySelector('.summary')!.textContent).toBe(finished.summary);
    // Once they have run, the status no longer says they are queued.
    expect(page().querySelector('[role=status]')!.textContent.trim()).toBe('The 4 re-solves have finished: the figures below are complete.');
    // Finished: no further request.
    await jest.advanceTimersByTimeAsync(SENSITIVITY_POLL_MS * 5);
    http.expectNone(url);
  });

  it('tabulates each change with the run in the middle: totals, difference to the run, vendors awarded and what changes (the chart\'s text alternative)', async () => {
    await answer({ ...none, all: finished });
    const table = page().querySelector('table')!;
    expect(table.querySelector('caption')!.textContent).toBe('Total cost and vendors awarded for each change of all forecasts');
    const rows = [...table.querySelectorAll('tbody tr')].map((tr) => [...tr.querySelectorAll('th, td')].map((c) => c.textContent.trim()));
    expect(rows.map((r) => r[0])).toEqual(['−20 %', '−10 %', '0 % (the run)', '+10 %', '+20 %']);
    expect(rows.map((r) => r[1])).toEqual([eur(8000), eur(9000), eur(10_000), eur(11_600), eur(12_800)]);
    expect(rows.map((r) => r[3])).toEqual(['1', '1', '1', '2', '2']);
    expect(rows[3][2]).toContain(`+${eur(1600)}`);
    expect(rows[0][2]).toContain(`−${eur(2000)}`);
    expect(rows[3][4]).toContain('The award changes');
    expect(rows[3][4]).toContain('Brinewick Salt Co-op would be awarded (Cranby depot)');
    expect(rows[1][4]).toBe('Same vendors, same regions');
    // Each tested change opens its own re-solve; the run's row is the page itself.
    expect([...table.querySelectorAll('tbody th a')].map((a) => a.getAttribute('href'))).toEqual(['/r1', '/r2', '/r3', '/r4']);
  });

  it('checks one region alone: the chosen region code is sent', async () => {
    await answer({ ...none, all: finished });
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    await select.clickOptions({ text: 'Wexcombe depot (R02)' });
    await (await loader.getHarness(MatButtonHarness.with({ text: /Check this region alone/ }))).click();
    const post = http.expectOne({ method: 'POST', url });
    expect(post.request.body).toEqual({ regionCode: 'R02' });
    post.flush({ queued: 4 });
    const region: SensitivityCheck = { ...finished, regionCode: 'R02', regionName: 'Wexcombe depot', summary: 'The same vendors win the same regions between −20 % and +20 %.', stableTo: 20 };
    await answer({ ...none, all: finished, regions: [region] });
    expect(page().querySelector('h4')!.textContent).toBe('Wexcombe depot (R02) alone');
    expect(page().textContent).toContain('between −20 % and +20 %');
  });
});
