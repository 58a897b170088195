import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { ResilienceView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { RUN_ID, TENDER_ID, runView } from '../testing/award-fixtures';
import { ResilienceTable } from './resilience-table';

/** Same formatter as the page, so the test does not depend on the machine's locale. */
const eur = (value: number) => new Intl.NumberFormat(undefined, { style: 'currency', currency: 'EUR', maximumFractionDigits: 2 }).format(value);

/** Northfell is required by the scenario's rules; without Brinewick the award costs €1,300,000 (+€65,432.50). */
const view: ResilienceView = {
  runId: RUN_ID,
  objective: 1234567.5,
  rows: [
    { vendor: 'v-north', vendorName: 'Northfell Minerals', status: 'optimal', objective: null, increase: null, increasePercent: null, diagnosis: [], worst: false, required: true },
    { vendor: 'v-brine', vendorName: 'Brinewick Salt Co-op', status: 'optimal', objective: 1_300_000, increase: 65_432.5, increasePercent: 65_432.5 / 1234567.5, diagnosis: [], worst: true, required: false },
  ],
};

describe('ResilienceTable', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<ResilienceTable>;

  beforeEach(async () => {
    TestBed.configureTestingModule({ imports: [ResilienceTable], providers: [provideApi(), provideHttpClientTesting(), provideRouter([])] });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(ResilienceTable);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.componentRef.setInput('runId', RUN_ID);
    fixture.detectChanges();
    // Stability waits for both resources' answers, so they are answered first (the poll asks on its timer's first tick).
    http.expectOne(`/api/runs/${RUN_ID}`).flush(runView());
    await answerWhenAsked(`/api/runs/${RUN_ID}/resilience`, view, () => fixture.detectChanges());
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  it('says a required vendor cannot be dropped, never marks it the worst case, and marks the worst case among the others', () => {
    const rows = [...(fixture.nativeElement as HTMLElement).querySelectorAll('tr.mat-mdc-row')];
    expect(rows).toHaveLength(2);
    const north = rows[0].textContent;
    expect(north).toContain('Northfell Minerals');
    expect(north).toContain('Cannot drop a required vendor');
    expect(north).not.toContain('Worst case');
    expect(rows[1].textContent).toContain('Worst case');
    expect(rows[1].textContent).toContain(eur(1_300_000));
    expect(rows[1].classList.contains('worst-row')).toBe(true);
  });
});
