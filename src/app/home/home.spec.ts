import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { SessionUser } from '@shared/roles';
import type { Worklist } from '@shared/worklist';
import { Auth } from '../core/auth/auth';
import { provideApi } from '../core/http/provide-api';
import { waitFor } from '../testing/wait-for';
import { Home } from './home';

/** A vendor's worklist (fictional): one draft closing soon; the other sections empty. */
const WORKLIST: Worklist = {
  total: 1,
  sections: [
    { kind: 'invitation', title: 'Invitations to answer', empty: 'When a buyer invites your organisation to an open tender, it appears here until you start a bid.', count: 0, items: [] },
    {
      kind: 'draft-closing', title: 'Draft bids closing within 72 hours', empty: 'A bid you saved as a draft appears here.', count: 1,
      items: [{
        kind: 'draft-closing', what: 'WCX-2027-004 · Brine for the coastal depots', why: 'Your bid is still a draft.',
        dueAt: '2027-01-15T12:00:00.000Z', dueLabel: 'Closes', timeZone: 'Europe/Dublin', link: '/tenders/0b7e1c36-54a2-4c1e-9d0a-3f6f2b8c9a11', tenderId: '0b7e1c36-54a2-4c1e-9d0a-3f6f2b8c9a11',
      }],
    },
  ],
};

describe('Home', () => {
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideApi(), provideHttpClientTesting(), provideRouter([])] });
    http = TestBed.inject(HttpTestingController);
    const user: SessionUser = { id: 'u1', email: 'owen@firm.test', name: 'Owen Marsh', role: 'vendor', vendorOrganisation: { id: 'o1', name: 'Fernhill Salt Ltd' } };
    (TestBed.inject(Auth) as unknown as { current: { set(u: SessionUser): void } }).current.set(user);
  });
  afterEach(() => http.verify());

  it('shows a skeleton while the worklist loads, then its items as links with their due time, and the empty sections’ sentences', async () => {
    const fixture = TestBed.createComponent(Home);
    fixture.detectChanges();
    const page = fixture.nativeElement as HTMLElement;
    const request = http.expectOne({ method: 'GET', url: '/api/worklist' });
    expect(page.querySelector('[role="status"]')?.getAttribute('aria-label')).toBe('Loading your worklist');

    request.flush(WORKLIST);
    await fixture.whenStable();
    expect(page.querySelector('[role="status"]')).toBeNull();
    const headings = [...page.querySelectorAll('.work-section h3')].map((h) => h.textContent?.replace(/\s+/g, ' ').trim());
    expect(headings).toEqual(['Draft bids closing within 72 hours (1)']);
    const link = page.querySelector<HTMLAnchorElement>('.work-section a')!;
    expect({
      href: link.getAttribute('href'),
      what: link.querySelector('.what')?.textContent?.trim(),
      due: link.querySelector('.due')?.textContent?.trim(),
    }).toEqual({
      href: '/tenders/0b7e1c36-54a2-4c1e-9d0a-3f6f2b8c9a11',
      what: 'WCX-2027-004 · Brine for the coastal depots',
      due: 'Closes: Fri, 15 Jan 2027, 12:00 GMT (Europe/Dublin)',
    });
    const quiet = [...page.querySelectorAll('.quiet-row')].map((r) => [r.querySelector('dt')?.textContent?.trim(), r.querySelector('dd')?.textContent?.trim()]);
    expect(quiet).toEqual([['Invitations to answer', 'When a buyer invites your organisation to an open tender, it appears here until you start a bid.']]);
  });

  it('says so, with a way to try again, when the worklist cannot be loaded', async () => {
    const fixture = TestBed.createComponent(Home);
    fixture.detectChanges();
    http.expectOne('/api/worklist').flush({ title: 'Server error' }, { status: 500, statusText: 'Server Error' });
    await fixture.whenStable();
    const alert = (fixture.nativeElement as HTMLElement).querySelector('[role="alert"]');
    expect(alert?.textContent).toContain('Try again');
    (alert!.querySelector('button') as HTMLButtonElement).click();
    // The resource asks again once the click's change detection has run.
    await waitFor('the worklist to be asked for again', () => {
      fixture.detectChanges();
      return http.match('/api/worklist').some((r) => (r.flush(WORKLIST), true));
    });
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('[role="alert"]')).toBeNull();
  });
});
