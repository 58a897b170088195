import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import type { Role } from '@shared/roles';
import type { TabulatedBid, TenderView } from '@shared/tenders';
import { signInAs } from '../../awards/testing/award-fixtures';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { provideApi } from '../../core/http/provide-api';
import { money } from '../../ui/number-format';
import { localClosingTime } from '../closing-time';
import { TENDER_UUID, tenderView } from '../testing/tender-fixtures';
import { TenderDetail } from './tender-detail';

const tenderUrl = `/api/tenders/${TENDER_UUID}`;
/** Five days and 90 minutes ahead: the countdown reads 5 days 1 h however long the test takes (under half an hour). */
const inFiveDays = new Date(Date.now() + 5 * 86_400_000 + 90 * 60_000).toISOString();
const invitations = [
  { vendorOrganisation: { id: 'v-north', name: 'Northfell Minerals', sme: false }, invitedAt: '2026-11-01T09:00:00Z' },
  { vendorOrganisation: { id: 'v-brine', name: 'Brinewick Salt Co-op', sme: true }, invitedAt: '2026-11-01T09:00:00Z' },
];
const open = tenderView({ status: 'open', closesAt: inFiveDays, closedAt: null, submittedBids: 3, estimatedValue: 1_150_000, invitations });

describe('TenderDetail', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<TenderDetail>;

  /**
   * Signs in, shows the page for `tender` and answers what the page asks for on opening: `follow` is
   * the GET that the page's parts make once the tender has arrived, with its answer (the page waits
   * for it, so waiting for stability first would never end).
   */
  async function showAs(role: Role, tender: TenderView, follow?: { url: string; body: object }): Promise<void> {
    TestBed.configureTestingModule({
      imports: [TenderDetail],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs(role);
    fixture = TestBed.createComponent(TenderDetail);
    fixture.componentRef.setInput('id', tender.id);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: tenderUrl }).flush(tender);
    // The clarifications panel lists the tender's questions, whatever its status.
    await answerWhenAsked(`${tenderUrl}/questions`, [], () => fixture.detectChanges());
    if (follow) await answerWhenAsked(follow.url, follow.body, () => fixture.detectChanges());
    await fixture.whenStable();
  }

  /** The buyer may invite more vendors until closing: the invitations panel lists the organisations. */
  const organisations = { url: '/api/vendor-organisations', body: [] };

  afterEach(() => http.verify());

  function text(): string {
    return ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');
  }

  it('shows the buyer an open tender as open, sealed, with only the count of submitted bids and no request for them', async () => {
    await showAs('buyer', open, organisations);
    expect((fixture.nativeElement as HTMLElement).querySelector('.eyebrow')?.textContent?.replace(/\s+/g, ' ').trim()).toBe('GRT-2027-014 · Open for bids');
    expect(text()).toContain('3 vendors have submitted a bid so far.');
    expect(text()).toContain(`Bids are sealed until the closing time (${localClosingTime(inFiveDays, 'Europe/Berlin')})`);
    expect(text()).toContain('closes in 5 days 1 h');
    expect(text()).toContain(`${money(1_150_000, 'EUR')} not shown to vendors`);
    // Sealed: no tabulation, no figures, and the bids were never asked for.
    http.expectNone(`${tenderUrl}/bids`);
    expect((fixture.nativeElement as HTMLElement).querySelector('app-bid-tabulation')).toBeNull();
    // Published: no more editing or publishing, and no evaluation yet.
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Publish|Edit|Evaluation/ }))).toHaveLength(0);
  });

  it('states the published award basis on the buyer’s page as vendors are shown it', async () => {
    await showAs('buyer', { ...open, awardBasis: { sourcing: 'split', soleRegions: ['R02'], maxVendors: 2 } }, organisations);
    const items = [...(fixture.nativeElement as HTMLElement).querySelectorAll('app-award-basis-panel li')].map((li) => li.textContent?.trim());
    expect(items).toContain('A region may be shared between vendors, except Wexcombe depot (R02), which goes to one vendor.');
    expect(items).toContain('At most 2 vendors will be awarded.');
  });

  it('publishes a draft only after the buyer confirms, with a POST, and then shows it open', async () => {
    const draft = { ...open, status: 'draft' as const, publishedAt: null, submittedBids: 0 };
    await showAs('buyer', draft, organisations);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Publish…/ }))).click();
    const dialog = await TestbedHarnessEnvironment.documentRootLoader(fixture).getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Publish GRT-2027-014?');
    expect(await dialog.getContentText()).toContain('2 invited organisations are e-mailed');
    http.expectNone(`${tenderUrl}/publish`);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Publish' }))).click();
    const request = http.expectOne({ method: 'POST', url: `${tenderUrl}/publish` });
    expect(request.request.body).toEqual({});
    request.flush(open);
    // The page shows the published tender afresh, its clarifications panel included.
    await answerWhenAsked(`${tenderUrl}/questions`, [], () => fixture.detectChanges());
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('.eyebrow')?.textContent).toContain('Open for bids');
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=status]')?.textContent).toBe('GRT-2027-014 is published; invited vendors are being e-mailed.');
  });

  it('lists what keeps a draft from being published when the server refuses it', async () => {
    await showAs('buyer', { ...open, status: 'draft', publishedAt: null, submittedBids: 0, invitations: [] }, organisations);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Publish…/ }))).click();
    const dialog = await TestbedHarnessEnvironment.documentRootLoader(fixture).getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Publish' }))).click();
    http.expectOne({ method: 'POST', url: `${tenderUrl}/publish` }).flush(
      {
        type: 'about:blank', title: 'Bad Request', status: 400, detail: 'The tender is not ready to publish.',
        errors: [{ field: 'invitations', message: 'Invite at least one vendor organisation.' }],
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    const alert = (fixture.nativeElement as HTMLElement).querySelector('.form-error[role=alert]');
    expect(alert?.textContent).toContain('The tender is not ready to publish:');
    expect(alert?.querySelector('li')?.textContent).toBe('Invite at least one vendor organisation.');
    expect((fixture.nativeElement as HTMLElement).querySelector('.eyebrow')?.textContent).toContain('Draft');
  });

  it('shows compliance the bid tabulation of a closed tender, and the way to the evaluation', async () => {
    const bid: TabulatedBid = {
      id: '11111111-0000-4000-8000-000000000001', vendor: { id: 'v-north', name: 'Northfell Minerals', sme: false },
      fixedFee: 25000, capacity: null, prices: { R01: 161.5, R02: 172.25 }, submittedAt: '2026-11-19T16:00:00Z', revision: 1,
      digest: 'd'.repeat(64), nonce: 'e'.repeat(64), receiptVerified: true, documentId: null,
      compliance: { decision: null, ground: null, note: null, decidedAt: null }, abnormallyLow: null,
      flags: { percent: 20, prices: [], total: null, totalCompared: true },
    };
    await showAs('compliance', tenderView({ status: 'closed', submittedBids: 1 }), { url: `${tenderUrl}/bids`, body: { submitted: 1, bids: [bid] } });
    const table = await loader.getHarness(MatTableHarness.with({ selector: '[aria-label="Bid tabulation: vendors by region"]' }));
    const cells = await table.getCellTextByColumnName();
    expect(cells['region-R02'].text).toHaveLength(1);
    expect(cells['region-R02'].text[0]).toContain(`${money(172.25, 'EUR', 4)} lowest`);
    expect(text()).not.toContain('submitted a bid so far');
    expect(await loader.getHarness(MatButtonHarness.with({ text: /Evaluation/ }))).toBeTruthy();
    // Compliance reads; only the buyer records checks.
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Check|Change/ }))).toHaveLength(0);
  });

  it('offers the buyer of a published tender its open data (OCDS) as a file to save, described by the caution beside it', async () => {
    await showAs('buyer', open, organisations);
    const link = (fixture.nativeElement as HTMLElement).querySelector<HTMLAnchorElement>('a[download][href$="/ocds.json"]');
    // Its name without the icon, which Material hides from assistive technology.
    const icon = link?.querySelector('mat-icon');
    expect(icon?.getAttribute('aria-hidden')).toBe('true');
    expect(link?.textContent?.replace(icon?.textContent ?? '', '').replace(/\s+/g, ' ').trim()).toBe('Open data (OCDS)');
    expect(link?.getAttribute('href')).toBe(`${tenderUrl}/ocds.json`);
    const note = (fixture.nativeElement as HTMLElement).querySelector(`#${link?.getAttribute('aria-describedby')}`);
    expect(note?.textContent?.replace(/\s+/g, ' ').trim()).toContain('Check it against your procurement rules and the law that applies to you before publishing it.');
  });

  it('offers compliance the evaluation report of a closed tender as a PDF and a workbook, both described by the decision-support note', async () => {
    await showAs('compliance', tenderView({ status: 'closed', submittedBids: 0 }), { url: `${tenderUrl}/bids`, body: { submitted: 0, bids: [] } });
    const root = fixture.nativeElement as HTMLElement;
    const links = [...root.querySelectorAll<HTMLAnchorElement>('a[download][href*="/report."]')];
    expect(links.map((a) => [a.getAttribute('href'), a.textContent?.replace(a.querySelector('mat-icon')?.textContent ?? '', '').replace(/\s+/g, ' ').trim()])).toEqual([
      [`${tenderUrl}/report.pdf`, 'Evaluation report (PDF)'], [`${tenderUrl}/report.xlsx`, 'Evaluation report (.xlsx)'],
    ]);
    const note = root.querySelector(`#${links[0].getAttribute('aria-describedby')}`);
    expect(note?.textContent?.replace(/\s+/g, ' ').trim()).toContain('your procurement rules and the law that applies to this tender govern the award.');
  });

  it('gives no evaluation report while the bids are sealed', async () => {
    await showAs('buyer', open, organisations);
    expect((fixture.nativeElement as HTMLElement).querySelector('a[href*="/report."]')).toBeNull();
    expect(text()).not.toContain('Evaluation report');
  });

  it('gives no open data for a draft: nothing is published yet', async () => {
    await showAs('buyer', { ...open, status: 'draft', publishedAt: null, submittedBids: 0 }, organisations);
    expect((fixture.nativeElement as HTMLElement).querySelector('a[href$="/ocds.json"]')).toBeNull();
    expect(text()).not.toContain('Open data (OCDS)');
  });

  it('gives an administrator no open-data link (the route is for buyer and compliance)', async () => {
    await showAs('admin', open);
    expect((fixture.nativeElement as HTMLElement).querySelector('a[href$="/ocds.json"]')).toBeNull();
    expect(text()).not.toContain('Open data (OCDS)');
  });
});
