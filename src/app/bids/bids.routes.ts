import { Routes } from '@angular/router';
import { confirmLeavingUnsaved } from '../ui/unsaved-changes';

/** A vendor's page for one tender: its facts, regions and the vendor's own bid. */
export const BIDS_ROUTES: Routes = [
  { path: '', title: 'Your bid', canDeactivate: [confirmLeavingUnsaved], loadComponent: () => import('./bid-page/bid-page').then((m) => m.BidPage) },
];
