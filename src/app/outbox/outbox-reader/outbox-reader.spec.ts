import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { OutboxMessage } from '@shared/people';
import { provideApi } from '../../core/http/provide-api';
import { OutboxReader } from './outbox-reader';

const invitation: OutboxMessage = {
  id: '9d2b6c1e-4f3a-4e8b-8c7d-2a1b0c9d8e7f',
  from: 'Tendara <no-reply@tendara.test>',
  to: ['mira@demo.tendara.test'],
  subject: 'You are invited to Tendara',
  date: '2026-11-30T08:15:00Z',
  hasHtml: true,
  text: 'Hello Mira,\n\nSet your password: http://127.0.0.1:3000/account-setup/abc',
  html: '<style>p { color: #1f5c4a; }</style><p style="font-weight:bold">Hello Mira</p><script>parent.document.title = "owned"</script>',
};

describe('OutboxReader', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<OutboxReader>;

  async function show(message: OutboxMessage): Promise<HTMLElement> {
    TestBed.configureTestingModule({
      imports: [OutboxReader],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(OutboxReader);
    fixture.componentRef.setInput('id', message.id);
    // Render once so the resource asks for the message (waiting for stability would wait on it).
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: `/api/outbox/${message.id}` }).flush(message);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  afterEach(() => http.verify());

  it('shows the HTML in an iframe sandboxed with no permissions at all', async () => {
    const page = await show(invitation);
    const frame = page.querySelector('iframe')!;

    expect(frame).not.toBeNull();
    expect(frame.getAttribute('sandbox')).toBe('');
    expect(frame.getAttribute('title')).toBe('Message: You are invited to Tendara');
  });

  it('keeps the message as written, styles included, behind a policy that blocks any fetch', async () => {
    const page = await show(invitation);
    const srcdoc = page.querySelector('iframe')!.srcdoc;

    expect(srcdoc).toContain(invitation.html);
    expect(srcdoc).toMatch(/^<meta http-equiv="Content-Security-Policy" content="default-src 'none';/);
    // The script never reaches the app's document: only the sandboxed frame holds it.
    expect(page.querySelector('script')).toBeNull();
    expect(document.title).not.toBe('owned');
  });

  it('shows the headers and offers the plain-text version as preformatted text', async () => {
    const page = await show(invitation);

    expect(page.querySelector('h1')!.textContent).toBe('You are invited to Tendara');
    expect(page.querySelector('.headers')!.textContent).toContain('mira@demo.tendara.test');
    expect(page.querySelector('details pre')!.textContent).toBe(invitation.text);
  });

  it('shows a text-only message as preformatted text, without an iframe', async () => {
    const page = await show({ ...invitation, hasHtml: false, html: null });

    expect(page.querySelector('iframe')).toBeNull();
    expect(page.querySelector('pre')!.textContent).toBe(invitation.text);
  });
});
