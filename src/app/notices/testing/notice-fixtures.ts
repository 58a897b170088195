import type { HttpRequest } from '@angular/common/http';
import type { NoticePreview, NoticeSummary, NoticeView } from '@shared/notices';

/** Fictional letters of one fictional tender, shared by the notice screens' specs. */

export const TENDER_ID = '4a7c1e90-2b3d-4f5e-8a6b-7c8d9e0f1a2b';

const AWARD_HTML =
  '<!doctype html><html><head><title>Award of contract HWP-2026-07</title><style>td { color: #1f5c4a; }</style></head>' +
  '<body style="background:#f4f6f5"><h1 style="font-size:20px">Award of contract</h1>' +
  '<table><tr><th>Region</th><th>Quantity</th><th>Unit price</th></tr>' +
  '<tr><td>Cranby depot</td><td>4,200 t</td><td>€61.50</td></tr></table>' +
  '<p onclick="parent.alert(1)">Standstill period ends on 15 December 2026.</p>' +
  '<script>parent.document.title = "owned"</script></body></html>';

export function notice(overrides: Partial<NoticeSummary> & Pick<NoticeSummary, 'id'>): NoticeSummary {
  return {
    tenderId: TENDER_ID,
    tenderReference: 'HWP-2026-07',
    tenderTitle: 'Road de-icing salt, winter 2026/27',
    vendor: { id: 'v-north', name: 'Northfell Minerals' },
    kind: 'award',
    subject: 'Award of contract HWP-2026-07',
    status: 'sent',
    attempts: 1,
    lastError: null,
    queuedAt: '2026-12-01T10:00:00Z',
    sentAt: '2026-12-01T10:00:05Z',
    standstillEndsAt: '2026-12-15T23:59:00Z',
    timeZone: 'Europe/Dublin',
    locale: 'en-IE',
    ...overrides,
  };
}

export function noticeView(overrides: Partial<NoticeView> = {}): NoticeView {
  return {
    ...notice({ id: 'a1b2c3d4-0000-4000-8000-000000000001' }),
    html: AWARD_HTML,
    text: 'Award of contract HWP-2026-07\n\nCranby depot: 4,200 t at €61.50',
    ...overrides,
  };
}

export const PREVIEWS: NoticePreview[] = [
  {
    vendor: { id: 'v-north', name: 'Northfell Minerals' },
    kind: 'award',
    to: ['bids@northfell.example'],
    subject: 'Award of contract HWP-2026-07',
    html: AWARD_HTML,
    text: 'Award of contract HWP-2026-07',
  },
  {
    vendor: { id: 'v-brine', name: 'Brinewick Salt Co-op' },
    kind: 'regret',
    to: ['office@brinewick.example', 'tenders@brinewick.example'],
    subject: 'Outcome of tender HWP-2026-07',
    html: '<p>Successful vendor: Northfell Minerals. The awarded total is €1,234,567.50.</p>',
    text: 'Successful vendor: Northfell Minerals.',
  },
];

/** GET /api/notices for one tender, whatever other parameters it carries. */
export function tenderNotices(request: HttpRequest<unknown>): boolean {
  return request.method === 'GET' && request.url === '/api/notices' && request.params.get('tenderId') === TENDER_ID;
}
