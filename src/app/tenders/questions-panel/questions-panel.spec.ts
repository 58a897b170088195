import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import type { QuestionView } from '@shared/procedure';
import type { SessionUser } from '@shared/roles';
import type { TenderView } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { provideApi } from '../../core/http/provide-api';
import { QuestionsPanel } from './questions-panel';

const DAY = 86_400_000;

function tender(clarificationsCloseAt: string): TenderView {
  return {
    id: 'a3c9e2f0-5b1d-4c7e-9f2a-6d8b0e1c3a57', reference: 'WCX-2027-004', title: 'Brine for the coastal depots', commodity: 'Brine',
    unit: 'm3', currency: 'EUR', locale: 'en-GB', status: 'open', closesAt: new Date(Date.now() + 10 * DAY).toISOString(),
    regionCount: 1, totalForecast: 400, description: '', standstillDays: 10, standstillExemption: null, closureDays: [], standstillEndsAt: null, publishedAt: '2026-11-01T09:00:00Z', closedAt: null,
    awardBasis: { sourcing: 'split', soleRegions: [] }, buyingBody: null, timeZone: 'UTC', bidValidityDays: 90,
    clarificationsCloseAt, abnormallyLowPercent: 20, amendments: [], cancellation: null,
    regions: [{ code: 'HVN', name: 'Harrowven depot', forecast: 400 }],
  };
}

const published: QuestionView = {
  id: 'q1', number: 1, status: 'answered', question: 'Is a tanker of 20 m3 accepted?', answer: 'Yes, at every depot.',
  askedAt: '2026-11-03T09:00:00Z', answeredAt: '2026-11-04T09:00:00Z', mine: false,
};
const mineWaiting: QuestionView = {
  id: 'q2', number: null, status: 'asked', question: 'May we deliver at night?', answer: null,
  askedAt: '2026-11-05T09:00:00Z', answeredAt: null, mine: true,
};

function signInAs(role: SessionUser['role']): void {
  const user: SessionUser = { id: 'u1', email: 'someone@example.test', name: 'Ada Fenn', role, vendorOrganisation: null };
  (TestBed.inject(Auth) as unknown as { current: { set(u: SessionUser): void } }).current.set(user);
}

describe('QuestionsPanel', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<QuestionsPanel>;

  async function start(role: SessionUser['role'], t: TenderView, questions: QuestionView[]): Promise<HTMLElement> {
    TestBed.configureTestingModule({ imports: [QuestionsPanel], providers: [provideApi(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
    signInAs(role);
    fixture = TestBed.createComponent(QuestionsPanel);
    fixture.componentRef.setInput('tender', t);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: `/api/tenders/${t.id}/questions` }).flush(questions);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  afterEach(() => http.verify());

  it('shows a vendor the numbered clarifications, its own question awaiting an answer, and the form before the deadline', async () => {
    const el = await start('vendor', tender(new Date(Date.now() + 5 * DAY).toISOString()), [published, mineWaiting]);
    const headings = [...el.querySelectorAll('.published h3')].map((h) => h.textContent?.trim().split(/\s+answered/)[0]);
    expect(headings).toEqual(['Clarification 1']);
    expect(el.querySelector('.waiting-title')?.textContent?.trim()).toBe('Your questions awaiting an answer');
    expect(el.querySelector('.waiting .secondary')?.textContent?.trim()).toBe("Awaiting the buyer's answer.");
    expect(el.querySelector('form.ask textarea')).not.toBeNull();
    expect(el.textContent).not.toContain('Asked by');
  });

  it('offers a vendor no form after the clarification deadline, and says so', async () => {
    const el = await start('vendor', tender(new Date(Date.now() - DAY).toISOString()), [published]);
    expect(el.querySelector('form.ask')).toBeNull();
    expect(el.querySelector('.note')?.textContent?.trim()).toBe('The clarification deadline has passed: questions can no longer be asked.');
  });

  it('sends the question and lists it once the server has it', async () => {
    const t = tender(new Date(Date.now() + 5 * DAY).toISOString());
    const el = await start('vendor', t, []);
    const textarea = el.querySelector<HTMLTextAreaElement>('form.ask textarea')!;
    textarea.value = 'May we deliver at night?';
    textarea.dispatchEvent(new Event('input'));
    el.querySelector<HTMLButtonElement>('form.ask button[type=submit]')!.click();
    const sent = http.expectOne({ method: 'POST', url: `/api/tenders/${t.id}/questions` });
    expect(sent.request.body).toEqual({ text: 'May we deliver at night?' });
    sent.flush(mineWaiting);
    // The list reloads (a resource: its request starts at the next change detection).
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: `/api/tenders/${t.id}/questions` }).flush([mineWaiting]);
    await fixture.whenStable();
    expect([...el.querySelectorAll('.waiting .text')].map((p) => p.textContent)).toEqual(['May we deliver at night?']);
    expect(textarea.value).toBe('');
  });
});
