import { HttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { firstValueFrom } from 'rxjs';
import { Auth } from '../auth/auth';
import { ApiError } from './api-error';
import { provideApi } from './provide-api';

@Component({ template: '' })
class Page {}

describe('problemInterceptor', () => {
  let http: HttpTestingController;
  let client: HttpClient;
  let harness: RouterTestingHarness;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([
          { path: 'people', component: Page },
          { path: 'sign-in', component: Page },
        ]),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    client = TestBed.inject(HttpClient);
    harness = await RouterTestingHarness.create('/people');
  });

  afterEach(() => http.verify());

  it('turns a problem+json answer into an ApiError with its field errors', async () => {
    const call = firstValueFrom(client.post('/api/users', {}));
    http.expectOne('/api/users').flush(
      {
        type: 'https://tendara.test/problems/validation',
        title: 'The request is not valid',
        status: 400,
        errors: [{ field: 'email', message: 'Enter a valid e-mail address.' }],
      },
      { status: 400, statusText: 'Bad Request' },
    );

    const error = await call.catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({
      status: 400,
      title: 'The request is not valid',
      userMessage: 'The request is not valid',
      fieldErrors: [{ field: 'email', message: 'Enter a valid e-mail address.' }],
    });
  });

  it('on a 401 from another call, forgets the person and goes to sign-in, keeping the page', async () => {
    const call = firstValueFrom(client.get('/api/users'));
    http.expectOne('/api/users').flush(
      { type: 'about:blank', title: 'Not signed in', status: 401 },
      { status: 401, statusText: 'Unauthorized' },
    );
    await expect(call).rejects.toBeInstanceOf(ApiError);
    await harness.fixture.whenStable();

    expect(TestBed.inject(Router).url).toBe('/sign-in?returnUrl=%2Fpeople');
    expect(TestBed.inject(Auth).user()).toBeNull();
  });

  it('leaves a 401 from GET /api/session alone: it only means nobody is signed in', async () => {
    const call = firstValueFrom(client.get('/api/session'));
    http.expectOne('/api/session').flush(
      { type: 'about:blank', title: 'Not signed in', status: 401 },
      { status: 401, statusText: 'Unauthorized' },
    );
    await expect(call).rejects.toMatchObject({ status: 401 });
    await harness.fixture.whenStable();

    expect(TestBed.inject(Router).url).toBe('/people');
  });

  it('describes an unreachable server in words', async () => {
    const call = firstValueFrom(client.get('/api/outbox'));
    http.expectOne('/api/outbox').error(new ProgressEvent('error'), { status: 0 });
    await expect(call).rejects.toMatchObject({ status: 0, title: 'The server could not be reached.' });
  });
});
