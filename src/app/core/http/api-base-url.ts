import { InjectionToken } from '@angular/core';

/**
 * Where the Tendara API lives. Services build their URLs from this token, so a test or a
 * different deployment can move the API without touching them.
 */
export const API_BASE_URL = new InjectionToken<string>('API_BASE_URL', {
  providedIn: 'root',
  factory: () => '/api',
});
