import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { ComparedRun, Comparison } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { AWARD_CAUTION } from '../award-caution';
import { TENDER_ID } from '../testing/award-fixtures';
import { RunCompare } from './run-compare';

const SPLIT = '11111111-1111-4111-8111-111111111111';
const SOLE = '22222222-2222-4222-8222-222222222222';

function compared(overrides: Partial<ComparedRun> & Pick<ComparedRun, 'runId' | 'scenarioName'>): ComparedRun {
  return {
    awardable: true,
    whatIf: null,
    status: 'optimal',
    objective: 1000000,
    fixedCost: 75000,
    variableCost: 925000,
    vendorsAwarded: 3,
    largestShare: 0.45,
    regionsSplit: 2,
    priceOverSplit: 0,
    priceOverSplitPercent: 0,
    ...overrides,
  };
}

const comparison: Comparison = {
  currency: 'EUR',
  runs: [
    compared({ runId: SPLIT, scenarioName: 'All regions split' }),
    compared({ runId: SOLE, scenarioName: 'All regions sole', objective: 1042500, regionsSplit: 0, priceOverSplit: 42500, priceOverSplitPercent: 0.0425 }),
  ],
  baseline: { runId: SPLIT, objective: 1000000 },
  costOfSoleAward: { low: 42500, high: 42500, lowPercent: 0.0425, highPercent: 0.0425, exact: true },
};

const eur = (value: number) => new Intl.NumberFormat(undefined, { style: 'currency', currency: 'EUR', maximumFractionDigits: 2 }).format(value);
const pct = (value: number) => new Intl.NumberFormat(undefined, { style: 'percent', maximumFractionDigits: 2 }).format(value);

describe('RunCompare', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<RunCompare>;

  async function open(runs: string, answer: Comparison): Promise<HTMLElement> {
    TestBed.configureTestingModule({
      imports: [RunCompare],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(RunCompare);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.componentRef.setInput('runs', runs);
    fixture.detectChanges();
    const request = http.expectOne((r) => r.url === `/api/tenders/${TENDER_ID}/compare`);
    expect(request.request.params.get('runs')).toBe(runs);
    request.flush(answer);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  afterEach(() => http.verify());

  it('highlights the cost of sole award as an amount and a percentage', async () => {
    const page = await open(`${SPLIT},${SOLE}`, comparison);
    const sole = page.querySelector('.sole-cost')!;

    expect(sole.querySelector('h2')!.textContent).toBe('Cost of sole award');
    expect(sole.textContent).toContain(eur(42500));
    expect(sole.textContent).toContain(pct(0.0425));
    expect(page.textContent).toContain(AWARD_CAUTION);
  });

  it('where the runs are not proven best, shows the range the bounds allow ("between €0.00 and €20,000.00"), never a negative amount', async () => {
    // Split found €1,050,000 (lower limit €1,000,000), sole found €1,020,000 (lower limit €990,000):
    // the server's soleAwardCostRange gives 0 … 20,000 (shared/award-wording.ts, unit-tested there).
    const page = await open(`${SPLIT},${SOLE}`, {
      ...comparison,
      costOfSoleAward: { low: 0, high: 20_000, lowPercent: 0, highPercent: 20_000 / 1_050_000, exact: false },
    });
    const sole = page.querySelector('.sole-cost')!;
    expect(sole.querySelector('.figure')!.textContent).toContain(`between ${eur(0)} and ${eur(20_000)}`);
    expect(sole.textContent).toContain('the exact cost is not known');
    expect(sole.querySelector('.figure')!.textContent).not.toContain('-');
  });

  it('puts the runs side by side with the price of each over the split baseline', async () => {
    const page = await open(`${SPLIT},${SOLE}`, comparison);
    const headers = [...page.querySelectorAll('thead th')].map((th) => th.textContent.trim());
    expect(headers[1]).toContain('All regions split');
    expect(headers[1]).toContain('Split baseline');
    expect(headers[2]).toContain('All regions sole');

    const row = (label: string) =>
      [...page.querySelectorAll('tbody tr')]
        .find((tr) => tr.querySelector('th')!.textContent === label)!
        .querySelectorAll('td');
    expect([...row('Total cost')].map((td) => td.textContent)).toEqual([eur(1000000), eur(1042500)]);
    expect([...row('Regions split')].map((td) => td.textContent)).toEqual(['2', '0']);
    expect(row('Price over the split baseline')[0].textContent).toBe('Baseline');
    expect(row('Price over the split baseline')[1].textContent).toBe(`+${eur(42500)} (+${pct(0.0425)})`);
  });

  it('says what to run when the ready-made scenarios have no award yet', async () => {
    const page = await open(`${SPLIT},${SOLE}`, { ...comparison, baseline: null, costOfSoleAward: null });
    expect(page.querySelector('.sole-cost')!.textContent).toContain('Run both ready-made scenarios');
  });

  it('asks for two runs before calling the server', () => {
    TestBed.configureTestingModule({ imports: [RunCompare], providers: [provideApi(), provideHttpClientTesting(), provideRouter([])] });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(RunCompare);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.componentRef.setInput('runs', SPLIT);
    fixture.detectChanges();
    http.expectNone((r) => r.url.endsWith('/compare'));
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('Choose at least two runs');
  });
});
