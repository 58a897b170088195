import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import type { RunView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { AWARD_CAUTION } from '../award-caution';
import { RUN_ID, TENDER_ID, runView, signInAs } from '../testing/award-fixtures';
import { RUN_POLL_MS, RunResult } from './run-result';

const runUrl = `/api/runs/${RUN_ID}`;

/** Same formatter as the page, so the test does not depend on the machine's locale. */
const eur = (value: number) => new Intl.NumberFormat(undefined, { style: 'currency', currency: 'EUR', maximumFractionDigits: 2 }).format(value);

const emptySensitivity = { runId: RUN_ID, objective: 1234567.5, vendorsAwarded: 2, steps: [-20, -10, 10, 20], awardIncrement: null, all: null, regions: [] };

describe('RunResult', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<RunResult>;

  beforeEach(async () => {
    jest.useFakeTimers();
    // jsdom has no canvas: the chart draws nothing and the figures table stands in for it.
    jest.spyOn(HTMLCanvasElement.prototype, 'getContext').mockReturnValue(null);
    TestBed.configureTestingModule({
      imports: [RunResult],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('buyer');
    fixture = TestBed.createComponent(RunResult);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.componentRef.setInput('runId', RUN_ID);
    fixture.detectChanges();
  });

  afterEach(() => {
    // The explanation section asks for its own state; its spec (award-explanation.spec.ts) checks that.
    http.match(`${runUrl}/explanation`);
    // The forecast check section asks for its own figures (its spec is sensitivity-panel.spec.ts).
    for (const request of http.match({ method: 'GET', url: `${runUrl}/sensitivity` })) request.flush(emptySensitivity);
    http.verify();
    jest.useRealTimers();
    jest.restoreAllMocks();
  });

  /** Lets the poll's timer fire, answers the request it makes, and renders. */
  async function answerPoll(run: RunView, advanceMs = 0): Promise<void> {
    await jest.advanceTimersByTimeAsync(advanceMs);
    http.expectOne({ method: 'GET', url: runUrl }).flush(run);
    fixture.detectChanges();
  }

  function page(): HTMLElement {
    return fixture.nativeElement as HTMLElement;
  }

  it('polls every second while the run solves and stops once it has finished', async () => {
    const startedAt = new Date(Date.now() - 15_000).toISOString();
    await answerPoll(runView({ status: 'queued', startedAt: null, finishedAt: null, result: null, objective: null }));
    expect(page().querySelector('.run-status')!.textContent).toContain('Waiting to start');

    await answerPoll(runView({ status: 'solving', startedAt, finishedAt: null, result: null, objective: null }), RUN_POLL_MS);
    expect(page().querySelector('.run-status')!.textContent).toContain('Solving');
    const bar = page().querySelector('mat-progress-bar[mode=determinate]')!;
    expect(bar.getAttribute('aria-valuetext')).toMatch(/^\d+ s of at most 60 s$/);
    expect(page().textContent).toContain('Cancel run');

    await answerPoll(runView(), RUN_POLL_MS);
    expect(page().querySelector('.run-status')!.textContent).toContain('Best possible award (proven)');

    // Finished: no further request, however long the page stays open.
    await jest.advanceTimersByTimeAsync(RUN_POLL_MS * 10);
    http.expectNone(runUrl);
    expect(page().textContent).not.toContain('Cancel run');
  });

  it('announces status changes in a polite live region', async () => {
    await answerPoll(runView({ status: 'solving', finishedAt: null, result: null }));
    const live = page().querySelector('.run-status')!;
    expect(live.getAttribute('role')).toBe('status');
    expect(live.getAttribute('aria-live')).toBe('polite');
  });

  it('writes the totals in the tender currency, with the per-vendor award and the matrix', async () => {
    await answerPoll(runView());
    const totals = page().querySelector('.totals')!.textContent;
    expect(totals).toContain(eur(50000));
    expect(totals).toContain(eur(1184567.5));
    expect(totals).toContain(eur(1234567.5));

    const vendorRows = [...page().querySelectorAll('table[aria-labelledby=vendors-heading] tr.mat-mdc-row')].map((row) =>
      [...row.querySelectorAll('td')].map((cell) => cell.textContent.trim()),
    );
    expect(vendorRows[0][0]).toBe('Northfell Minerals');
    expect(vendorRows[0][1]).toBe('Cranby depot');
    expect(vendorRows[1][0]).toContain('Brinewick Salt Co-op');
    expect(vendorRows[1][0]).toContain('SME');

    const matrix = page().querySelector('app-allocation-matrix table')!;
    expect(matrix.querySelector('tbody th[scope=row]')!.textContent).toBe('Northfell Minerals');
    expect(page().textContent).toContain(AWARD_CAUTION);
    // The chart's text alternative lists every vendor's share.
    expect(page().querySelector('app-share-chart[kind=bar] table')!.textContent).toContain('Brinewick Salt Co-op');
  });

  it('explains in plain words why an infeasible run has no award, and offers no award actions', async () => {
    const diagnosis = [
      'region Wexcombe depot: no vendor bid it',
      'total capacity 41,000 t is below total forecast 44,500 t',
    ];
    await answerPoll(
      runView({
        status: 'infeasible',
        objective: null,
        result: { ...runView().result!, status: 'infeasible', objective: null, fixedCost: null, variableCost: null, bound: null, gap: null, awards: [], diagnosis },
      }),
    );
    const items = [...page().querySelectorAll('.diagnosis li')].map((li) => li.textContent.trim());
    expect(items).toEqual(diagnosis);
    expect(page().querySelector('.run-status')!.textContent).toContain('No award meets the rules');
    expect(page().textContent).not.toContain('Recommend this award');
    expect(page().querySelector('.totals')).toBeNull();
  });

  it('says "Best possible award (proven)" for an optimum, and keeps the engine\'s figures in a collapsed "Engine details" panel', async () => {
    await answerPoll(runView());
    expect(page().querySelector('.run-status .badge')!.textContent).toBe('Best possible award (proven)');
    expect(page().querySelector('.plain-status')!.textContent).toBe('No cheaper award meets every rule: the engine proved it.');
    const panel = page().querySelector('app-engine-details mat-expansion-panel')!;
    expect(panel.querySelector('mat-panel-title')!.textContent).toBe('Engine details');
    expect(panel.classList.contains('mat-expanded')).toBe(false);
    expect(panel.textContent).toContain('test engine 1.0');
    // No solver words outside the panel.
    const outside = page().textContent.replace(panel.textContent, '');
    for (const word of ['Best bound', 'Bound from', 'Gap', 'Engine:', 'branch-and-bound']) expect(outside).not.toContain(word);
  });

  it('a run stopped at the time limit at €1,100,000 with a lower limit of €1,000,000 is "at most 10% above the best possible"; recommending it asks first and sends nothing when cancelled', async () => {
    const run = runView({
      status: 'feasible',
      objective: 1_100_000,
      result: { ...runView().result!, status: 'feasible', objective: 1_100_000, bound: 1_000_000, gap: 100_000 / 1_100_000 },
    });
    await answerPoll(run);
    expect(page().querySelector('.run-status .badge')!.textContent).toBe('Best award found in the time limit');
    expect(page().querySelector('.plain-status')!.textContent).toBe('Best award found in the time limit: at most 10% above the best possible.');
    [...page().querySelectorAll('button')].find((b) => b.textContent.includes('Recommend this award'))!.click();
    fixture.detectChanges();
    const dialog = document.querySelector('mat-dialog-container')!;
    expect(dialog.querySelector('h2')!.textContent).toBe('Recommend an award not proven best?');
    expect(dialog.textContent).toContain('costs at most 10% more than the best possible');
    expect(dialog.textContent).toContain(eur(1_100_000));
    [...dialog.querySelectorAll('button')].find((b) => b.textContent.includes('Cancel'))!.click();
    await jest.advanceTimersByTimeAsync(500);
    fixture.detectChanges();
    // No justification form opened, nothing sent.
    expect(document.querySelector('app-recommend-dialog')).toBeNull();
    http.expectNone({ method: 'POST', url: `/api/tenders/${TENDER_ID}/recommendation` });
  });

  it('cancels a solving run and stops asking once the server says it is cancelled', async () => {
    await answerPoll(runView({ status: 'solving', finishedAt: null, result: null, objective: null }));
    const cancel = [...page().querySelectorAll('button')].find((b) => b.textContent.includes('Cancel run'))!;
    cancel.click();
    const { startedAt, finishedAt, result, ...summary } = runView({ status: 'cancelled' });
    void result;
    http.expectOne({ method: 'POST', url: `${runUrl}/cancel` }).flush({ ...summary, startedAt, finishedAt });
    fixture.detectChanges();
    expect(page().querySelector('.run-status')!.textContent).toContain('Cancelled');

    await answerPoll(runView({ status: 'cancelled', result: null, objective: null }), RUN_POLL_MS);
    await jest.advanceTimersByTimeAsync(RUN_POLL_MS * 5);
    http.expectNone(runUrl);
  });
});
