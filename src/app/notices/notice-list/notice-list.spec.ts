import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { Role } from '@shared/roles';
import type { NoticeSummary } from '@shared/notices';
import { provideApi } from '../../core/http/provide-api';
import { signInAs } from '../../awards/testing/award-fixtures';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { notice } from '../testing/notice-fixtures';
import { NoticeList } from './notice-list';

const awarded = notice({ id: 'a1b2c3d4-0000-4000-8000-000000000001' });
const regretted = notice({
  id: 'a1b2c3d4-0000-4000-8000-000000000002',
  tenderReference: 'SCM-2026-02',
  tenderTitle: 'School meals, spring term',
  kind: 'regret',
  subject: 'Outcome of tender SCM-2026-02',
  status: 'queued',
  sentAt: null,
});

describe('NoticeList', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<NoticeList>;

  async function open(role: Role, notices: NoticeSummary[]): Promise<HTMLElement> {
    TestBed.configureTestingModule({
      imports: [NoticeList],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs(role);
    fixture = TestBed.createComponent(NoticeList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: '/api/notices' }).flush(notices);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  async function rows(): Promise<Record<string, string>[]> {
    const table = await loader.getHarness(MatTableHarness);
    return Promise.all((await table.getRows()).map((row) => row.getCellTextByColumnName()));
  }

  afterEach(() => http.verify());

  it("shows a vendor exactly the notices the server returns, with each one's state and kind", async () => {
    const page = await open('vendor', [awarded, regretted]);

    const shown = await rows();
    expect(shown).toHaveLength(2);
    expect(shown.map(({ subject, tender, kind, status }) => ({ subject, tender, kind, status }))).toEqual([
      { subject: 'Award of contract HWP-2026-07', tender: 'HWP-2026-07Road de-icing salt, winter 2026/27', kind: 'Award letter', status: 'mark_email_readSent' },
      { subject: 'Outcome of tender SCM-2026-02', tender: 'SCM-2026-02School meals, spring term', kind: 'Regret letter', status: 'schedule_sendWaiting to send' },
    ]);
    // A vendor's letters are all its own: no recipient column.
    const table = await loader.getHarness(MatTableHarness);
    expect(await (await table.getHeaderRows())[0].getCellTextByIndex()).toEqual(['Date', 'Letter', 'Tender', 'Kind', 'State']);
    // Each letter links to its reader.
    expect(page.querySelector('a[href$="a1b2c3d4-0000-4000-8000-000000000002"]')!.textContent).toBe('Outcome of tender SCM-2026-02');
  });

  it('shows the recipient to a buyer, who sees the notices of several vendors', async () => {
    await open('buyer', [awarded, notice({ id: 'n3', vendor: { id: 'v-brine', name: 'Brinewick Salt Co-op' }, kind: 'regret' })]);

    expect((await rows()).map((row) => row['vendor'])).toEqual(['Northfell Minerals', 'Brinewick Salt Co-op']);
  });

  it('says so when there is no notice yet', async () => {
    const page = await open('vendor', []);

    expect(await rows()).toHaveLength(0);
    expect(page.querySelector('.empty-row')!.textContent).toContain('No notice yet.');
  });

  it('asks the server for one state only when the filter is set', async () => {
    await open('buyer', [awarded, regretted]);
    const select = await loader.getHarness(MatSelectHarness);

    await select.open();
    // The harness waits for stability, which the new request holds up until it is answered.
    const chosen = select.clickOptions({ text: 'Not delivered' });
    const request = await answerWhenAsked((r) => r.url === '/api/notices', [], () => fixture.detectChanges());
    await chosen;
    expect(request.request.params.get('status')).toBe('failed');

    expect(await rows()).toHaveLength(0);
  });
});
