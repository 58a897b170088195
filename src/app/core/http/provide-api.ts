import {
  provideHttpClient,
  withInterceptors,
  withXsrfConfiguration,
} from '@angular/common/http';
import { EnvironmentProviders } from '@angular/core';
import { problemInterceptor } from './problem-interceptor';

/**
 * HttpClient as Tendara uses it: Angular's built-in XSRF support with the cookie and header
 * names the server checks, and problem+json errors turned into ApiError. Tests use the same
 * providers (followed by provideHttpClientTesting) so they exercise the real interceptors.
 */
export function provideApi(): EnvironmentProviders {
  return provideHttpClient(
    withXsrfConfiguration({ cookieName: 'XSRF-TOKEN', headerName: 'X-XSRF-TOKEN' }),
    withInterceptors([problemInterceptor]),
  );
}
