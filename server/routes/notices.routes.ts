import { z } from 'zod';
import { noticeListQuerySchema } from '@shared/notices';
import { tenderIdParamSchema } from '@shared/tenders';
import type { AppDeps } from '../context';
import { route, type AnyRoute } from '../http/route';
import { runView } from '../services/evaluation/results.service';
import { approvedRun } from '../services/notices/letters';
import { listNotices, previewNotices, readNotice, sendNotices } from '../services/notices/notices.service';
import { findVisibleTender } from '../services/tender-access';
import { buildAwardWorkbook } from '../workbooks/award-workbook';
import { exportName, sendDownload, XLSX } from '../http/download';


export function noticeRoutes(deps: AppDeps): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/tenders/:id/notices/preview', tag: 'Notices', access: ['buyer'], params: tenderIdParamSchema,
      summary: 'Every award letter and regret letter as it would be sent (nothing is stored or sent).',
      handler: ({ em, user, params }) => previewNotices(em, user, params.id),
    }),
    route({
      method: 'post', path: '/tenders/:id/notices', tag: 'Notices', access: ['buyer'], params: tenderIdParamSchema, status: 202,
      summary: 'Queue one notice per bidder of an awarded tender. A notice is never duplicated: sending again (or two sends at once) gets 409 for the second.',
      responses: { 409: 'Not awarded yet, or the notices are already queued' },
      handler: ({ em, user, params }) => sendNotices({ em, boss: deps.boss }, user, params.id),
    }),
    route({
      method: 'get', path: '/notices', tag: 'Notices', access: ['admin', 'buyer', 'compliance', 'vendor'], query: noticeListQuerySchema,
      summary: 'Notices: a vendor gets only its own sent letters; a buyer those of its tenders.',
      handler: ({ em, user, query }) => listNotices(em, user, query),
    }),
    route({
      method: 'get', path: '/notices/:id', tag: 'Notices', access: ['admin', 'buyer', 'compliance', 'vendor'],
      params: z.object({ id: z.uuid({ error: 'Must be a valid id.' }) }),
      summary: 'One notice with its letter (HTML and text).',
      handler: ({ em, user, params }) => readNotice(em, user, params.id),
    }),
    route({
      method: 'get', path: '/tenders/:id/award-schedule.xlsx', tag: 'Notices', access: ['buyer', 'compliance'], params: tenderIdParamSchema, produces: XLSX,
      summary: 'The approved award as a workbook.',
      handler: async ({ em, user, params, res }) => {
        const tender = await findVisibleTender(em, user, params.id);
        const run = await approvedRun(em, tender);
        const file = await buildAwardWorkbook(await runView(em, user, run.id), tender);
        sendDownload(res, { filename: exportName(tender.reference, 'award-schedule.xlsx'), content: file, type: XLSX });
      },
    }),
  ];
}
