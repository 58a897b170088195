import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatChipListboxHarness } from '@angular/material/chips/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { Router, provideRouter, withComponentInputBinding } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { SessionUser } from '@shared/roles';
import type { TenderSummary } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { provideApi } from '../../core/http/provide-api';
import { TenderList } from './tender-list';

const DAY = 86_400_000;

function summary(overrides: Partial<TenderSummary> & Pick<TenderSummary, 'id' | 'reference' | 'title' | 'status'>): TenderSummary {
  return {
    commodity: 'Rock salt, delivered',
    unit: 't',
    currency: 'EUR',
    closesAt: new Date(Date.now() + 13 * DAY + 4.5 * 3_600_000).toISOString(),
    timeZone: 'UTC',
    regionCount: 3,
    totalForecast: 12500,
    ...overrides,
  };
}

const open = summary({ id: 't1', reference: 'WCX-2027-001', title: 'Brine for the coastal depots', status: 'open' });
const closed = summary({
  id: 't2', reference: 'WCX-2026-009', title: 'Grit for footways', status: 'closed',
  closesAt: new Date(Date.now() - 2 * DAY).toISOString(), regionCount: 12, totalForecast: 52400,
});

function signInAs(role: SessionUser['role']): void {
  const user: SessionUser = { id: 'u1', email: 'someone@example.test', name: 'Ada Fenn', role, vendorOrganisation: null };
  // The Auth service keeps the person in a signal; restore() would ask the server, so set it directly.
  (TestBed.inject(Auth) as unknown as { current: { set(u: SessionUser): void } }).current.set(user);
}

describe('TenderList', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<TenderList>;

  async function start(role: SessionUser['role'], tenders: TenderSummary[], url = '/tenders', request = '/api/tenders'): Promise<void> {
    TestBed.configureTestingModule({
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([{ path: 'tenders', component: TenderList }], withComponentInputBinding())],
    });
    http = TestBed.inject(HttpTestingController);
    signInAs(role);
    const harness = await RouterTestingHarness.create();
    const navigated = harness.navigateByUrl(url);
    // A request in flight keeps the app unstable, so it is answered before waiting.
    for (let i = 0; i < 100 && !http.match({ method: 'GET', url: request }).some((r) => (r.flush(tenders), true)); i++) {
      await new Promise((resolve) => setTimeout(resolve, 5));
    }
    await navigated;
    fixture = harness.fixture as unknown as ComponentFixture<TenderList>;
    loader = TestbedHarnessEnvironment.loader(harness.fixture);
    await harness.fixture.whenStable();
  }

  afterEach(() => http.verify());

  async function rows(): Promise<Record<string, string>[]> {
    const table = await loader.getHarness(MatTableHarness);
    return Promise.all((await table.getRows()).map((row) => row.getCellTextByColumnName()));
  }

  it('lists tenders, latest closing first, with the time left and the total forecast', async () => {
    await start('buyer', [closed, open]);
    const shown = await rows();
    expect(shown.map((r) => r['reference'])).toEqual(['WCX-2027-001', 'WCX-2026-009']);
    expect(shown[0]['closesAt']).toMatch(/closes in 13 days 4 h$/);
    expect(shown[1]['closesAt']).toMatch(/closed$/);
    expect(shown[1]['totalForecast']).toBe('52,400 t');
    expect(shown[0]['status']).toBe('Open for bids');
    expect(shown[0]).not.toHaveProperty('myBidStatus');
  });

  it('asks the server again when a status is chosen', async () => {
    await start('compliance', [closed, open]);
    const chips = await loader.getHarness(MatChipListboxHarness);
    // The harness waits for stability, which the new request holds up: answer it meanwhile.
    const selected = chips.selectChips({ text: 'Closed' });
    for (let i = 0; i < 100 && !http.match({ url: '/api/tenders?status=closed' }).some((r) => (r.flush([closed]), true)); i++) {
      await new Promise((resolve) => setTimeout(resolve, 5));
    }
    await selected;
    await fixture.whenStable();
    expect((await rows()).map((r) => r['reference'])).toEqual(['WCX-2026-009']);
    // The filter is in the address, so a reload or a shared link shows the same list.
    expect(TestBed.inject(Router).url).toBe('/tenders?status=closed');
  });

  it('opens filtered and searched from the address', async () => {
    await start('buyer', [closed], '/tenders?status=closed&q=grit', '/api/tenders?status=closed&q=grit');
    expect((await rows()).map((r) => r['reference'])).toEqual(['WCX-2026-009']);
    expect((fixture.nativeElement as HTMLElement).querySelector<HTMLInputElement>('input[type=search]')!.value).toBe('grit');
  });

  it("shows a vendor its own bid's state and no draft filter", async () => {
    await start('vendor', [{ ...open, myBidStatus: 'revised' }, { ...closed, myBidStatus: null }]);
    const shown = await rows();
    expect(shown.map((r) => r['myBidStatus'])).toEqual(['Revision submitted', 'No bid yet']);
    const chips = await (await loader.getHarness(MatChipListboxHarness)).getChips();
    expect(await Promise.all(chips.map((c) => c.getText()))).not.toContain('Draft');
    expect(fixture.nativeElement.querySelector('h1').textContent).toBe('My tenders');
  });
});
