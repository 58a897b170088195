import { Routes } from '@angular/router';
import { Members } from './members/members';

/** Vendors only: app.routes.ts guards the area with roleGuard(['vendor']). */
export const ORGANISATION_ROUTES: Routes = [{ path: '', title: 'My organisation', component: Members }];
