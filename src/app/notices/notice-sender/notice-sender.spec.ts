import { HttpTestingController, TestRequest, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { NoticeSummary } from '@shared/notices';
import type { TenderStatus, TenderView } from '@shared/tenders';
import { provideApi } from '../../core/http/provide-api';
import { signInAs } from '../../awards/testing/award-fixtures';
import { NOTICE_POLL_MS } from '../notice-api';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { PREVIEWS, TENDER_ID, notice, tenderNotices } from '../testing/notice-fixtures';
import { waitFor } from '../../testing/wait-for';
import { NOTICE_CAUTION, NoticeSender } from './notice-sender';

/** Short, so the spec sees several rounds of polling; the real interval is 2 s. */
const POLL_MS = 10;

function tender(status: TenderStatus): TenderView {
  return {
    id: TENDER_ID,
    reference: 'HWP-2026-07',
    title: 'Road de-icing salt, winter 2026/27',
    commodity: 'De-icing salt',
    unit: 't',
    currency: 'EUR',
    status,
    awardBasis: { sourcing: 'split', soleRegions: [] },
    buyingBody: null,
    timeZone: 'UTC',
    bidValidityDays: 90,
    clarificationsCloseAt: '2026-11-15T12:00:00Z',
    abnormallyLowPercent: 20,
    amendments: [],
    cancellation: null,
    closesAt: '2026-11-20T12:00:00Z',
    regionCount: 2,
    totalForecast: 7200,
    description: '',
    locale: 'en-GB',
    standstillDays: 10, standstillExemption: null, closureDays: [], standstillEndsAt: null,
    publishedAt: '2026-11-01T09:00:00Z',
    closedAt: '2026-11-20T12:00:00Z',
    regions: [],
  };
}

const queuedPair: NoticeSummary[] = [
  notice({ id: 'n1', status: 'queued', sentAt: null, attempts: 0 }),
  notice({ id: 'n2', vendor: PREVIEWS[1].vendor, kind: 'regret', status: 'queued', sentAt: null, attempts: 0 }),
];
const sentPair: NoticeSummary[] = queuedPair.map((n) => ({ ...n, status: 'sent', attempts: 1, sentAt: '2026-12-01T10:00:05Z' }));

describe('NoticeSender', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let documentLoader: HarnessLoader;
  let fixture: ComponentFixture<NoticeSender>;
  let page: HTMLElement;

  const render = () => fixture.detectChanges();
  /** Whether the sender's poll is still scheduled (the polled resource's own flag: its timer stream is live). */
  const polling = () => (fixture.componentInstance as unknown as { polling: () => boolean }).polling();

  /** Opens the sender for a tender in the given state whose notices are, so far, `notices`. */
  async function open(status: TenderStatus, notices: NoticeSummary[]): Promise<void> {
    // jsdom lays nothing out, so the dialog's focus trap finds no focusable element and says so.
    const warn = console.warn.bind(console);
    jest.spyOn(console, 'warn').mockImplementation((first: unknown, ...rest: unknown[]) => {
      if (typeof first === 'string' && first.includes('[cdkFocusInitial]')) return;
      warn(first, ...rest);
    });
    TestBed.configureTestingModule({
      imports: [NoticeSender],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        { provide: NOTICE_POLL_MS, useValue: POLL_MS },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('buyer');
    fixture = TestBed.createComponent(NoticeSender);
    loader = TestbedHarnessEnvironment.loader(fixture);
    documentLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    fixture.componentRef.setInput('id', TENDER_ID);
    await answerWhenAsked((r) => r.url === `/api/tenders/${TENDER_ID}`, tender(status), render);
    await answerWhenAsked((r) => r.url === `/api/tenders/${TENDER_ID}/notices/preview`, PREVIEWS, render);
    await answerWhenAsked(tenderNotices, notices, render);
    render();
    page = fixture.nativeElement as HTMLElement;
  }

  function sendButton(): HTMLButtonElement {
    return [...page.querySelectorAll('button')].find((b) => /Send notices|Sending/.test(b.textContent))!;
  }

  /** Clicks Send notices and confirms in the dialog; returns the POST, unanswered. */
  async function sendAndConfirm(): Promise<TestRequest> {
    sendButton().click();
    const dialog = await documentLoader.getHarness(MatDialogHarness);
    const confirm = await dialog.getHarness(MatButtonHarness.with({ text: 'Send notices' }));
    // Clicking waits for stability, which the POST holds up until it is answered: do not await here.
    void confirm.click();
    return waitFor('confirming to post the notices', () => http.match({ method: 'POST', url: `/api/tenders/${TENDER_ID}/notices` })[0]);
  }

  afterEach(() => {
    http.verify();
    jest.restoreAllMocks();
  });

  it('shows every letter for preview, the chosen one in a sandboxed frame, with the caution', async () => {
    await open('awarded', []);

    expect(page.querySelector('.counts')!.textContent).toContain('1 award letter, 1 regret letter.');
    const choices = [...page.querySelectorAll<HTMLButtonElement>('.letter-choice')];
    expect(choices.map((c) => c.textContent.replace(/\s+/g, ' ').trim())).toEqual([
      'Northfell Minerals, Award letter',
      'Brinewick Salt Co-op, Regret letter',
    ]);
    expect(choices[0].getAttribute('aria-current')).toBe('true');

    choices[1].click();
    await fixture.whenStable();

    const frame = page.querySelector('iframe')!;
    expect(frame.getAttribute('sandbox')).toBe('');
    expect(frame.srcdoc).toContain(PREVIEWS[1].html);
    expect(page.querySelector('.pane .to')!.textContent).toBe('To: office@brinewick.example, tenders@brinewick.example');
    expect(choices[1].getAttribute('aria-current')).toBe('true');
    expect(choices[0].getAttribute('aria-current')).toBeNull();
    expect(page.querySelector('.legal-note')!.textContent).toContain(NOTICE_CAUTION);
    expect(page.querySelector<HTMLAnchorElement>('a[download]')!.getAttribute('href')).toBe(
      `/api/tenders/${TENDER_ID}/award-schedule.xlsx`,
    );
  });

  it('sends once after confirmation, keeps the button off while sending, and announces the 202 answer', async () => {
    await open('awarded', []);

    const post = await sendAndConfirm();
    render();
    expect(sendButton().getAttribute('aria-disabled')).toBe('true');
    expect(sendButton().textContent).toContain('Sending…');
    // A second press while the first is under way asks nothing.
    sendButton().click();
    expect(await documentLoader.getAllHarnesses(MatDialogHarness)).toHaveLength(0);
    http.expectNone({ method: 'POST' });

    post.flush({ queued: 2 }, { status: 202, statusText: 'Accepted' });
    render();
    expect(page.querySelector('[role=status]')!.textContent).toBe(
      '2 notices queued for sending. The table below follows their delivery.',
    );
    // The delivery table is asked for again straight away; all sent, so the tender is reloaded.
    await answerWhenAsked(tenderNotices, sentPair, render);
    await answerWhenAsked((r) => r.url === `/api/tenders/${TENDER_ID}`, tender('notified'), render);
    await fixture.whenStable();
  });

  it('says nothing new was queued when every notice already was', async () => {
    await open('awarded', sentPair);

    (await sendAndConfirm()).flush({ queued: 0 }, { status: 202, statusText: 'Accepted' });
    render();

    expect(page.querySelector('[role=status]')!.textContent).toBe(
      "Nothing new was queued: every bidder's notice had already been sent or queued.",
    );
    await answerWhenAsked(tenderNotices, sentPair, render);
    await fixture.whenStable();
  });

  it('sends nothing when the confirmation is cancelled', async () => {
    await open('awarded', []);

    sendButton().click();
    const dialog = await documentLoader.getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();

    http.expectNone({ method: 'POST' });
    expect(sendButton().getAttribute('aria-disabled')).not.toBe('true');
  });

  it('follows the delivery every interval until no notice is queued, then stops asking', async () => {
    await open('awarded', queuedPair);

    // Still queued: asked again, and again, until both are out.
    await answerWhenAsked(tenderNotices, [{ ...queuedPair[0], status: 'sent', sentAt: '2026-12-01T10:00:05Z' }, queuedPair[1]], render);
    await answerWhenAsked(tenderNotices, sentPair, render);
    await answerWhenAsked((r) => r.url === `/api/tenders/${TENDER_ID}`, tender('notified'), render);
    await fixture.whenStable();

    const table = await loader.getHarness(MatTableHarness);
    const rows = await Promise.all((await table.getRows()).map((row) => row.getCellTextByColumnName()));
    expect(rows.map((row) => [row['vendor'], row['status']])).toEqual([
      ['Northfell Minerals', 'mark_email_readSent'],
      ['Brinewick Salt Co-op', 'mark_email_readSent'],
    ]);
    expect(page.querySelector('.delivery-summary')!.textContent.trim()).toBe('2 of 2 sent.');
    expect(page.querySelector('.subtitle')!.textContent).toContain('Notices sent');
    expect(sendButton().getAttribute('aria-disabled')).toBe('true');
    expect(page.querySelector('#send-blocked')!.textContent).toBe('Every notice of this tender has been sent.');

    // The poll has ended (its timer stream finalised), so nothing more will be asked.
    expect(polling()).toBe(false);
    http.expectNone(tenderNotices);
  });

  it('stops asking when the page is left', async () => {
    await open('awarded', queuedPair);

    expect(polling()).toBe(true);
    const component = fixture.componentInstance as unknown as { polling: () => boolean };
    fixture.destroy();
    // Destroyed: the timer stream is finalised, so no request can follow.
    expect(component.polling()).toBe(false);
    http.expectNone(tenderNotices);
  });

  it('keeps sending off until compliance has approved the award', async () => {
    await open('closed', []);

    expect(sendButton().getAttribute('aria-disabled')).toBe('true');
    expect(page.querySelector('#send-blocked')!.textContent).toBe('Notices can be sent once compliance has approved the award.');
    sendButton().click();
    expect(await documentLoader.getAllHarnesses(MatDialogHarness)).toHaveLength(0);
  });
});
