import { Routes } from '@angular/router';
import { authGuard, roleGuard, signedOutGuard } from './core/auth/auth-guard';
import { validIds } from './core/valid-ids';

/**
 * Public pages stand alone; every other page sits in the shell behind authGuard, and each
 * area is lazy-loaded and guarded by role. A later area (tenders, bids, awards) is one more
 * child entry here plus its item in core/shell/navigation.ts, e.g.
 *   { path: 'tenders', canActivate: [roleGuard(['buyer', 'compliance', 'vendor'])],
 *     loadChildren: () => import('./tenders/tenders.routes').then((m) => m.TENDERS_ROUTES) },
 */
export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./sign-in/sign-in').then((m) => m.SignIn),
  },
  {
    path: 'account-setup/:token',
    title: 'Set your password',
    loadComponent: () => import('./account-setup/account-setup').then((m) => m.AccountSetup),
  },
  {
    path: '',
    // The frame is lazy too: the sign-in page does not need the toolbar, menus and navigation.
    loadComponent: () => import('./core/shell/shell').then((m) => m.Shell),
    canActivate: [authGuard],
    children: [
      { path: '', pathMatch: 'full', title: 'Overview', loadComponent: () => import('./home/home').then((m) => m.Home) },
      {
        path: 'people',
        canActivate: [roleGuard(['admin'])],
        loadChildren: () => import('./people/people.routes').then((m) => m.PEOPLE_ROUTES),
      },
      // Deeper tender pages owned by other areas come before 'tenders', which would match them first.
      {
        path: 'tenders/:id/evaluation',
        canMatch: [validIds],
        canActivate: [roleGuard(['buyer', 'compliance'])],
        loadChildren: () => import('./awards/awards.routes').then((m) => m.AWARD_ROUTES),
      },
      {
        path: 'tenders/:id/notices',
        canMatch: [validIds],
        canActivate: [roleGuard(['buyer'])],
        loadChildren: () => import('./notices/notices.routes').then((m) => m.NOTICE_SENDER_ROUTES),
      },
      {
        path: 'tenders',
        canActivate: [roleGuard(['admin', 'buyer', 'compliance', 'vendor'])],
        loadChildren: () => import('./tenders/tenders.routes').then((m) => m.TENDERS_ROUTES),
      },
      {
        path: 'notices',
        canActivate: [roleGuard(['admin', 'buyer', 'compliance', 'vendor'])],
        loadChildren: () => import('./notices/notices.routes').then((m) => m.NOTICE_ROUTES),
      },
      {
        path: 'organisation',
        canActivate: [roleGuard(['vendor'])],
        loadChildren: () => import('./organisation/organisation.routes').then((m) => m.ORGANISATION_ROUTES),
      },
      {
        path: 'settings',
        canActivate: [roleGuard(['admin', 'buyer', 'compliance', 'vendor'])],
        loadChildren: () => import('./settings/settings.routes').then((m) => m.SETTINGS_ROUTES),
      },
      {
        path: 'outbox',
        canActivate: [roleGuard(['admin'])],
        loadChildren: () => import('./outbox/outbox.routes').then((m) => m.OUTBOX_ROUTES),
      },
      { path: 'no-access', title: 'No access', loadComponent: () => import('./no-access/no-access').then((m) => m.NoAccess) },
      { path: '**', title: 'Page not found', loadComponent: () => import('./not-found/not-found').then((m) => m.NotFound) },
    ],
  },
];
