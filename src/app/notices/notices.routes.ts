import { Routes } from '@angular/router';
import { validIds } from '../core/valid-ids';
import { NoticeList } from './notice-list/notice-list';

/**
 * /notices: vendors read their own letters; buyers, compliance and administrators the notices
 * they may see (the server filters, app.routes.ts guards the roles). The reader is lazy so the
 * list stays light.
 */
export const NOTICE_ROUTES: Routes = [
  { path: '', title: 'Notices', component: NoticeList },
  {
    path: ':noticeId',
    title: 'Notice',
    canMatch: [validIds],
    loadComponent: () => import('./notice-reader/notice-reader').then((m) => m.NoticeReader),
  },
];

/**
 * tenders/:id/notices, buyer only. Mounted as a componentless parent route, so the tender's `:id`
 * reaches the sender as its `id` input.
 */
export const NOTICE_SENDER_ROUTES: Routes = [
  {
    path: '',
    title: 'Award notices',
    loadComponent: () => import('./notice-sender/notice-sender').then((m) => m.NoticeSender),
  },
];
