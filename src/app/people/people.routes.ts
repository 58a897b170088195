import { Routes } from '@angular/router';
import { PeopleList } from './people-list/people-list';

/** Administrator only: app.routes.ts guards the whole area with roleGuard(['admin']). */
export const PEOPLE_ROUTES: Routes = [{ path: '', title: 'People', component: PeopleList }];
