import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import type { RecommendationView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { AWARD_CAUTION } from '../award-caution';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { RUN_ID, TENDER_ID, runView, signInAs } from '../testing/award-fixtures';
import { tenderView } from '../../tenders/testing/tender-fixtures';
import { RecommendationPanel } from './recommendation-panel';

const base = `/api/tenders/${TENDER_ID}/recommendation`;

const recommended: RecommendationView = {
  id: 'e1e1e1e1-0000-4000-8000-000000000001',
  tenderId: TENDER_ID,
  runId: RUN_ID,
  status: 'recommended',
  justification: 'Least cost with two depots sole-awarded, as the winter plan asks.',
  recommendedBy: { id: 'user-buyer', name: 'Mira Okonjo' },
  recommendedAt: '2026-12-01T10:00:00Z',
  decidedBy: null,
  decidedAt: null,
  comment: null,
};

describe('RecommendationPanel', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<RecommendationPanel>;

  async function open(role: 'buyer' | 'compliance', recommendation: RecommendationView | null, run = runView(), history: RecommendationView[] = []): Promise<HTMLElement> {
    TestBed.configureTestingModule({
      imports: [RecommendationPanel],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs(role);
    fixture = TestBed.createComponent(RecommendationPanel);
    fixture.componentRef.setInput('id', TENDER_ID);
    fixture.detectChanges();
    http.expectOne(base).flush({ recommendation, history });
    if (recommendation) await answerWhenAsked(`/api/runs/${recommendation.runId}`, run, () => fixture.detectChanges());
    if (role === 'compliance' && recommendation?.status === 'recommended') {
      // What the approval reads back: the published basis and the compliance check's exclusions.
      await answerWhenAsked(`/api/tenders/${TENDER_ID}`, tenderView({ id: TENDER_ID, awardBasis: { sourcing: 'split', soleRegions: [], maxVendors: 4 } }), () => fixture.detectChanges());
      await answerWhenAsked(`/api/tenders/${TENDER_ID}/bids`, {
        submitted: 2,
        bids: [
          { vendor: { id: 'v-north', name: 'Northfell Minerals', sme: false }, compliance: { decision: 'compliant', ground: null, note: null } },
          { vendor: { id: 'v-grey', name: 'Greyholm Haulage', sme: false }, compliance: { decision: 'excluded', ground: 'qualification', note: 'No ISO certificate.' } },
        ],
      }, () => fixture.detectChanges());
    }
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  function button(page: HTMLElement, text: string): HTMLButtonElement {
    return [...page.querySelectorAll('button')].find((b) => b.textContent.includes(text))!;
  }

  function typeComment(page: HTMLElement, text: string): void {
    const area = page.querySelector('textarea')!;
    area.value = text;
    area.dispatchEvent(new Event('input'));
  }

  afterEach(() => http.verify());

  it('shows the recommendation, its state and the caution', async () => {
    const page = await open('buyer', recommended);
    expect(page.querySelector('h2')!.textContent).toContain('All regions split');
    expect(page.querySelector('h2')!.textContent).toContain('Awaiting compliance decision');
    expect(page.textContent).toContain(recommended.justification);
    expect(page.textContent).toContain(AWARD_CAUTION);
    // Buyers cannot decide.
    expect(button(page, 'Approve award')).toBeUndefined();
  });

  async function confirmDialog(): Promise<MatDialogHarness> {
    return TestbedHarnessEnvironment.documentRootLoader(fixture).getHarness(MatDialogHarness);
  }

  it('approving first reads back the published basis, the excluded bids, the run\'s status in words and the total, and sends nothing until confirmed', async () => {
    const notProven = runView({
      status: 'feasible',
      result: { ...runView().result!, status: 'feasible', objective: 1_100_000, bound: 1_000_000, gap: 100_000 / 1_100_000 },
      objective: 1_100_000,
    });
    const page = await open('compliance', recommended, notProven);
    button(page, 'Approve award').click();
    let dialog = await confirmDialog();
    expect(await dialog.getTitleText()).toBe('Approve this award?');
    const text = await dialog.getContentText();
    expect(text).toContain('A region may be shared between vendors.');
    expect(text).toContain('Greyholm Haulage: Fails the qualification criteria');
    expect(text).not.toContain('Northfell Minerals');
    // 1,100,000 against a lower limit of 1,000,000: at most 10 % above the best possible.
    expect(text).toContain('Best award found in the time limit: at most 10% above the best possible');
    expect(text).toContain('€1,100,000.00');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    http.expectNone(`${base}/approve`);

    button(page, 'Approve award').click();
    dialog = await confirmDialog();
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Approve award' }))).click();
    await fixture.whenStable();
    const request = http.expectOne({ method: 'POST', url: `${base}/approve` });
    expect(request.request.body).toEqual({ comment: '' });
    request.flush({ ...recommended, status: 'approved', decidedBy: { id: 'user-compliance', name: 'Alba Quennell' }, decidedAt: '2026-12-01T11:00:00Z' });
    await fixture.whenStable();
    expect(page.querySelector('h2')!.textContent).toContain('Approved');
  });

  it('shows the four-eyes refusal when the approver is the person who recommended', async () => {
    const page = await open('compliance', recommended);
    button(page, 'Approve award').click();
    await (await (await confirmDialog()).getHarness(MatButtonHarness.with({ text: 'Approve award' }))).click();
    await fixture.whenStable();
    http.expectOne({ method: 'POST', url: `${base}/approve` }).flush(
      {
        type: 'https://tendara.test/problems/forbidden',
        title: 'Forbidden',
        status: 403,
        detail: 'You recommended this award, so someone else must approve it.',
      },
      { status: 403, statusText: 'Forbidden' },
    );
    await fixture.whenStable();

    const alert = page.querySelector('.form-error[role=alert]')!;
    expect(alert.textContent).toContain('You recommended this award, so someone else must approve it.');
    expect(page.querySelector('h2')!.textContent).toContain('Awaiting compliance decision');
  });

  it('will not return a recommendation without a comment, then returns it with one', async () => {
    const page = await open('compliance', recommended);
    button(page, 'Return to buyer').click();
    await fixture.whenStable();
    http.expectNone(`${base}/return`);
    expect(page.textContent).toContain('Comment is required.');

    typeComment(page, 'Please add the resilience check to the justification.');
    button(page, 'Return to buyer').click();
    const request = http.expectOne({ method: 'POST', url: `${base}/return` });
    expect(request.request.body).toEqual({ comment: 'Please add the resilience check to the justification.' });
    request.flush({
      ...recommended,
      status: 'returned',
      decidedBy: { id: 'user-compliance', name: 'Alba Quennell' },
      decidedAt: '2026-12-01T11:00:00Z',
      comment: 'Please add the resilience check to the justification.',
    });
    await fixture.whenStable();

    expect(page.querySelector('h2')!.textContent).toContain('Returned to the buyer');
    expect(page.textContent).toContain('Returned by');
    expect(page.querySelector('[role=status]')!.textContent).toContain('Returned to the buyer with your comment.');
    expect(button(page, 'Approve award')).toBeUndefined();
  });

  it('keeps every round after a return, and the buyer revises with the returned justification pre-filled', async () => {
    const returned: RecommendationView = {
      ...recommended, status: 'returned', decidedBy: { id: 'user-compliance', name: 'Alba Quennell' }, decidedAt: '2026-12-01T12:00:00Z',
      comment: 'Say why the Garrow Moor price was accepted.',
    };
    const firstRound: RecommendationView = { ...returned, id: 'e1e1e1e1-0000-4000-8000-000000000000', justification: 'First attempt.', comment: 'Too short.' };
    const page = await open('buyer', returned, runView(), [firstRound]);
    expect(page.querySelector('#history-heading')!.textContent).toBe('Earlier rounds');
    expect(page.querySelector('.history')!.textContent).toContain('First attempt.');
    expect(page.querySelector('.history')!.textContent).toContain('Too short.');
    button(page, 'Revise and recommend again').click();
    await fixture.whenStable();
    const textarea = document.querySelector<HTMLTextAreaElement>('mat-dialog-container textarea')!;
    expect(textarea.value).toBe(recommended.justification);
  });

  it('says how a recommendation is made when there is none', async () => {
    const page = await open('compliance', null);
    expect(page.textContent).toContain('No award has been recommended yet.');
  });
});
