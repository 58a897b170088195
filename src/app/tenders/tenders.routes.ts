import { inject } from '@angular/core';
import { CanMatchFn, Routes } from '@angular/router';
import type { Role } from '@shared/roles';
import { Auth } from '../core/auth/auth';
import { roleGuard } from '../core/auth/auth-guard';
import { validIds } from '../core/valid-ids';
import { TenderList } from './tender-list/tender-list';

/** Picks between routes of the same path by role, so /tenders/:id is one link for everybody. */
function forRole(roles: readonly Role[]): CanMatchFn {
  return () => inject(Auth).hasRole(roles);
}

/**
 * Every role reaches the list (app.routes.ts lets buyer, compliance, admin and vendor in). A vendor's
 * /tenders/:id is its bid page (bids/); the others get the tender detail with invitations and bids.
 */
export const TENDERS_ROUTES: Routes = [
  { path: '', title: 'Tenders', component: TenderList },
  {
    path: 'new',
    title: 'New tender',
    canActivate: [roleGuard(['buyer'])],
    loadComponent: () => import('./tender-editor/tender-editor').then((m) => m.TenderEditor),
  },
  {
    path: ':id/edit',
    title: 'Edit tender',
    canMatch: [validIds],
    canActivate: [roleGuard(['buyer'])],
    loadComponent: () => import('./tender-editor/tender-editor').then((m) => m.TenderEditor),
  },
  {
    path: ':id',
    canMatch: [validIds, forRole(['vendor'])],
    loadChildren: () => import('../bids/bids.routes').then((m) => m.BIDS_ROUTES),
  },
  {
    path: ':id',
    title: 'Tender',
    canMatch: [validIds],
    loadComponent: () => import('./tender-detail/tender-detail').then((m) => m.TenderDetail),
  },
];
