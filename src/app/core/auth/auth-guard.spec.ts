import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { Role, SessionUser } from '@shared/roles';
import { provideApi } from '../http/provide-api';
import { Auth } from './auth';
import { authGuard, roleGuard } from './auth-guard';

@Component({ template: '<h1>page</h1>' })
class Page {}

function person(role: Role): SessionUser {
  return {
    id: '0b7f7a3e-58a2-4b43-8d1d-6c2f3b9a4c10',
    email: `${role}@demo.tendara.test`,
    name: `Demo ${role}`,
    role,
    vendorOrganisation: role === 'vendor' ? { id: 'a1c9', name: 'Saltmarsh Haulage Ltd' } : null,
  };
}

describe('route guards', () => {
  let http: HttpTestingController;

  /** Starts the app as it really starts: the session is asked for before the first navigation. */
  async function startAs(role: Role | null): Promise<void> {
    TestBed.configureTestingModule({
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([
          { path: 'people', canActivate: [roleGuard(['admin'])], component: Page },
          { path: 'overview', canActivate: [authGuard], component: Page },
          { path: 'no-access', component: Page },
          { path: 'sign-in', component: Page },
        ]),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    const restored = TestBed.inject(Auth).restore();
    const request = http.expectOne({ method: 'GET', url: '/api/session' });
    if (role) {
      request.flush({ user: person(role) });
    } else {
      request.flush(
        { type: 'about:blank', title: 'Not signed in', status: 401 },
        { status: 401, statusText: 'Unauthorized' },
      );
    }
    await restored;
  }

  afterEach(() => http.verify());

  it('sends a vendor who opens an admin page to /no-access', async () => {
    await startAs('vendor');
    await (await RouterTestingHarness.create()).navigateByUrl('/people');
    expect(TestBed.inject(Router).url).toBe('/no-access');
  });

  it.each<Role>(['buyer', 'compliance'])('sends a %s who opens an admin page to /no-access', async (role) => {
    await startAs(role);
    await (await RouterTestingHarness.create()).navigateByUrl('/people');
    expect(TestBed.inject(Router).url).toBe('/no-access');
  });

  it('lets an administrator open an admin page', async () => {
    await startAs('admin');
    await (await RouterTestingHarness.create()).navigateByUrl('/people');
    expect(TestBed.inject(Router).url).toBe('/people');
  });

  it('sends a signed-out visitor to sign in, remembering where they were going', async () => {
    await startAs(null);
    await (await RouterTestingHarness.create()).navigateByUrl('/people');
    expect(TestBed.inject(Router).url).toBe('/sign-in?returnUrl=%2Fpeople');
  });

  it('lets any signed-in role through authGuard, and nobody else', async () => {
    await startAs('vendor');
    const harness = await RouterTestingHarness.create();
    await harness.navigateByUrl('/overview');
    expect(TestBed.inject(Router).url).toBe('/overview');

    TestBed.inject(Auth).forget();
    await harness.navigateByUrl('/people');
    expect(TestBed.inject(Router).url).toBe('/sign-in?returnUrl=%2Fpeople');
  });
});
