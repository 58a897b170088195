import {
  ApplicationConfig,
  inject,
  provideAppInitializer,
  provideBrowserGlobalErrorListeners,
} from '@angular/core';
import { MatIconRegistry } from '@angular/material/icon';
import { TitleStrategy, provideRouter, withComponentInputBinding } from '@angular/router';
import { routes } from './app.routes';
import { Auth } from './core/auth/auth';
import { provideApi } from './core/http/provide-api';
import { PageTitleStrategy } from './core/page-title';

export const appConfig: ApplicationConfig = {
  providers: [
    provideBrowserGlobalErrorListeners(),
    provideApi(),
    provideRouter(routes, withComponentInputBinding()),
    { provide: TitleStrategy, useClass: PageTitleStrategy },
    // Icons come from the bundled Material Symbols font, never from the network.
    provideAppInitializer(() => {
      inject(MatIconRegistry).setDefaultFontSetClass('material-symbols-outlined');
    }),
    // Learn who is signed in before the first route is guarded; this call also sets the
    // XSRF-TOKEN cookie that later state-changing calls echo.
    provideAppInitializer(() => inject(Auth).restore()),
  ],
};
