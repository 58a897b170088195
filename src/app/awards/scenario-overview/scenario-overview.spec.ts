import { Component } from '@angular/core';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { Router, provideRouter } from '@angular/router';
import type { RunSummary, ScenarioView } from '@shared/evaluation';
import type { TabulatedBid } from '@shared/tenders';
import { provideApi } from '../../core/http/provide-api';
import { tenderView } from '../../tenders/testing/tender-fixtures';
import { TENDER_ID, signInAs } from '../testing/award-fixtures';
import { ScenarioOverview } from './scenario-overview';

@Component({ template: '' })
class RunPage {}

const tender = tenderView({ id: TENDER_ID, status: 'closed' });
const PUBLISHED_ID = 'c0ffee00-0000-4000-8000-000000000001';
const WHAT_IF_ID = 'c0ffee00-0000-4000-8000-000000000002';

const latestRun: RunSummary = {
  id: 'd1e2f3a4-0000-4000-8000-0000000000a1',
  scenarioId: PUBLISHED_ID,
  scenarioName: 'Published award basis',
  awardable: true,
  whatIf: null,
  status: 'optimal',
  queuedAt: '2026-12-01T09:00:00Z',
  startedAt: '2026-12-01T09:00:01Z',
  finishedAt: '2026-12-01T09:00:04Z',
  timeLimitSeconds: 60,
  objective: 1234567.5,
  droppedVendor: null,
};

const scenarios: ScenarioView[] = [
  {
    id: PUBLISHED_ID,
    tenderId: TENDER_ID,
    name: 'Published award basis',
    rules: { sourcing: 'split', soleRegions: [], exclude: [], require: [] },
    timeLimitSeconds: 60,
    builtIn: 'published',
    awardable: true,
    whatIf: null,
    createdAt: '2026-11-20T11:01:00Z',
    latestRun,
  },
  {
    id: WHAT_IF_ID,
    tenderId: TENDER_ID,
    name: 'Two vendors at most',
    rules: { sourcing: 'split', soleRegions: [], maxVendors: 2, exclude: [], require: [] },
    timeLimitSeconds: 90,
    builtIn: null,
    awardable: false,
    whatIf: 'Adds: at most 2 vendors',
    createdAt: '2026-11-21T08:00:00Z',
    latestRun: null,
  },
];

/** Same formatter as the page, so the test does not depend on the machine's locale. */
const eur = (value: number) => new Intl.NumberFormat(undefined, { style: 'currency', currency: 'EUR', maximumFractionDigits: 2 }).format(value);

/** Answers the page's four GETs: the tender, its scenarios, its runs and its bidders. */
function answerEveryGet(http: HttpTestingController): void {
  http.expectOne({ method: 'GET', url: `/api/tenders/${TENDER_ID}` }).flush(tender);
  http.expectOne({ method: 'GET', url: `/api/tenders/${TENDER_ID}/scenarios` }).flush(scenarios);
  http.expectOne({ method: 'GET', url: `/api/tenders/${TENDER_ID}/runs` }).flush([latestRun]);
  http.expectOne({ method: 'GET', url: `/api/tenders/${TENDER_ID}/bids` }).flush({ submitted: 0, bids: [] as TabulatedBid[] });
}

describe('ScenarioOverview', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<ScenarioOverview>;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [ScenarioOverview],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([{ path: 'runs/:runId', component: RunPage }]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('buyer');
    fixture = TestBed.createComponent(ScenarioOverview);
    fixture.componentRef.setInput('id', TENDER_ID);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    answerEveryGet(http);
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  async function scenarioTable(): Promise<MatTableHarness> {
    return loader.getHarness(MatTableHarness.with({ selector: '[aria-labelledby="scenarios-heading"]' }));
  }

  it('marks the published basis and the what-if (with what it changes) as served, with each rule in words', async () => {
    const rows = await (await scenarioTable()).getCellTextByColumnName();
    expect(rows['name'].text).toHaveLength(2);
    expect(rows['name'].text[0]).toContain('Published award basis');
    expect(rows['name'].text[0]).toContain('Ready-made');
    expect(rows['name'].text[0]).toContain('Published basis');
    expect(rows['name'].text[0]).not.toContain('What-if');
    expect(rows['name'].text[1]).toContain('Two vendors at most');
    expect(rows['name'].text[1]).toContain('What-if');
    expect(rows['name'].text[1]).toContain('Adds: at most 2 vendors');
    expect(rows['name'].text[1]).not.toContain('Published basis');
    expect(rows['rules'].text[1]).toContain('At most 2 vendors');
    expect(rows['rules'].text[1]).toContain('Time limit 90 s');
    expect(rows['latest'].text[0]).toContain(eur(1234567.5));
    expect(rows['latest'].text[1]).toBe('Not run yet');
  });

  it('queues a run of the chosen scenario with a POST and opens the queued run', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Run Two vendors at most"]' }))).click();
    const request = http.expectOne({ method: 'POST', url: `/api/scenarios/${WHAT_IF_ID}/runs` });
    expect(request.request.body).toEqual({});
    request.flush({ id: 'd1e2f3a4-0000-4000-8000-0000000000b2', status: 'queued' }, { status: 202, statusText: 'Accepted' });
    await fixture.whenStable();
    expect(TestBed.inject(Router).url).toBe('/runs/d1e2f3a4-0000-4000-8000-0000000000b2');
  });

  it('says why a run was refused and stays on the list', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Run Published award basis"]' }))).click();
    http.expectOne({ method: 'POST', url: `/api/scenarios/${PUBLISHED_ID}/runs` }).flush(
      { type: 'about:blank', title: 'Conflict', status: 409, detail: 'A run of this scenario is already queued.' },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=status]')?.textContent).toContain('A run of this scenario is already queued.');
    expect(TestBed.inject(Router).url).toBe('/');
  });

  it('offers no run or edit buttons to compliance, who only reads the scenarios', async () => {
    TestBed.resetTestingModule();
    TestBed.configureTestingModule({
      imports: [ScenarioOverview],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('compliance');
    fixture = TestBed.createComponent(ScenarioOverview);
    fixture.componentRef.setInput('id', TENDER_ID);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    answerEveryGet(http);
    await fixture.whenStable();
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Run|Edit|New scenario/ }))).toHaveLength(0);
    expect((await (await scenarioTable()).getCellTextByColumnName())['name'].text).toHaveLength(2);
  });
});

/** The page for a buyer, its four requests made and none answered yet. */
async function openForBuyer(): Promise<{ http: HttpTestingController; fixture: ComponentFixture<ScenarioOverview> }> {
  TestBed.configureTestingModule({
    imports: [ScenarioOverview],
    providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
  });
  const http = TestBed.inject(HttpTestingController);
  await signInAs('buyer');
  const fixture = TestBed.createComponent(ScenarioOverview);
  fixture.componentRef.setInput('id', TENDER_ID);
  return { http, fixture };
}

describe('ScenarioOverview when loading fails', () => {
  it('says why, and Try again asks for the four answers again and shows the scenarios', async () => {
    const { http, fixture } = await openForBuyer();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne(`/api/tenders/${TENDER_ID}`).flush(
      { type: 'about:blank', title: 'Service Unavailable', status: 503, detail: 'The database is being restarted.' },
      { status: 503, statusText: 'Service Unavailable' },
    );
    // One failure fails the page's load: the other three requests are cancelled, not waited for.
    expect(http.match(() => true).map((request) => request.cancelled)).toEqual([true, true, true]);
    await fixture.whenStable();
    const alert = () => (fixture.nativeElement as HTMLElement).querySelector('[role=alert]')?.textContent ?? '';
    expect(alert()).toContain('The database is being restarted.');

    // A click, not the harness's: the harness waits for stability, that is for the very answers below.
    const retry = [...(fixture.nativeElement as HTMLElement).querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Try again');
    expect(retry?.textContent?.trim()).toBe('Try again');
    retry!.click();
    fixture.detectChanges();
    answerEveryGet(http);
    await fixture.whenStable();
    expect(alert()).toBe('');
    const rows = await (await loader.getHarness(MatTableHarness.with({ selector: '[aria-labelledby="scenarios-heading"]' }))).getCellTextByColumnName();
    expect(rows['name'].text).toHaveLength(2);
    http.verify();
  });
});

describe('ScenarioOverview while loading', () => {
  it('says the runs are loading, not that there are none', async () => {
    const { http, fixture } = await openForBuyer();
    // No whenStable: it would wait for the very answers this test holds back.
    fixture.detectChanges();
    expect(http.match(() => true).map((request) => request.request.url).sort()).toEqual(
      [`/api/tenders/${TENDER_ID}`, `/api/tenders/${TENDER_ID}/bids`, `/api/tenders/${TENDER_ID}/runs`, `/api/tenders/${TENDER_ID}/scenarios`]);
    fixture.detectChanges();
    const text = (fixture.nativeElement as HTMLElement).textContent;
    expect(text).toContain('Loading runs…');
    expect(text).not.toContain('No runs yet');
    http.match(() => true).forEach((request) => request.flush(null));
  });
});
