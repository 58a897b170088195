import { Routes } from '@angular/router';
import { validIds } from '../core/valid-ids';
import { OutboxList } from './outbox-list/outbox-list';
import { OutboxReader } from './outbox-reader/outbox-reader';

/** Administrator only: app.routes.ts guards the whole area with roleGuard(['admin']). */
export const OUTBOX_ROUTES: Routes = [
  { path: '', title: 'Outbox', component: OutboxList },
  { path: ':id', title: 'Message · Outbox', canMatch: [validIds], component: OutboxReader },
];
