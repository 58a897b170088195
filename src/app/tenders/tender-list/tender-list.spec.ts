import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatChipListboxHarness } from '@angular/material/chips/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { Router, provideRouter, withComponentInputBinding } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { SessionUser } from '@shared/roles';
import type { TenderPage, TenderSummary } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { provideApi } from '../../core/http/provide-api';
import { waitFor } from '../../testing/wait-for';
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

/** One page as the server answers it: `total` tenders match in all. */
function pageOf(items: TenderSummary[], total = items.length, page = 1, size = 25): TenderPage {
  return { items, total, page, size };
}

function signInAs(role: SessionUser['role']): void {
  const user: SessionUser = { id: 'u1', email: 'someone@example.test', name: 'Ada Fenn', role, vendorOrganisation: null };
  // The Auth service keeps the person in a signal; restore() would ask the server, so set it directly.
  (TestBed.inject(Auth) as unknown as { current: { set(u: SessionUser): void } }).current.set(user);
}

describe('TenderList', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<TenderList>;

  async function start(role: SessionUser['role'], tenders: TenderSummary[] | TenderPage, url = '/tenders', request = '/api/tenders'): Promise<void> {
    const answer = Array.isArray(tenders) ? pageOf(tenders) : tenders;
    TestBed.configureTestingModule({
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([{ path: 'tenders', component: TenderList }], withComponentInputBinding())],
    });
    http = TestBed.inject(HttpTestingController);
    signInAs(role);
    const harness = await RouterTestingHarness.create();
    const navigated = harness.navigateByUrl(url);
    // A request in flight keeps the app unstable, so it is answered before waiting.
    await waitFor(`the list to ask for ${request}`, () => http.match({ method: 'GET', url: request }).some((r) => (r.flush(answer), true)));
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

  /** Answers the one request to `url` while `action` (a harness call, which waits for it) runs. */
  async function answering<T>(action: Promise<T>, url: string, page: TenderPage): Promise<T> {
    await waitFor(`the list to ask for ${url}`, () => http.match({ method: 'GET', url }).some((r) => (r.flush(page), true)));
    const done = await action;
    await fixture.whenStable();
    return done;
  }

  it('lists the page in the order the server gave, with the time left and the total forecast', async () => {
    await start('buyer', [open, closed]);
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
    await waitFor('the list to ask for the closed tenders', () => http.match({ url: '/api/tenders?status=closed' }).some((r) => (r.flush(pageOf([closed])), true)));
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

  it('asks the server for the next page and keeps the page in the address', async () => {
    await start('buyer', pageOf([open], 26));
    expect((fixture.nativeElement as HTMLElement).querySelector('.count')!.textContent.trim()).toBe('26 tenders');
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 25 of 26');
    await answering(paginator.goToNextPage(), '/api/tenders?page=2', pageOf([closed], 26, 2));
    expect((await rows()).map((r) => r['reference'])).toEqual(['WCX-2026-009']);
    expect(TestBed.inject(Router).url).toBe('/tenders?page=2');
  });

  it('opens on the page, page size and order named in the address', async () => {
    await start('buyer', pageOf([closed], 60, 3, 10), '/tenders?page=3&size=10&sort=reference&dir=desc', '/api/tenders?page=3&size=10&sort=reference&dir=desc');
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('21 – 30 of 60');
    expect(await paginator.getPageSize()).toBe(10);
    const active = await (await loader.getHarness(MatSortHarness)).getActiveHeader();
    expect([await active!.getLabel(), await active!.getSortDirection()]).toEqual(['Reference', 'desc']);
  });

  it('orders by a column on the server, from the first page', async () => {
    await start('buyer', pageOf([open], 40), '/tenders?page=2', '/api/tenders?page=2');
    const [reference] = await (await loader.getHarness(MatSortHarness)).getSortHeaders({ label: 'Reference' });
    await answering(reference.click(), '/api/tenders?sort=reference', pageOf([closed, open], 40));
    expect((await rows()).map((r) => r['reference'])).toEqual(['WCX-2026-009', 'WCX-2027-001']);
    expect(TestBed.inject(Router).url).toBe('/tenders?sort=reference');
  });
});
