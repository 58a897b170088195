import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter, withComponentInputBinding } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { SessionUser } from '@shared/roles';
import { Auth } from '../core/auth/auth';
import { provideApi } from '../core/http/provide-api';
import { SignIn } from './sign-in';

@Component({ template: '<p>landed</p>' })
class Landing {}

const buyer: SessionUser = {
  id: '6f1c1a52-3c0a-4a57-9a36-1d1a0c1b2e01',
  email: 'buyer@demo.tendara.test',
  name: 'Rowan Ashby',
  role: 'buyer',
  vendorOrganisation: null,
};

describe('SignIn', () => {
  let http: HttpTestingController;

  async function open(url = '/sign-in') {
    TestBed.configureTestingModule({
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter(
          [
            { path: 'sign-in', component: SignIn },
            { path: '**', component: Landing },
          ],
          withComponentInputBinding(),
        ),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create(url);
    const loader = TestbedHarnessEnvironment.loader(harness.fixture);
    return { harness, loader };
  }

  async function fill(loader: Awaited<ReturnType<typeof open>>['loader'], email: string, password: string) {
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue(email);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue(password);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).click();
  }

  beforeEach(() => {
    document.cookie = 'XSRF-TOKEN=token-from-server; path=/';
  });

  afterEach(() => {
    http.verify();
    document.cookie = 'XSRF-TOKEN=; expires=Thu, 01 Jan 1970 00:00:00 GMT; path=/';
  });

  it('posts the credentials to /api/session with the XSRF header taken from the cookie', async () => {
    const { loader } = await open();
    await fill(loader, 'buyer@demo.tendara.test', 'demo-pass-2026');

    const request = http.expectOne({ method: 'POST', url: '/api/session' });
    expect(request.request.headers.get('X-XSRF-TOKEN')).toBe('token-from-server');
    expect(request.request.body).toEqual({ email: 'buyer@demo.tendara.test', password: 'demo-pass-2026' });
    request.flush({ user: buyer });
  });

  it("shows the server's message when the sign-in is refused with 401", async () => {
    const { harness, loader } = await open();
    await fill(loader, 'buyer@demo.tendara.test', 'not-the-password');

    http.expectOne({ method: 'POST', url: '/api/session' }).flush(
      { type: 'about:blank', title: 'Sign-in failed', status: 401, detail: 'E-mail or password is not correct.' },
      { status: 401, statusText: 'Unauthorized', headers: { 'content-type': 'application/problem+json' } },
    );
    await harness.fixture.whenStable();

    const alert: HTMLElement = harness.routeNativeElement!.querySelector('[role=alert]')!;
    expect(alert.textContent).toContain('E-mail or password is not correct.');
    expect(TestBed.inject(Router).url).toBe('/sign-in');
    expect(TestBed.inject(Auth).user()).toBeNull();
  });

  it('tells the person to wait when the server answers 429 for too many attempts', async () => {
    const { harness, loader } = await open();
    await fill(loader, 'buyer@demo.tendara.test', 'guess-number-six');

    http.expectOne('/api/session').flush(
      { type: 'about:blank', title: 'Too many attempts', status: 429, detail: 'Too many failed sign-ins. Try again in 15 minutes.' },
      { status: 429, statusText: 'Too Many Requests' },
    );
    await harness.fixture.whenStable();

    expect(harness.routeNativeElement!.querySelector('[role=alert]')!.textContent).toContain(
      'Too many failed sign-ins. Try again in 15 minutes.',
    );
  });

  it('shows the schema messages under empty fields and sends nothing', async () => {
    const { loader } = await open();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }))).click();

    const fields = await loader.getAllHarnesses(MatFormFieldHarness);
    const errors = await Promise.all(fields.map((field) => field.getTextErrors()));
    expect(errors).toEqual([['E-mail is required.'], ['Password is required.']]);
    http.expectNone('/api/session');
  });

  it('signs the person in and returns to the page they asked for', async () => {
    const { harness, loader } = await open('/sign-in?returnUrl=%2Fpeople');
    await fill(loader, 'buyer@demo.tendara.test', 'demo-pass-2026');

    http.expectOne('/api/session').flush({ user: buyer });
    await harness.fixture.whenStable();

    expect(TestBed.inject(Router).url).toBe('/people');
    expect(TestBed.inject(Auth).user()).toEqual(buyer);
  });

  it('never follows a return address outside the app', async () => {
    const { harness, loader } = await open('/sign-in?returnUrl=%2F%2Fevil.example%2Fx');
    await fill(loader, 'buyer@demo.tendara.test', 'demo-pass-2026');

    http.expectOne('/api/session').flush({ user: buyer });
    await harness.fixture.whenStable();

    expect(TestBed.inject(Router).url).toBe('/');
  });
});
