import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { NoticeView } from '@shared/notices';
import { provideApi } from '../../core/http/provide-api';
import { signInAs } from '../../awards/testing/award-fixtures';
import { noticeView } from '../testing/notice-fixtures';
import { NoticeReader } from './notice-reader';

describe('NoticeReader', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<NoticeReader>;
  const letter = noticeView();

  async function open(answer: (url: string) => void, id = letter.id): Promise<HTMLElement> {
    TestBed.configureTestingModule({
      imports: [NoticeReader],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('vendor');
    fixture = TestBed.createComponent(NoticeReader);
    fixture.componentRef.setInput('noticeId', id);
    fixture.detectChanges();
    answer(`/api/notices/${id}`);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  function show(notice: NoticeView): Promise<HTMLElement> {
    return open((url) => http.expectOne({ method: 'GET', url }).flush(notice), notice.id);
  }

  afterEach(() => {
    http.verify();
    jest.restoreAllMocks();
  });

  it('puts the letter in an iframe sandboxed with no permissions, behind a policy that blocks any fetch', async () => {
    const page = await show(letter);
    const frame = page.querySelector('iframe')!;

    expect(frame.getAttribute('sandbox')).toBe('');
    expect(frame.getAttribute('title')).toBe('Letter: Award of contract HWP-2026-07');
    expect(frame.srcdoc).toMatch(/^<meta http-equiv="Content-Security-Policy" content="default-src 'none';/);
    expect(frame.srcdoc).toContain(letter.html);
  });

  it('shows the facts of the notice and the plain-text version', async () => {
    const page = await show(letter);

    expect(page.querySelector('h1')!.textContent).toBe('Award of contract HWP-2026-07');
    const facts = page.querySelector('.facts')!.textContent;
    expect(facts).toContain('HWP-2026-07 · Road de-icing salt, winter 2026/27');
    expect(facts).toContain('Award letter');
    expect(facts).toContain('Sent');
    // The vendor reads its own letter: its name would only repeat.
    expect(facts).not.toContain('Northfell Minerals');
    expect(page.querySelector('details pre')!.textContent).toBe(letter.text);
  });

  it("gives the letter's own times in the procedure's zone, named, whatever the viewer's zone", async () => {
    // Stored end 2026-12-15T23:59Z is 23:59 in Dublin (GMT in December); the sending 10:00:05 UTC likewise.
    const page = await show(noticeView({ standstillEndsAt: '2026-12-15T23:59:00Z', timeZone: 'Europe/Dublin', locale: 'en-IE' }));
    const facts = page.querySelector('.facts')!.textContent;

    expect(facts).toContain('Standstill period ends');
    expect(facts).toContain('23:59 GMT (Europe/Dublin)');
    expect(facts).toContain('Tue, 15 Dec 2026');
    expect(facts).toContain('10:00 GMT (Europe/Dublin)');
    expect(page.querySelector('.zone-note')!.textContent).toContain('Europe/Dublin');
  });

  it('keeps a printable copy with the letter and its tables, but without scripts, handlers or styles', async () => {
    const page = await show(letter);
    const copy = page.querySelector('app-letter-print')!;

    expect(copy.textContent).toContain('Award of contract');
    expect(copy.querySelector('table td')!.textContent).toBe('Cranby depot');
    expect(copy.textContent).toContain('Standstill period ends on 15 December 2026.');
    expect(copy.querySelector('script, style, [style], [onclick]')).toBeNull();
    // The document's <title> is not printed as stray text before the letter.
    expect(copy.textContent.startsWith('Award of contract')).toBe(true);
    expect(page.querySelector('script')).toBeNull();
    expect(document.title).not.toBe('owned');
  });

  it('prints the page when Print is pressed', async () => {
    const page = await show(letter);
    const print = jest.spyOn(window, 'print').mockImplementation(() => undefined);

    const button = [...page.querySelectorAll('button')].find((b) => b.textContent.includes('Print'))!;
    button.click();

    expect(print).toHaveBeenCalledTimes(1);
    // Everything but the printable copy is marked to stay off paper.
    expect(page.querySelector('.print-hidden button')).toBe(button);
  });

  it("says the notice is not available when it is not the vendor's own", async () => {
    const page = await open((url) =>
      http.expectOne(url).flush(
        { type: 'about:blank', title: 'Not Found', status: 404, detail: 'No such notice.' },
        { status: 404, statusText: 'Not Found' },
      ),
    );

    expect(page.querySelector('h1')!.textContent).toBe('Notice not available');
    expect(page.querySelector('[role=alert]')!.textContent).toContain('There is no such notice, or it is not addressed to you.');
    expect(page.querySelector('iframe')).toBeNull();
  });
});
