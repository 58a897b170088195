import { Routes } from '@angular/router';

/** A vendor's page for one tender: its facts, regions and the vendor's own bid. */
export const BIDS_ROUTES: Routes = [
  { path: '', title: 'Your bid', loadComponent: () => import('./bid-page/bid-page').then((m) => m.BidPage) },
];
